import { join, resolve } from 'node:path';
import { cruise, type ICruiseResult } from 'dependency-cruiser';
import extractTSConfig from 'dependency-cruiser/config-utl/extract-ts-config';
import { describe, expect, it } from 'vitest';
import config from '../../.dependency-cruiser.mjs';

const projectRoot = resolve(import.meta.dirname, '../..');
const fixtureRoot = join(import.meta.dirname, 'fixtures');

/**
 * The rules of .dependency-cruiser.mjs applied to `folders` of `baseDir`, one line per violation
 * (of a rule with severity `error` only, when `errorsOnly`).
 */
async function violations(baseDir: string, folders: string[], tsConfigFile: string, errorsOnly = false): Promise<string[]> {
  const tsConfigPath = join(baseDir, tsConfigFile);
  const result = await cruise(
    folders,
    {
      ...config.options,
      baseDir,
      tsConfig: { fileName: tsConfigPath },
      validate: true,
      ruleSet: { forbidden: config.forbidden },
    },
    {},
    { tsConfig: extractTSConfig(tsConfigPath) },
  );
  const output = result.output as ICruiseResult;
  return output.summary.violations
    .filter((v) => !errorsOnly || v.rule.severity === 'error')
    .map((v) => `${v.rule.name}: ${v.from} → ${v.to}${v.cycle ? ` (cycle ${v.cycle.map((step) => step.name).join(' → ')})` : ''}`)
    .sort();
}

describe('import boundaries', () => {
  it('holds in server/, src/, shared/, tests/, scripts/ and bin/', async () => {
    const found = await violations(projectRoot, ['server', 'src', 'shared', 'tests', 'scripts', 'bin'], 'tsconfig.json', true);
    expect(found, found.join('\n')).toEqual([]);
  });

  it('reports each kind of crossing in a fixture tree', async () => {
    const found = await violations(fixtureRoot, ['server', 'src', 'shared'], 'tsconfig.fixture.json');
    expect(found).toEqual(
      [
        'api-imports-api-or-neutral: server/api/route.ts → server/worker/handler.ts',
        'api-never-reaches-worker: server/api/route.ts → server/worker/handler.ts',
        'api-never-reaches-worker: server/api/service.ts → server/worker/handler.ts',
        'engine-no-io: server/engine/solver.ts → fs',
        'engine-no-io: server/engine/solver.ts → server/db/store.ts',
        'feature-imports-only-shared-pieces: src/features/alpha/routes/Page.ts → src/features/beta/components/Widget.ts',
        'imports-resolve: server/exports/bare.ts → shared/names',
        'shared-through-its-alias: server/exports/bare.ts → shared/names',
        'shared-through-its-alias: server/exports/table.ts → shared/names.ts',
        'no-cycles: server/engine/first.ts → server/engine/second.ts (cycle server/engine/second.ts → server/engine/first.ts)',
        'shared-pieces-stand-below-features: src/ui/Panel.ts → src/features/beta/components/Widget.ts',
        'shared-stands-alone: shared/names.ts → server/db/store.ts',
        'worker-imports-worker-or-neutral: server/worker/reply.ts → server/api/route.ts',
        'worker-never-reaches-api: server/worker/reply.ts → server/api/route.ts',
      ].sort(),
    );
  });
});
