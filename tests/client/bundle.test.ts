import { readFile, rm, stat } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildClient, staticClosure, type Manifest } from '../support/clientBuild';

// Budget of the script a browser fetches before it can show the sign-in page (bytes, minified, before
// compression). React, React DOM, React Router and TanStack Query take about 290 KB of it.
const signInBudget = 400 * 1024;

let outDir: string;
let manifest: Manifest;

async function size(key: string): Promise<number> {
  return (await stat(join(outDir, manifest[key]!.file))).size;
}

beforeAll(async () => {
  outDir = await buildClient({ production: true });
  manifest = JSON.parse(await readFile(join(outDir, '.vite', 'manifest.json'), 'utf8')) as Manifest;
});

afterAll(async () => {
  if (outDir) await rm(outDir, { recursive: true, force: true });
});

describe('client bundle', () => {
  it('serves the sign-in page within its script budget', async () => {
    const entry = Object.keys(manifest).find((key) => manifest[key]!.isEntry);
    expect(entry).toBe('index.html');
    const page = 'src/features/auth/routes/SignInPage.tsx';
    // The page is a lazy route: a chunk of its own that the entry loads by import().
    expect(manifest[page]?.isDynamicEntry).toBe(true);
    expect(manifest[entry!]!.dynamicImports).toContain(page);
    const chunks = [...staticClosure(manifest, [entry!, page])];
    const sizes = await Promise.all(chunks.map(size));
    const total = sizes.reduce((sum, s) => sum + s, 0);
    const listing = chunks.map((key, i) => `${manifest[key]!.file} ${sizes[i]}`).join('\n');
    expect(total, `first load of /signin: ${total} bytes\n${listing}`).toBeLessThanOrEqual(signInBudget);
  });

  it('loads plotly only with a plot', async () => {
    const plotly = 'src/lib/plotly.ts';
    // plotly.js-dist-min is about 4.8 MB; if another module imported it statically, it would move to a
    // chunk shared with that module and this one would shrink.
    expect(await size(plotly)).toBeGreaterThan(4_000_000);
    const staticImporters = Object.keys(manifest).filter((key) => manifest[key]!.imports?.includes(plotly));
    expect(staticImporters).toEqual([]);
    const dynamicImporters = Object.keys(manifest).filter((key) => manifest[key]!.dynamicImports?.includes(plotly));
    expect(dynamicImporters.map((key) => manifest[key]!.src ?? manifest[key]!.file)).toEqual([
      expect.stringMatching(/PlotFigure/),
    ]);
  });
});
