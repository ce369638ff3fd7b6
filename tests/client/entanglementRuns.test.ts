import { describe, expect, it } from 'vitest';
import { initialReanalyseValues, reanalyseRequestFromForm } from '../../src/features/runs/lib/reanalyseForm';
import { defaultRunForm, fieldForIssuePath, humanise, runRequestFromForm, serverFieldErrors, type PickedCausalSet, type RunFormValues } from '../../src/features/runs/lib/runForm';
import { pairTraces, renyiRows, renyiTraces } from '../../src/features/runs/lib/plotData';
import { insideFutureLightCone } from '../../src/features/runs/lib/runForm';

/** The run forms' Rényi orders, pair and complement check, and the run page's plot data for them (issue 15). */
const form = (changes: Partial<RunFormValues> = {}): RunFormValues => ({ ...defaultRunForm('seed-15'), ...changes });
const colors = { data: '#111', dataSoft: '#555', reference: '#0a0', cut: '#33f', accentDeep: '#22a' };
const tip = (t: number, x: number) => ({ t: String(t), x: String(x), y: '0', z: '0' });

describe('new-run form → Rényi orders, pair and complement in the body', () => {
  it('sends the orders and the complement with the subregion, and the default pair as two spacelike diamonds', () => {
    const checked = runRequestFromForm(form({ withSubregion: true, renyi: '2, 0.5, inf', complement: true, withPair: true, doubleTruncation: true }));
    expect(checked.ok).toBe(true);
    if (!checked.ok) return;
    expect(checked.request.renyi).toEqual([2, 0.5, 'inf']);
    expect(checked.request.complement).toBe(true);
    expect(checked.request.doubleTruncation).toBe(true);
    const { a, b } = checked.request.mutualInformation as { a: { kind: string; past: { t: number; x: number }; future: { t: number; x: number } }; b: typeof a };
    expect([a.kind, b.kind]).toEqual(['diamond', 'diamond']);
    // the default A and B lie side by side: A's rightmost corner left of B's leftmost, and neither tip in the other's light cone
    const halfA = (a.future.t - a.past.t) / 2;
    const halfB = (b.future.t - b.past.t) / 2;
    expect(a.past.x + halfA).toBeLessThan(b.past.x - halfB);
    expect(insideFutureLightCone(a.past, b.future)).toBe(false);
    expect(insideFutureLightCone(b.past, a.future)).toBe(false);
  });

  it('leaves the orders and the complement out without a subregion, and asks double truncation for a pair alone', () => {
    const checked = runRequestFromForm(form({ withSubregion: false, renyi: '2', complement: true, withPair: true, doubleTruncation: true }));
    expect(checked.ok).toBe(true);
    if (!checked.ok) return;
    expect(checked.request.renyi).toBeUndefined();
    expect(checked.request.complement).toBe(false);
    expect(checked.request.doubleTruncation).toBe(true);
    expect(checked.request.mutualInformation).toBeDefined();
  });

  it('refuses α ≤ 0, α = 1, more than 8 orders and text, beside the Rényi field', () => {
    for (const [text, message] of [
      ['0', /α must be > 0/],
      ['2, -1', /α must be > 0/],
      ['1', /von Neumann/],
      ['0.5, 2, 3, 4, 5, 6, 7, 8, 9', /at most 8/],
      ['two', /comma-separated/],
    ] as const) {
      const checked = runRequestFromForm(form({ withSubregion: true, renyi: text }));
      expect(checked.ok, text).toBe(false);
      if (checked.ok) continue;
      expect(checked.errors.renyi, text).toMatch(message);
    }
  });

  it('puts a bad tip of A or B beside that tip', () => {
    const checked = runRequestFromForm(form({ withPair: true, pairA: { past: tip(0, -0.5), future: tip(0.1, -0.2), elementList: '' }, pairB: { past: tip(-0.2, 0.5), future: { ...tip(0.2, 0.5), x: 'x' }, elementList: '' } }));
    expect(checked.ok).toBe(false);
    if (checked.ok) return;
    expect(checked.errors['mutualInformation.a.future.t']).toMatch(/future light cone/);
    expect(checked.errors['mutualInformation.b.future.x']).toBe('Enter a number.');
  });

  it('takes A and B as element lists on a relation list, with the list’s own messages', () => {
    const relations: PickedCausalSet = { id: '0b6f9a52-3c1d-4e8f-9a7b-1c2d3e4f5a6b', kind: 'relations', dimension: 2, N: 10 };
    const base = { source: 'imported' as const, causalSetId: relations.id, withPair: true };
    const ok = runRequestFromForm(form({ ...base, pairA: { ...form().pairA, elementList: '0, 1' }, pairB: { ...form().pairB, elementList: '5 6 7' } }), 6000, relations);
    expect(ok.ok && ok.request.mutualInformation).toEqual({ a: { kind: 'elements', indices: [0, 1] }, b: { kind: 'elements', indices: [5, 6, 7] } });
    const bad = runRequestFromForm(form({ ...base, pairA: { ...form().pairA, elementList: '0, 10' }, pairB: { ...form().pairB, elementList: '3' } }), 6000, relations);
    expect(bad.ok).toBe(false);
    if (bad.ok) return;
    expect(bad.errors['mutualInformation.a.indices']).toMatch(/Element 10 does not exist/);
    expect(bad.errors['mutualInformation.b.indices']).toMatch(/at least two/);
  });

  it('shows a server refusal of the pair beside A, B or the pair', () => {
    expect(fieldForIssuePath('mutualInformation.a')).toBe('mutualInformation.a');
    expect(fieldForIssuePath('mutualInformation.b.past')).toBe('mutualInformation.b');
    expect(fieldForIssuePath('mutualInformation.a.indices.3')).toBe('mutualInformation.a.indices');
    expect(fieldForIssuePath('renyi.2')).toBe('renyi');
    const errors = serverFieldErrors({ code: 'invalid_request', message: 'A and B overlap', issues: [{ path: 'mutualInformation', message: 'A and B overlap' }] });
    expect(errors).toEqual({ mutualInformation: 'A and B overlap' });
    expect(humanise({ 'mutualInformation.a.past.t': 'Expected number' })).toEqual({ 'mutualInformation.a.past.t': 'Each tip coordinate is a number.' });
  });
});

describe('re-analysis form → Rényi orders, pair and complement', () => {
  const parent = {
    mass: 0,
    truncation: { rule: 'sqrtN' },
    subregion: { kind: 'diamond', past: { t: -0.4, x: 0 }, future: { t: 0.4, x: 0 } },
    doubleTruncation: true,
    renyi: [2, 'inf'],
    complement: true,
    mutualInformation: {
      a: { kind: 'diamond', past: { t: -0.3, x: -0.5 }, future: { t: 0.3, x: -0.5 } },
      b: { kind: 'diamond', past: { t: -0.3, x: 0.5 }, future: { t: 0.3, x: 0.5 } },
    },
  };

  it('shows the parent’s orders, pair and complement, and an untouched form sends them again', () => {
    const values = initialReanalyseValues(parent);
    expect(values.renyi).toBe('2, inf');
    expect(values.withPair).toBe(true);
    const checked = reanalyseRequestFromForm(values, 2);
    expect(checked).toEqual({ ok: true, request: { ...parent, restrictedCut: null, engine: 'auto' } });
  });

  it('clears what the form drops of the parent’s, and sends nothing for what the parent never had', () => {
    const values = { ...initialReanalyseValues(parent), renyi: '', withPair: false, complement: false };
    const checked = reanalyseRequestFromForm(values, 2);
    expect(checked.ok && checked.request).toMatchObject({ renyi: null, mutualInformation: null, complement: false });
    const plain = reanalyseRequestFromForm(initialReanalyseValues({ mass: 0, truncation: { rule: 'sqrtN' } }), 2);
    expect(plain.ok && plain.request).not.toHaveProperty('renyi');
    expect(plain.ok && plain.request).not.toHaveProperty('mutualInformation');
    expect(plain.ok && plain.request).not.toHaveProperty('complement');
  });
});

describe('the run page’s Rényi rows and plot, and A and B on the points', () => {
  const entropy = { S: 1.2, renyi: { '3': 0.8, inf: 0.6, '0.5': 1.5, '2': 0.9 } };

  it('lists the orders ascending with S at α = 1 and ∞ last', () => {
    expect(renyiRows(entropy).map((r) => [r.key, r.value])).toEqual([
      ['0.5', 1.5],
      ['1', 1.2],
      ['2', 0.9],
      ['3', 0.8],
      ['inf', 0.6],
    ]);
  });

  it('plots the finite orders against α, S marked at α = 1, and S_∞ as a labelled line across them', () => {
    const [line, vonNeumann, infinity] = renyiTraces(entropy, colors);
    expect(line!.x).toEqual([0.5, 1, 2, 3]);
    expect(line!.y).toEqual([1.5, 1.2, 0.9, 0.8]);
    expect(vonNeumann!).toMatchObject({ x: [1], y: [1.2] });
    expect(infinity!).toMatchObject({ x: [0.5, 3], y: [0.6, 0.6] });
    expect(infinity!.name).toMatch(/^S_∞ = 0\.6/);
    expect(renyiTraces({ S: 1, renyi: { '2': 0.7 } }, colors)).toHaveLength(2);
  });

  it('marks A and B with their own symbols and draws their diamonds', () => {
    const points = { dimension: 2 as const, columns: ['t', 'x'], points: [[0, -0.5], [0, 0.5], [0.9, 0]], subregionElements: null, pairElements: { a: [0], b: [1] } };
    const request = { mutualInformation: { a: { kind: 'diamond', past: { t: -0.3, x: -0.5 }, future: { t: 0.3, x: -0.5 } }, b: { kind: 'elements', indices: [1, 2] } } };
    const traces = pairTraces(points, request, colors);
    expect(traces.map((t) => t.name)).toEqual(['A (1)', 'A boundary', 'B (1)']);
    expect(traces[0]).toMatchObject({ x: [-0.5], y: [0] });
    expect(traces[2]).toMatchObject({ x: [0.5], y: [0] });
    expect(pairTraces({ ...points, pairElements: null }, request, colors)).toEqual([]);
  });
});
