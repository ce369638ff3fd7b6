import { describe, expect, it } from 'vitest';
import { CancelledError, computeVacuum, DENSE_SIZE_LIMIT, EngineInputError, validateVacuumRequest } from '../../server/engine/index';
import { vacuumStages } from '@shared/vacuum';

const source = { kind: 'sprinkling' as const, sprinkling: { region: { kind: 'diamond2d' as const, properTime: 2 }, count: 120, seed: 'pipeline' } };

describe('computeVacuum', () => {
  it('reports the stages in order and returns the documented fields', async () => {
    const seen: string[] = [];
    const r = await computeVacuum(
      { source, truncation: { rule: 'sqrtN' }, subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } }, doubleTruncation: true },
      { onProgress: (stage, fraction) => fraction === 1 && seen.push(stage) },
    );
    expect(seen).toEqual([...vacuumStages]);
    expect(r.N).toBe(120);
    expect(r.points).toHaveLength(240);
    expect(r.density).toBeCloseTo(60, 12); // N / (τ²/2), server/engine/README.md §2
    expect(r.eigenvalues).toHaveLength(60);
    expect(r.cutoff).toBeCloseTo(Math.sqrt(120) / (4 * Math.PI), 12);
    expect(r.entropy?.doubleTruncation).toBe(true);
    expect(r.sprinkling).toEqual({ seed: 'pipeline', prng: 'seedrandom.arc4', process: 'fixed' });
    expect(Object.keys(r.timings)).toEqual([...vacuumStages]);
    const again = await computeVacuum({ source });
    expect(Array.from(again.points)).toEqual(Array.from(r.points));
  });

  it('stops with CancelledError between stages', async () => {
    const started: string[] = [];
    const run = computeVacuum({ source }, { onProgress: (stage, f) => f === 0 && started.push(stage), shouldCancel: () => started.includes('green') });
    await expect(run).rejects.toBeInstanceOf(CancelledError);
    expect(started).toEqual(['sprinkle', 'order', 'green']);
  });

  it('rejects requests beyond the dense limit or without a needed density, with a clear message', () => {
    expect(() =>
      validateVacuumRequest({ source: { kind: 'sprinkling', sprinkling: { ...source.sprinkling, count: DENSE_SIZE_LIMIT.maxN + 1 } } }),
    ).toThrow(new RegExp(`exceeds the dense limit of ${DENSE_SIZE_LIMIT.maxN} elements`));
    expect(() => validateVacuumRequest({ source: { kind: 'points', points: [0, 0, 1, 0], dimension: 2 }, mass: 1 })).toThrow(EngineInputError);
    expect(() => validateVacuumRequest({ source: { kind: 'points', points: [0, 0, 0, 0, 1, 0, 0, 0], dimension: 4 } })).toThrow(/needs a density/);
    expect(() => validateVacuumRequest({ source: { kind: 'points', points: [0, Number.NaN, 1, 0], dimension: 2 } })).toThrow(/not a finite number/);
  });
});
