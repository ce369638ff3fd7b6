import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * The TypeScript compiler over the whole project (client, server, shared, tests, scripts): vitest and
 * tsx strip types without checking them, so a broken type would otherwise only show in an editor.
 */
describe('types', () => {
  it('the project type-checks with tsc --noEmit', () => {
    const root = path.resolve(import.meta.dirname, '..');
    const result = spawnSync(process.execPath, [path.join(root, 'node_modules', 'typescript', 'bin', 'tsc'), '--noEmit', '-p', 'tsconfig.json'], {
      cwd: root,
      encoding: 'utf8',
      timeout: 240_000,
    });
    expect(result.stdout + result.stderr).toBe('');
    expect(result.status).toBe(0);
  }, 300_000);
});
