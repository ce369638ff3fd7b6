import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * The repository explains itself: code, tests and docs cite the engine's notes by their path in the
 * repository (server/engine/README.md §n) and never a document or folder outside it. Scans every text
 * file of the source folders and the top-level docs.
 */

const root = path.resolve(import.meta.dirname, '..', '..');
const NOTES = 'server/engine/README.md';
const scannedFolders = ['server', 'shared', 'src', 'tests', 'scripts', 'bin', 'native', 'fixtures'];
const scannedFiles = ['DEVELOPERS.md', 'README.md'];
/** generated or installed trees (and the browser tests' screenshots), none of them written by hand */
const skippedFolders = new Set(['node_modules', 'build', 'dist', 'screenshots', '.data', '.test-data', 'coverage']);
const textFile = /\.(?:ts|tsx|mts|cts|js|mjs|cjs|md|sh|json|gyp|cc|h|css|html|ya?ml)$/;

function walk(dir: string, out: string[]): string[] {
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    if (skippedFolders.has(entry.name)) continue;
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) walk(full, out);
    else if (textFile.test(entry.name)) out.push(full);
  }
  return out;
}

function scannedPaths(): string[] {
  return [
    ...scannedFolders.flatMap((folder) => walk(path.join(root, folder), [])),
    ...scannedFiles.map((file) => path.join(root, file)),
  ];
}

/** Section numbers of the notes: headings "## §n …". */
function sectionNumbers(notes: string): Set<number> {
  return new Set(Array.from(notes.matchAll(/^#{2,3} §(\d+)\b/gm), (m) => Number(m[1])));
}

/** What a text must not say: the old outside document, under any of its names, or an absolute path into the work area. */
function outsideCitations(text: string): string[] {
  const found: string[] = [];
  // "physics notes", also when a comment wraps between the two words
  for (const m of text.matchAll(/physics(?:[\s*/#]|\/\/)+notes/gi)) found.push(m[0].replace(/\s+/g, ' '));
  for (const m of text.matchAll(/physics\.md|design\.md|notes folder|\/work\/[\w./-]*/gi)) found.push(m[0]);
  return found;
}

/** A module specifier just before the match: whether it resolves is the compiler's check, not this one's. */
const moduleSpecifier = /(?:\bfrom\s*|\bimport\s*\(\s*|\bimport\s+|\brequire\s*\(\s*|\bvi\.mock\s*\(\s*)['"]$/;

/**
 * Relative paths that start with ../, resolved from the folder of the file that names them (as imports
 * and `new URL(…, import.meta.url)` resolve them): any that leads outside the repository, and, outside
 * import specifiers, any that leads to nothing (a comment naming "../shared/x.md" meant a folder beside
 * the repository). A path continuing another (`$DIR/../x`) is not one of them.
 */
function strayRelativePaths(text: string, file: string): string[] {
  const stray: string[] = [];
  for (const m of text.matchAll(/(?<![\w.$}/-])(?:\.\.\/)+[\w.@/-]*/g)) {
    const target = path.resolve(path.dirname(file), m[0]).replace(/\/$/, '');
    const inside = target === root || target.startsWith(root + path.sep);
    if (!inside) {
      stray.push(m[0]);
      continue;
    }
    if (moduleSpecifier.test(text.slice(Math.max(0, m.index - 20), m.index))) continue;
    const candidates = [target, `${target}.ts`, `${target}.tsx`, `${target}.js`, `${target}.mjs`, `${target}.json`, path.join(target, 'index.ts')];
    if (!candidates.some((c) => existsSync(c))) stray.push(m[0]);
  }
  return stray;
}

/** Every §n named by a citation of the notes: "server/engine/README.md §4", "… §1–§2", "… §1 and §4", "… §5, §12". */
function citedSections(text: string): number[] {
  const cited: number[] = [];
  const citation = /server\/engine\/README\.md((?:(?:[\s,–\-*/()]|and|or)*§\d+)+)/g;
  for (const m of text.matchAll(citation)) for (const n of m[1].matchAll(/§(\d+)/g)) cited.push(Number(n[1]));
  return cited;
}

describe('the checks themselves', () => {
  const file = path.join(root, 'server', 'engine', 'example.ts');
  it('find the outside document however it is written', () => {
    expect(outsideCitations('// physics notes §4: W is Hermitian')).toHaveLength(1);
    expect(outsideCitations(' * relation (shared physics\n * notes §1; units c = 1)')).toHaveLength(1);
    expect(outsideCitations('see /work/shared/reference and physics.md §5')).toEqual(['/work/shared/reference', 'physics.md']);
    expect(outsideCitations('// server/engine/README.md §4 (Johnston 2008)')).toEqual([]);
  });
  it('find relative paths that leave the repository or lead nowhere, and pass real ones', () => {
    expect(strayRelativePaths("import { x } from '../../shared/vacuum';", file)).toEqual([]);
    expect(strayRelativePaths("new URL('../../fixtures/diamond300.csv', import.meta.url)", file)).toEqual([]);
    expect(strayRelativePaths('the notes in ../../../shared/physics.md', file)).toEqual(['../../../shared/physics.md']);
    expect(strayRelativePaths('see ../shared/physics.md', file)).toEqual(['../shared/physics.md']);
    expect(strayRelativePaths('"$data/../pg-initdb.log"', file)).toEqual([]);
    expect(strayRelativePaths("import { y } from '../../../../outside/module';", file)).toEqual(['../../../../outside/module']);
  });
  it('read every section a citation names', () => {
    expect(citedSections('(server/engine/README.md §1–§2; units c = 1)')).toEqual([1, 2]);
    expect(citedSections('// server/engine/README.md §1 and §4 (Johnston 2009)')).toEqual([1, 4]);
    expect(citedSections('(server/engine/README.md §5, §12).')).toEqual([5, 12]);
    expect(citedSections('server/engine/README.md\n * §13, computed')).toEqual([13]);
    expect(sectionNumbers('# Title\n## §1 One\ntext §9\n## §2 Two\n')).toEqual(new Set([1, 2]));
  });
});

describe('citations of the notes', () => {
  const notes = readFileSync(path.join(root, NOTES), 'utf8');
  const sections = sectionNumbers(notes);
  const files = scannedPaths();

  it('the notes number their sections §1, §2, … without gaps', () => {
    const numbers = [...sections].sort((a, b) => a - b);
    expect(numbers.length).toBeGreaterThan(10);
    expect(numbers).toEqual(numbers.map((_, k) => k + 1));
  });

  it('no file cites a document or path outside the repository', () => {
    const offences: string[] = [];
    for (const file of files) {
      const text = readFileSync(file, 'utf8');
      const relative = path.relative(root, file);
      // this file spells out what it forbids, in its own examples
      if (relative === path.join('tests', 'docs', 'notesCitations.test.ts')) continue;
      for (const hit of outsideCitations(text)) offences.push(`${relative}: ${hit}`);
      for (const hit of strayRelativePaths(text, file)) offences.push(`${relative}: ${hit}`);
    }
    expect(offences).toEqual([]);
  });

  it(`every "${NOTES} §n" names a section that exists`, () => {
    const missing: string[] = [];
    let count = 0;
    for (const file of files) {
      const relative = path.relative(root, file);
      if (relative === path.join('tests', 'docs', 'notesCitations.test.ts')) continue;
      for (const n of citedSections(readFileSync(file, 'utf8'))) {
        count++;
        if (!sections.has(n)) missing.push(`${relative}: §${n}`);
      }
    }
    expect(missing).toEqual([]);
    // the engine's code does cite its notes; a scan that finds none is looking in the wrong place
    expect(count).toBeGreaterThan(50);
  });
});
