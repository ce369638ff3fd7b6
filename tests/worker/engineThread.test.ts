import { describe, expect, it } from 'vitest';
import { CancelledError, computeVacuum, EngineInputError, type VacuumRequest } from '../../server/engine/index';
import { runInEngineThread } from '../../server/threads/engineThread';
import { overallPercent } from '../../server/worker/handlers/vacuumRun';

const request: VacuumRequest = {
  source: { kind: 'sprinkling', sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 150, seed: 'thread-check' } },
  truncation: { rule: 'sqrtN' },
  subregion: { kind: 'diamond', past: { t: -0.6, x: 0 }, future: { t: 0.6, x: 0 } },
};

describe('engine thread', () => {
  it('gives what computeVacuum gives in this thread, with progress for every stage', async () => {
    const stages: string[] = [];
    const threaded = await runInEngineThread(request, { onProgress: (stage, fraction) => fraction === 1 && stages.push(stage) });
    const direct = await computeVacuum(request);
    expect(stages).toEqual(['sprinkle', 'order', 'green', 'spectrum', 'state', 'entropy']);
    expect(Array.from(threaded.points)).toEqual(Array.from(direct.points));
    expect(threaded.eigenvalues.length).toBe(direct.eigenvalues.length);
    threaded.eigenvalues.forEach((value, k) => expect(Math.abs(value - direct.eigenvalues[k]!)).toBeLessThanOrEqual(1e-12 * direct.eigenvalues[0]!));
    expect(threaded.modesKept).toBe(direct.modesKept);
    expect(threaded.entropy!.S).toBeCloseTo(direct.entropy!.S, 10);
    expect(Array.from(threaded.entropy!.elements)).toEqual(Array.from(direct.entropy!.elements));
  });

  it('stops before the next stage once the poll asks to cancel', async () => {
    const error = await runInEngineThread(request, { poll: async () => 'cancel', pollMs: 5 }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(CancelledError);
  });

  it('reports bad input as EngineInputError with the engine message', async () => {
    // a sub-diamond inside the region but too small to hold an element: found only once the points are
    const impossible: VacuumRequest = { ...request, subregion: { kind: 'diamond', past: { t: 0, x: 0 }, future: { t: 0.001, x: 0 } } };
    const error = await runInEngineThread(impossible).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(EngineInputError);
    expect((error as Error).message).toMatch(/subregion holds 0 element/);
  });
});

describe('overall percent', () => {
  it('rises through the stages from 0 to 100', () => {
    const stages = ['sprinkle', 'order', 'green', 'spectrum', 'state', 'entropy'] as const;
    const marks = stages.flatMap((s) => [overallPercent(s, 0, true), overallPercent(s, 1, true)]);
    expect(marks[0]).toBe(0);
    expect(marks[marks.length - 1]).toBe(100);
    for (let k = 1; k < marks.length; k++) expect(marks[k]).toBeGreaterThanOrEqual(marks[k - 1]!);
    expect(overallPercent('state', 1, false)).toBe(100);
  });
});
