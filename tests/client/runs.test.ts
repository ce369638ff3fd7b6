import { describe, expect, it } from 'vitest';
import { createRunRequestSchema } from '@shared/runs';
import { DENSE_SIZE_LIMITS } from '../../server/engine/index';
import { runsQueryString } from '../../src/features/runs/api/runs';
import { attachmentName } from '../../src/lib/download';
import {
  describeTruncation,
  describeTruncationText,
  truncationFromForm,
  truncationToForm,
} from '../../src/lib/truncationForm';
import { AUTO_STRUCTURED_FROM, STRUCTURED_MAX_N_2D } from '@shared/engineChoice';
import { denseLimitN, denseLimits, engineNote, reanalyseEngineNote, sizeHint } from '../../src/features/runs/lib/engineNotes';
import { initialReanalyseValues, reanalyseRequestFromForm, type ReanalyseFormValues } from '../../src/features/runs/lib/reanalyseForm';
import {
  defaultRunForm,
  insideFutureLightCone,
  runRequestFromForm,
  serverFieldErrors,
  type RunFormValues,
} from '../../src/features/runs/lib/runForm';
import { diagnosticNote, engineRowText, probedCheckCount, structuredSpectrumNote } from '../../src/features/runs/lib/engineText';
import { formatSignificant, splitDecimal } from '../../src/lib/numbers';
import { parseCompareIds, runLabel } from '../../src/features/runs/lib/runIds';

const form = (changes: Partial<RunFormValues> = {}): RunFormValues => ({ ...defaultRunForm('seed-1'), ...changes });

describe('new-run form → POST /api/runs body', () => {
  it('maps the defaults to a 2D diamond of proper time 2 with N = 500 fixed and the √N/4π cut', () => {
    const checked = runRequestFromForm(form());
    expect(checked).toEqual({
      ok: true,
      request: {
        sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 500, seed: 'seed-1', prng: 'arc4' },
        mass: 0,
        truncation: { rule: 'sqrtN' },
        doubleTruncation: false,
        complement: false,
      },
    });
    // What the form sends is exactly what the server's schema accepts.
    if (checked.ok) expect(createRunRequestSchema.parse(checked.request)).toEqual(checked.request);
  });

  it('sends a subregion diamond by its tips, the title and double truncation', () => {
    const checked = runRequestFromForm(
      form({ count: '300', title: ' N=300 ', withSubregion: true, doubleTruncation: true, truncation: { kind: 'lambda', value: '0.5' } }),
    );
    expect(checked.ok).toBe(true);
    if (!checked.ok) return;
    expect(checked.request.title).toBe('N=300');
    expect(checked.request.sprinkling?.count).toBe(300);
    expect(checked.request.truncation).toEqual({ rule: 'lambda', cut: 0.5 });
    expect(checked.request.subregion).toEqual({ kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } });
    expect(checked.request.doubleTruncation).toBe(true);
  });

  it('gives 4D tips four coordinates and a Poisson sprinkling by density no count', () => {
    const checked = runRequestFromForm(
      form({ regionKind: 'diamond4d', process: 'poisson', sizeBy: 'density', density: '40', withSubregion: true }),
    );
    expect(checked.ok).toBe(true);
    if (!checked.ok) return;
    expect(checked.request.sprinkling).toMatchObject({ region: { kind: 'diamond4d', properTime: 2 }, process: 'poisson', density: 40 });
    expect(checked.request.sprinkling?.count).toBeUndefined();
    expect(checked.request.subregion).toEqual({ kind: 'diamond', past: { t: -0.5, x: 0, y: 0, z: 0 }, future: { t: 0.5, x: 0, y: 0, z: 0 } });
  });

  it('refuses N = 0 beside the N field, with a plain message', () => {
    const checked = runRequestFromForm(form({ count: '0' }));
    expect(checked.ok).toBe(false);
    if (!checked.ok) expect(checked.errors['sprinkling.count']).toMatch(/at least 2/);
  });

  // truncation none needs every mode, so only the dense engine serves it (shared/engineChoice.ts)
  const none = { kind: 'none', value: '' } as const;

  it('refuses N above the dense limit and says the limit when only the dense engine can serve', () => {
    const checked = runRequestFromForm(form({ count: String(denseLimitN + 1), truncation: none }));
    expect(checked.ok).toBe(false);
    if (!checked.ok) expect(checked.errors['sprinkling.count']).toContain(`dense limit of ${denseLimitN}`);
    if (!checked.ok) expect(checked.errors['sprinkling.count']).toMatch(/structured engine cannot take this run: .*truncation "none"/);
    // 4D and the cylinder are dense-only whatever the cut
    for (const regionKind of ['diamond4d', 'cylinder2d'] as const) {
      const dense = runRequestFromForm(form({ regionKind, count: String(denseLimitN + 1) }));
      expect(dense.ok).toBe(false);
      if (!dense.ok) expect(dense.errors['sprinkling.count']).toContain(`dense limit of ${denseLimitN}`);
    }
  });

  it('applies the server’s own limit once GET /api/limits has said it', () => {
    const checked = runRequestFromForm(form({ count: '3001', truncation: none }), DENSE_SIZE_LIMITS['ml-matrix']);
    expect(checked.ok).toBe(false);
    if (!checked.ok) expect(checked.errors['sprinkling.count']).toContain(`dense limit of ${DENSE_SIZE_LIMITS['ml-matrix']}`);
    expect(runRequestFromForm(form({ count: '3000', truncation: none }), DENSE_SIZE_LIMITS['ml-matrix']).ok).toBe(true);
  });

  it('checks N against the structured limit for a 2D cut, as the rule picks that engine', () => {
    expect(runRequestFromForm(form({ count: String(STRUCTURED_MAX_N_2D) })).ok).toBe(true);
    expect(runRequestFromForm(form({ count: '20000', truncation: { kind: 'modes', value: '40' } })).ok).toBe(true);
    const over = runRequestFromForm(form({ count: String(STRUCTURED_MAX_N_2D + 1) }));
    expect(over.ok).toBe(false);
    if (!over.ok) expect(over.errors['sprinkling.count']).toContain(`structured limit of ${STRUCTURED_MAX_N_2D} elements`);
    // forcing the dense engine brings its limit back
    const forcedDense = runRequestFromForm(form({ count: String(denseLimitN + 1), engine: 'dense' }));
    expect(forcedDense.ok).toBe(false);
    if (!forcedDense.ok) expect(forcedDense.errors['sprinkling.count']).toContain(`dense limit of ${denseLimitN}`);
  });

  it('sends a forced engine, and refuses forcing the structured one where it cannot serve', () => {
    const forced = runRequestFromForm(form({ engine: 'structured' }));
    expect(forced.ok && forced.request.engine).toBe('structured');
    expect(createRunRequestSchema.parse(forced.ok ? forced.request : {}).engine).toBe('structured');
    const auto = runRequestFromForm(form());
    expect(auto.ok && 'engine' in auto.request).toBe(false);
    const knee = runRequestFromForm(form({ engine: 'structured', truncation: { kind: 'knee', value: '' } }));
    expect(knee.ok).toBe(false);
    if (!knee.ok) expect(knee.errors.engine).toMatch(/knee finder needs the spectrum past the knee/);
    const fourD = runRequestFromForm(form({ engine: 'structured', regionKind: 'diamond4d' }));
    expect(fourD.ok).toBe(false);
    if (!fourD.ok) expect(fourD.errors.engine).toMatch(/2D only/);
  });

  it('states the limits and the engine the rule picks for the settings as typed', () => {
    expect(sizeHint(form(), 6000)).toBe(`2 to ${STRUCTURED_MAX_N_2D} (structured engine, auto uses it from N = ${AUTO_STRUCTURED_FROM}; the dense one takes up to 6000).`);
    expect(sizeHint(form({ truncation: none }), 6000)).toBe('2 to 6000 (dense engine).');
    expect(sizeHint(form({ engine: 'dense' }), 3000)).toBe('2 to 3000 (dense engine, forced).');
    expect(engineNote(form({ count: '500' }), 6000)).toMatch(/^Dense engine \(N < 1000/);
    expect(engineNote(form({ count: '20000' }), 6000)).toMatch(/^Structured engine \(2D with a sqrtN cut and N ≥ 1000: only the modes above the cut are computed\)\.$/);
    expect(engineNote(form({ count: '500', engine: 'structured' }), 6000)).toBe('Structured engine (forced by the request): only the modes above the cut are computed.');
    expect(engineNote(form({ count: '20000', truncation: none }), 6000)).toMatch(/exceeds the dense limit of 6000 elements and the structured engine computes only the modes above a cut/);
  });

  it('states the same dense limits as the engine', () => {
    expect(denseLimits).toEqual(DENSE_SIZE_LIMITS);
    expect(denseLimitN).toBe(Math.max(...Object.values(DENSE_SIZE_LIMITS)));
  });

  it('refuses a future tip outside the past tip’s light cone, together with other errors', () => {
    const checked = runRequestFromForm(form({ count: '0', withSubregion: true, future: { t: '0.1', x: '0.6', y: '0', z: '0' } }));
    expect(checked.ok).toBe(false);
    if (checked.ok) return;
    expect(checked.errors['subregion.future.t']).toMatch(/future light cone/);
    expect(checked.errors['sprinkling.count']).toBeDefined();
  });

  it('reports text that is no number at its field', () => {
    const checked = runRequestFromForm(form({ properTime: 'two', mass: '-1' }));
    expect(checked.ok).toBe(false);
    if (checked.ok) return;
    expect(checked.errors['sprinkling.region.properTime']).toBe('Enter a number.');
    expect(checked.errors.mass).toBe('The mass is a number ≥ 0.');
  });

  it('needs a seed and a number of modes for the top-modes rule', () => {
    const checked = runRequestFromForm(form({ seed: '  ', truncation: { kind: 'modes', value: '' } }));
    expect(checked.ok).toBe(false);
    if (checked.ok) return;
    expect(checked.errors['sprinkling.seed']).toMatch(/seed/);
    expect(checked.errors['truncation.count']).toMatch(/whole number ≥ 1/);
  });

  it('puts the slab refinement (max > min) at the region', () => {
    const checked = runRequestFromForm(form({ regionKind: 'slab2d', tMin: '1', tMax: '0' }));
    expect(checked.ok).toBe(false);
    if (!checked.ok) expect(checked.errors['sprinkling.region']).toMatch(/max > min/);
  });
});

describe('light cone of the subregion tips (c = 1; common practice)', () => {
  it('accepts timelike-separated tips only, future after past', () => {
    expect(insideFutureLightCone({ t: -0.5, x: 0 }, { t: 0.5, x: 0 })).toBe(true);
    expect(insideFutureLightCone({ t: 0, x: 0 }, { t: 1, x: 1 })).toBe(false); // null: on the cone
    expect(insideFutureLightCone({ t: 0, x: 0 }, { t: 1, x: 0.99 })).toBe(true);
    expect(insideFutureLightCone({ t: 0.5, x: 0 }, { t: -0.5, x: 0 })).toBe(false);
    expect(insideFutureLightCone({ t: 0, x: 0, y: 0, z: 0 }, { t: 1, x: 0.6, y: 0.6, z: 0.6 })).toBe(false); // |r| ≈ 1.04
  });
});

describe('re-analysis form → POST /api/runs/:id/reanalyse body', () => {
  const base = {
    title: '',
    mass: '0',
    truncation: { kind: 'sqrtN' as const, value: '' },
    withSubregion: false,
    doubleTruncation: true,
    restrictedCut: { kind: 'sqrtN' as const, value: '' },
    engine: 'auto' as const,
  };
  const tips = { past: { t: '-0.5', x: '0', y: '0', z: '0' }, future: { t: '0.5', x: '0', y: '0', z: '0' } };

  it('sends subregion null to drop it, and no double truncation without one', () => {
    expect(reanalyseRequestFromForm({ ...base, ...tips }, 2)).toEqual({
      ok: true,
      request: { mass: 0, truncation: { rule: 'sqrtN' }, subregion: null, doubleTruncation: false, engine: 'auto' },
    });
  });

  it('starts from the parent run’s own settings, so an untouched form reproduces them', () => {
    const parent = {
      mass: 0.5,
      truncation: { rule: 'modes', count: 40 },
      subregion: { kind: 'diamond', past: { t: -0.25, x: 0.1 }, future: { t: 0.75, x: 0.1 } },
      doubleTruncation: true,
    };
    const values = initialReanalyseValues(parent);
    expect(values.truncation).toEqual({ kind: 'modes', value: '40' });
    expect(values.withSubregion).toBe(true);
    // a parent without an engine request ran under auto, and says so explicitly now; its restricted cut
    // was the default √n/(4π), which the form sends as null (the default)
    expect(reanalyseRequestFromForm(values, 2)).toEqual({ ok: true, request: { ...parent, restrictedCut: null, engine: 'auto' } });
    expect(reanalyseRequestFromForm(initialReanalyseValues({ ...parent, engine: 'dense' }), 2)).toEqual({
      ok: true,
      request: { ...parent, restrictedCut: null, engine: 'dense' },
    });
    // a fixed restricted λ of the parent is shown and sent again
    const fixed = { ...parent, restrictedCut: { rule: 'lambda' as const, cut: 0.25 } };
    expect(initialReanalyseValues(fixed).restrictedCut).toEqual({ kind: 'lambda', value: '0.25' });
    expect(reanalyseRequestFromForm(initialReanalyseValues(fixed), 2)).toEqual({ ok: true, request: { ...fixed, engine: 'auto' } });
    expect(initialReanalyseValues(null).truncation).toEqual({ kind: 'sqrtN', value: '' });
  });

  it('says which engine the rule picks for the re-analysis, with the server’s rule and limits', () => {
    const values = (changes: Partial<ReanalyseFormValues>): ReanalyseFormValues => ({ ...base, ...tips, ...changes });
    const run2d = { N: 1500, dimension: 2 as const, periodic: false, relationOnly: false };
    expect(reanalyseEngineNote(values({}), run2d)).toMatch(/^Structured engine \(2D with a sqrtN cut and N ≥ 1000/);
    expect(reanalyseEngineNote(values({ truncation: { kind: 'none', value: '' } }), run2d)).toMatch(/^Dense engine/);
    expect(reanalyseEngineNote(values({ engine: 'dense' }), run2d)).toBe('Dense engine (forced by the request); it computes the whole spectrum.');
    expect(reanalyseEngineNote(values({ engine: 'structured' }), { ...run2d, periodic: true })).toMatch(/^The structured engine/i);
    expect(reanalyseEngineNote(values({ engine: 'dense' }), { ...run2d, N: 7000 }, 6000)).toBe('N = 7000 exceeds the dense limit of 6000 elements.');
    expect(reanalyseEngineNote(values({}), { ...run2d, relationOnly: true })).toMatch(/relation list runs on the dense engine/);
  });

  it('checks the light cone here too', () => {
    const checked = reanalyseRequestFromForm({ ...base, ...tips, withSubregion: true, future: { t: '-0.6', x: '0', y: '0', z: '0' } }, 2);
    expect(checked.ok).toBe(false);
  });
});

describe('server errors beside the fields', () => {
  it('keeps schema issue paths and sends a size refusal to N', () => {
    expect(
      serverFieldErrors({ code: 'validation', message: 'invalid', issues: [{ path: 'sprinkling.count', message: 'too small' }] }),
    ).toEqual({ 'sprinkling.count': 'too small' });
    const tooLarge = 'N = 4000 exceeds the dense limit of 3000 elements';
    expect(serverFieldErrors({ code: 'too_large', message: tooLarge, issues: [] })['sprinkling.count']).toBe(tooLarge);
    expect(serverFieldErrors({ code: 'invalid_request', message: 'x', issues: [] })).toEqual({});
  });
});

describe('truncation rule fields', () => {
  it('round-trips every rule kind through the form', () => {
    for (const rule of [{ rule: 'none' }, { rule: 'sqrtN' }, { rule: 'lambda', cut: 0.25 }, { rule: 'modes', count: 12 }, { rule: 'knee' }, { rule: 'knee', tolerance: 0.3 }] as const) {
      expect(truncationFromForm(truncationToForm(rule))).toEqual(rule);
    }
  });
  it('reads the API’s short text forms for people', () => {
    expect(describeTruncationText('sqrtN')).toBe('√N/4π');
    expect(describeTruncationText('lambda:0.5')).toBe('λc = 0.5');
    expect(describeTruncationText('modes:20')).toBe('top 20 modes');
    expect(describeTruncationText('knee')).toBe('knee');
    expect(describeTruncation({ rule: 'knee', tolerance: 0.2 })).toBe('knee (tol 0.2)');
  });
});

describe('small helpers', () => {
  it('aligns decimals by splitting at the point', () => {
    expect(formatSignificant(1.378312, 5)).toBe('1.3783');
    expect(formatSignificant(212, 5)).toBe('212.00');
    expect(formatSignificant(6.84e-16, 3)).toBe('6.84×10^-16');
    expect(splitDecimal('1.3783')).toEqual({ whole: '1', fraction: '.3783' });
    expect(splitDecimal('-4.07×10^-14')).toEqual({ whole: '-4', fraction: '.07×10^-14' });
    expect(splitDecimal('300')).toEqual({ whole: '300', fraction: '' });
  });
  it('reads compare ids without repeats, at most six', () => {
    expect(parseCompareIds('a, b,a,,c')).toEqual(['a', 'b', 'c']);
    expect(parseCompareIds('1,2,3,4,5,6,7')).toHaveLength(6);
    expect(parseCompareIds(null)).toEqual([]);
  });
  it('labels untitled runs by their short id', () => {
    expect(runLabel({ id: '2a2f7d25-c20f-44a5-ab69-d7f8745e9794', title: null })).toBe('Run 2a2f7d25');
    expect(runLabel({ id: 'x', title: 'Diamond N=300' })).toBe('Diamond N=300');
  });
  it('builds list queries without empty filters', () => {
    expect(runsQueryString({ status: 'done', search: '', page: 2, sort: 'N', order: 'asc' })).toBe('?status=done&page=2&sort=N&order=asc');
    expect(runsQueryString({})).toBe('');
  });
  it('takes the download name from Content-Disposition', () => {
    expect(attachmentName('attachment; filename="tacet-run-2a2f7d25-points.csv"', 'x')).toBe('tacet-run-2a2f7d25-points.csv');
    expect(attachmentName(null, 'fallback.csv')).toBe('fallback.csv');
  });
});

describe('which engine ran, on the run page', () => {
  const base = { engineVersion: 'tacet-engine 0.1.0', backend: 'native', N: 20000, modesKept: 280, eigenvalues: Array.from({ length: 280 }, (_, k) => 1000 / (k + 1)) };
  it('names the engine and its reason, and keeps old runs as they were', () => {
    expect(engineRowText({ ...base, engine: 'structured', engineReason: 'forced by the request' })).toBe(
      'structured (forced by the request) · tacet-engine 0.1.0, native backend',
    );
    expect(engineRowText(base)).toBe('tacet-engine 0.1.0, native backend');
  });
  it('says a structured spectrum holds only the modes above the cut; nothing for a dense run', () => {
    expect(structuredSpectrumNote({ ...base, engine: 'structured' })).toMatch(/^Structured engine: only the modes above the cut were computed \(280 positive eigenvalues, 280 kept, of up to 10000\)/);
    expect(structuredSpectrumNote({ ...base, engine: 'dense' })).toBeNull();
    expect(structuredSpectrumNote(base)).toBeNull();
  });
});

describe('notes beside the checks of a run', () => {
  const base = { hermiticity: 0, minEigenvalueW: -1e-6, commutatorResidual: 0, positiveNegativeOverlap: 1e-15, trace: 1 };
  it('says which checks are random-probe estimates and which bound is rigorous', () => {
    const probed = { ...base, checkMethod: 'probe', probeCount: 32, smallestEigenvalueMethod: 'probe-bound' };
    expect(probedCheckCount(probed)).toBe(32);
    expect(diagnosticNote('minEigenvalueW', 'n', 'probe-bound', 32)).toMatch(/estimated from 32 random probes/);
    expect(diagnosticNote('positiveNegativeOverlap', '‖W W̄‖ / ‖W‖²', 'probe-bound', 32)).toBe('‖W W̄‖ / ‖W‖²; estimated from 32 random probes (within about 25 %)');
    expect(diagnosticNote('hermiticity', '‖W − W†‖ / ‖W‖', 'probe-bound', 32)).toBe('‖W − W†‖ / ‖W‖');
    expect(diagnosticNote('minEigenvalueW', 'n', 'lower-bound', 0)).toBe('a rigorous lower bound; ≥ 0 up to rounding');
    // exact checks, and runs stored before the probes existed, keep the plain notes
    expect(probedCheckCount({ ...base, checkMethod: 'exact', probeCount: 0 })).toBe(0);
    expect(probedCheckCount(base)).toBe(0);
    expect(diagnosticNote('positiveNegativeOverlap', 'plain', 'exact', 0)).toBe('plain');
  });
});
