import { mkdtemp } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { build } from 'vite';

const projectRoot = resolve(import.meta.dirname, '../..');

/**
 * Builds the client into a temporary folder (so a running `npm start` keeps its own dist/client),
 * with Vite's manifest at `.vite/manifest.json`. Returns the folder; the caller removes it.
 *
 * Vite bundles React for the NODE_ENV it finds, which vitest sets to `test`; `production: true`
 * builds what `npm run build` serves (production React, about 230 KB smaller) by setting NODE_ENV
 * for the build only.
 */
export async function buildClient(options: { production?: boolean } = {}): Promise<string> {
  const outDir = await mkdtemp(join(tmpdir(), 'tacet-client-'));
  const nodeEnv = process.env.NODE_ENV;
  if (options.production) process.env.NODE_ENV = 'production';
  try {
    await build({
      root: projectRoot,
      configFile: join(projectRoot, 'vite.config.ts'),
      logLevel: 'error',
      build: { outDir, emptyOutDir: true, manifest: true },
    });
  } finally {
    if (nodeEnv === undefined) delete process.env.NODE_ENV;
    else process.env.NODE_ENV = nodeEnv;
  }
  return outDir;
}

/** One chunk of Vite's build manifest (the fields used here). */
export interface ManifestChunk {
  file: string;
  src?: string;
  isEntry?: boolean;
  isDynamicEntry?: boolean;
  imports?: string[];
  dynamicImports?: string[];
}

export type Manifest = Record<string, ManifestChunk>;

/**
 * The manifest keys of the chunks a browser fetches to run `starts`: those chunks and everything they
 * import statically (`<script type=module>` and `import … from`), but not what they load by `import()`.
 */
export function staticClosure(manifest: Manifest, starts: string[]): Set<string> {
  const seen = new Set<string>();
  const pending = [...starts];
  while (pending.length > 0) {
    const key = pending.pop()!;
    if (seen.has(key)) continue;
    const chunk = manifest[key];
    if (!chunk) throw new Error(`The build manifest has no chunk ${key}.`);
    seen.add(key);
    pending.push(...(chunk.imports ?? []));
  }
  return seen;
}
