import { describe, expect, it } from 'vitest';
import type { CreateRunRequest } from '@shared/runs';
import {
  defaultRunForm,
  runFormForCausalSet,
  runFormFromRequest,
  runRequestFromForm,
  tipsForRegion,
  type PickedCausalSet,
  type RunFormValues,
} from '../../src/features/runs/lib/runForm';
import { computeTimingText, formatDuration } from '../../src/lib/computeTiming';

/** "Open in the new-run form": a run's request back into the form, the inverse of runRequestFromForm. */
const form = (changes: Partial<RunFormValues> = {}): RunFormValues => ({ ...defaultRunForm('seed-1'), ...changes });

function requestOf(values: RunFormValues, picked: PickedCausalSet | null = null): CreateRunRequest {
  const checked = runRequestFromForm(values, undefined, picked);
  if (!checked.ok) throw new Error(`the form refused: ${JSON.stringify(checked.errors)}`);
  return checked.request;
}

const coordinatesSet: PickedCausalSet = { id: '0b3f5a34-6a55-4c1e-9a43-9d1f1c2b7e10', kind: 'coordinates', dimension: 2, N: 40 };

const forms: [string, RunFormValues, PickedCausalSet | null][] = [
  ['the defaults', form(), null],
  [
    'a titled massive run with every entropy setting',
    form({
      title: 'massive, doubly cut',
      mass: '0.75',
      truncation: { kind: 'lambda', value: '0.4' },
      withSubregion: true,
      past: { t: '-0.4', x: '0.1', y: '0', z: '0' },
      future: { t: '0.6', x: '0.1', y: '0', z: '0' },
      doubleTruncation: true,
      restrictedCut: { kind: 'lambda', value: '0.2' },
      renyi: '0.5, 2, inf',
      complement: true,
      withPair: true,
      pairA: { past: { t: '-0.2', x: '-0.5', y: '0', z: '0' }, future: { t: '0.2', x: '-0.5', y: '0', z: '0' }, elementList: '' },
      pairB: { past: { t: '-0.2', x: '0.5', y: '0', z: '0' }, future: { t: '0.2', x: '0.5', y: '0', z: '0' }, elementList: '' },
      engine: 'dense',
      prng: 'alea',
      count: '300',
    }),
    null,
  ],
  ['a Poisson sprinkling by density with the knee', form({ process: 'poisson', sizeBy: 'density', density: '80', truncation: { kind: 'knee', value: '0.25' } }), null],
  [
    'a 4D diamond with a sub-diamond',
    (() => {
      const base = form({ regionKind: 'diamond4d', truncation: { kind: 'knee', value: '' }, withSubregion: true, doubleTruncation: true });
      return { ...base, ...tipsForRegion(base)! };
    })(),
    null,
  ],
  [
    'a cylinder with the top modes',
    (() => {
      const base = form({ regionKind: 'cylinder2d', circumference: '5', truncation: { kind: 'modes', value: '40' } });
      return { ...base, ...tipsForRegion(base)! };
    })(),
    null,
  ],
  [
    'an imported set with element lists',
    form({
      source: 'imported',
      causalSetId: coordinatesSet.id,
      withSubregion: true,
      subregionBy: 'elements',
      elementList: '0, 1, 2, 5',
      withPair: true,
      pairA: { ...defaultRunForm('x').pairA, elementList: '3, 4' },
      pairB: { ...defaultRunForm('x').pairB, elementList: '6, 7' },
      doubleTruncation: true,
    }),
    coordinatesSet,
  ],
];

describe('form → request → form', () => {
  for (const [name, values, picked] of forms) {
    it(`gives back ${name}`, () => {
      const request = requestOf(values, picked);
      expect(runFormFromRequest(request, 'seed-1')).toEqual(values);
      // and request → form → request is the same request
      expect(requestOf(runFormFromRequest(request, 'seed-1'), picked)).toEqual(request);
    });
  }
});

describe('stored request → form', () => {
  it('reads a run on an imported set by its stored reference and keeps its tips', () => {
    const stored = {
      mass: 0,
      truncation: { rule: 'sqrtN' as const },
      doubleTruncation: true,
      subregion: { kind: 'diamond' as const, past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } },
      causalSet: { id: coordinatesSet.id, name: 'forty', kind: 'coordinates', checksum: 'ab', N: 40, density: null, region: null },
    };
    const values = runFormFromRequest(stored, 'fresh');
    expect(values).toMatchObject({ source: 'imported', causalSetId: coordinatesSet.id, withSubregion: true, subregionBy: 'tips', doubleTruncation: true });
    expect(values.past).toEqual({ t: '-0.5', x: '0', y: '0', z: '0' });
    expect(requestOf(values, coordinatesSet)).toEqual({ causalSetId: coordinatesSet.id, mass: 0, truncation: { rule: 'sqrtN' }, doubleTruncation: true, complement: false, subregion: stored.subregion });
  });

  it('reads a re-analysis as its own settings on the parent’s sprinkling (the same seed gives the same points)', () => {
    const sprinkling = { region: { kind: 'diamond2d' as const, properTime: 2 }, process: 'fixed' as const, count: 120, seed: 'parent-seed', prng: 'arc4' as const };
    const values = runFormFromRequest({ mass: 0, truncation: { rule: 'none' }, doubleTruncation: false, sprinkling, reusedPoints: { runId: 'p', N: 120, density: 60 } } as never);
    expect(values).toMatchObject({ source: 'sprinkle', seed: 'parent-seed', count: '120', truncation: { kind: 'none', value: '' } });
  });

  it('opens the form for an imported set with the set picked, its dimension’s cut and double truncation on', () => {
    expect(runFormForCausalSet({ id: coordinatesSet.id, dimension: 2, name: 'forty' }, 's')).toMatchObject({ title: 'forty', source: 'imported', causalSetId: coordinatesSet.id, doubleTruncation: true, truncation: { kind: 'sqrtN' } });
    // √N/(4π) is a 2D rule (Sorkin–Yazdi 2018): a 4D set starts from the knee
    expect(runFormForCausalSet({ id: coordinatesSet.id, dimension: 4 }, 's').truncation.kind).toBe('knee');
  });
});

describe('time and queue text', () => {
  const timing = (changes: object) => ({ elapsedSeconds: null, estimatedSecondsLeft: null, queuePosition: null, queueLength: 3, ...changes });

  it('says where a queued run waits, and how long a running one has run and has left', () => {
    expect(computeTimingText('queued', timing({ queuePosition: 1 }))).toBe('queued · next in line');
    expect(computeTimingText('queued', timing({ queuePosition: 3 }))).toBe('queued · 3rd in line');
    expect(computeTimingText('queued', timing({ queuePosition: 12 }))).toBe('queued · 12th in line');
    expect(computeTimingText('queued', timing({ queuePosition: 22 }))).toBe('queued · 22nd in line');
    expect(computeTimingText('running', timing({ elapsedSeconds: 80.4 }))).toBe('running 1 min 20 s');
    expect(computeTimingText('running', timing({ elapsedSeconds: 80.4, estimatedSecondsLeft: 118 }))).toBe('running 1 min 20 s · about 2 min left');
    expect(computeTimingText('running', timing({ elapsedSeconds: 5, estimatedSecondsLeft: 12 }))).toBe('running 5 s · about 10 s left');
    expect(computeTimingText('done', timing({ elapsedSeconds: 3725 }))).toBe('took 1 h 2 min');
    expect(computeTimingText('failed', timing({ elapsedSeconds: 0.4 }))).toBe('failed after under 1 s');
  });

  it('writes durations in s, min and h', () => {
    expect([formatDuration(0.2), formatDuration(42.6), formatDuration(60), formatDuration(3599), formatDuration(7260)]).toEqual(['under 1 s', '43 s', '1 min 0 s', '59 min 59 s', '2 h 1 min']);
  });
});
