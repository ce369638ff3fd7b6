import { describe, expect, it } from 'vitest';
import { createRunRequestSchema } from '@shared/runs';
import { validateVacuumRequest } from '../../server/engine/index';
import { defaultRunForm, horizonTipsForRegion, masslessOnlyReason, runRequestFromForm, tipsForRegion } from '../../src/features/runs/lib/runForm';

// Issue 16 in the run form: on a de Sitter kind the tips follow the region and the field is massless.
describe('the run form on de Sitter regions', () => {
  for (const kind of ['deSitterDiamond2d', 'deSitterSlab2d', 'deSitterStaticPatch2d'] as const) {
    it(`${kind}: the default subregion and pair lie in the region, and the engine accepts them`, () => {
      const start = defaultRunForm('ds-form');
      const moved = { ...start, regionKind: kind, ...tipsForRegion({ ...start, regionKind: kind })!, withSubregion: true, withPair: true, doubleTruncation: true };
      const checked = runRequestFromForm(moved);
      expect(checked.ok).toBe(true);
      if (!checked.ok) return;
      const request = createRunRequestSchema.parse(checked.request);
      // the engine's own placement rule (server/engine/subregionCheck.ts) is the reference
      expect(() =>
        validateVacuumRequest(
          { source: { kind: 'sprinkling', sprinkling: request.sprinkling! }, truncation: request.truncation, subregion: request.subregion, mutualInformation: request.mutualInformation, doubleTruncation: true },
          6000,
        ),
      ).not.toThrow();
      expect(masslessOnlyReason(kind)).toMatch(/\w/);
    });
  }

  for (const kind of ['deSitterSlab2d', 'deSitterStaticPatch2d'] as const) {
    it(`${kind}: the horizon-bounded part fills tips the engine accepts`, () => {
      const start = defaultRunForm('ds-horizon');
      const values = { ...start, regionKind: kind };
      const horizon = horizonTipsForRegion(values)!;
      // the observer's horizons meet the conformal boundary at (T, θ) = (∓π/2, 0) (server/engine/README.md §17)
      expect(Number(horizon.past.t)).toBeCloseTo(-Math.PI / 2, 6);
      expect(Number(horizon.future.t)).toBeCloseTo(Math.PI / 2, 6);
      const checked = runRequestFromForm({ ...values, ...horizon, withSubregion: true });
      expect(checked.ok).toBe(true);
      if (!checked.ok) return;
      const request = createRunRequestSchema.parse(checked.request);
      expect(() => validateVacuumRequest({ source: { kind: 'sprinkling', sprinkling: request.sprinkling! }, truncation: request.truncation, subregion: request.subregion }, 6000)).not.toThrow();
    });
  }

  it('offers no horizon-bounded part without horizons', () => {
    expect(horizonTipsForRegion({ ...defaultRunForm('flat'), regionKind: 'diamond2d' })).toBeNull();
    expect(horizonTipsForRegion({ ...defaultRunForm('flat'), regionKind: 'deSitterDiamond2d' })).toBeNull();
  });

  it('keeps the flat kinds massive-capable and their tips as before', () => {
    expect(masslessOnlyReason('diamond2d')).toBeNull();
    const start = defaultRunForm('flat');
    expect(tipsForRegion(start)).toMatchObject({ past: start.past, future: start.future });
  });
});
