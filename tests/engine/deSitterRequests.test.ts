import { describe, expect, it } from 'vitest';
import { regionDescriptors } from '@shared/regions';
import { computeVacuum, EngineInputError, validateVacuumRequest } from '../../server/engine/index';

// The de Sitter kinds offer the massless field only (server/engine/README.md §17), and their
// horizon-bounded part — the sub-diamond with tips on the conformal boundary — is a valid subregion.
const slab = { kind: 'deSitterSlab2d' as const, conformalTimeMin: -0.6, conformalTimeMax: 0.6 };

describe('requests on de Sitter regions', () => {
  it('refuses a massive field on each de Sitter kind, naming mass and saying why', () => {
    const regions = [slab, { kind: 'deSitterDiamond2d' as const, etaPast: -2, etaFuture: -0.5 }, { kind: 'deSitterStaticPatch2d' as const, conformalTimeMin: -0.6, conformalTimeMax: 0.6 }];
    for (const region of regions) {
      let caught: unknown;
      try {
        validateVacuumRequest({ source: { kind: 'sprinkling', sprinkling: { region, count: 200, seed: 'ds-mass' } }, mass: 0.5 }, 6000);
      } catch (error) {
        caught = error;
      }
      expect(caught).toBeInstanceOf(EngineInputError);
      expect((caught as EngineInputError).field).toBe('mass');
      expect((caught as EngineInputError).message).toContain(regionDescriptors[region.kind].massiveField!.reason);
      expect(() => validateVacuumRequest({ source: { kind: 'sprinkling', sprinkling: { region, count: 200, seed: 'ds-mass' } }, mass: 0 }, 6000)).not.toThrow();
    }
  });

  it('computes the entropy of the horizon-bounded part of a global slab', async () => {
    const tips = regionDescriptors.deSitterSlab2d.horizonDiamond!(slab);
    const result = await computeVacuum({
      source: { kind: 'sprinkling', sprinkling: { region: slab, count: 400, seed: 'ds-horizon' } },
      engine: 'dense',
      truncation: { rule: 'sqrtN' },
      doubleTruncation: true,
      subregion: { kind: 'diamond', past: tips.past, future: tips.future },
    });
    // the static patch of θ = 0 covers |θ| < π/2 − |T|: roughly its share of the slab's √−g volume
    expect(result.entropy!.n).toBeGreaterThan(100);
    expect(result.entropy!.n).toBeLessThan(300);
    expect(result.entropy!.S).toBeGreaterThan(0);
    // the flat 2D cut carried to a curved region says so (server/engine/README.md §17)
    expect(result.cautions.join(' ')).toMatch(/de Sitter region it is a modelling choice/);
  });

  it('puts the same caution on a structured run of the Poincaré diamond, and none on a flat diamond', async () => {
    const base = { engine: 'structured' as const, truncation: { rule: 'sqrtN' as const } };
    const curved = await computeVacuum({ ...base, source: { kind: 'sprinkling', sprinkling: { region: { kind: 'deSitterDiamond2d', etaPast: -2, etaFuture: -1 }, count: 1200, seed: 'ds-caution' } } });
    const flat = await computeVacuum({ ...base, source: { kind: 'sprinkling', sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 1200, seed: 'ds-caution' } } });
    expect(curved.engine).toBe('structured');
    expect(curved.cautions).toHaveLength(1);
    expect(flat.cautions).toEqual([]);
  });
});
