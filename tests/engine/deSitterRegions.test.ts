import { describe, expect, it } from 'vitest';
import { regionDescriptors, regionSettingsText, regionSpecSchema, type RegionSpec, type RegionSpecOf } from '@shared/regions';
import { subregionElements } from '../../server/engine/entropy';
import { masslessGreenRelation } from '../../server/engine/green';
import { causalMatrix } from '../../server/engine/order';
import { imageCount, makeRegion } from '../../server/engine/regions';
import { sprinkle } from '../../server/engine/sprinkle';
import { runPython } from '../support/python';

/**
 * The 2D de Sitter regions (server/engine/README.md §17): volumes, sprinkling statistics and the causal
 * order, each against something the engine did not compute — scipy quadrature of √−g over the region
 * written from its definition, scipy's χ² and Kolmogorov–Smirnov distributions, and brute-force
 * image sums for the order.
 */

const quarter = Math.PI / 4;
const slab = (conformalTimeMin: number, conformalTimeMax: number): RegionSpec => ({ kind: 'deSitterSlab2d', conformalTimeMin, conformalTimeMax });
const staticPatch = (conformalTimeMin: number, conformalTimeMax: number): RegionSpec => ({ kind: 'deSitterStaticPatch2d', conformalTimeMin, conformalTimeMax });
const poincare = (etaPast: number, etaFuture: number): RegionSpec => ({ kind: 'deSitterDiamond2d', etaPast, etaFuture });

const regions: RegionSpec[] = [
  slab(-1, 1),
  slab(0.2, 1.5),
  slab(-1.55, -1.2),
  poincare(-2, -1),
  poincare(-3, -0.5),
  poincare(-1, -0.01),
  staticPatch(-1, 1),
  staticPatch(-quarter, Math.PI / 3),
  staticPatch(0.3, 1.3),
  staticPatch(-1.5, -0.4),
];

/**
 * The region, written from its definition for scipy: √−g(t) and the cross-section x ∈ (lo(t), hi(t))
 * over t ∈ (start, end). The sub-diamond between tips (u = t + x ∈ (u0, u1), v = t − x ∈ (v0, v1)) cut
 * to the region the same way.
 */
const QUADRATURE = `
import json, sys
import numpy as np
from scipy.integrate import quad

def factor(kind):
    return (lambda t: 1 / t**2) if kind == 'deSitterDiamond2d' else (lambda t: 1 / np.cos(t)**2)

def bounds(r):
    k = r['kind']
    if k == 'deSitterSlab2d':
        return r['conformalTimeMin'], r['conformalTimeMax'], lambda t: (-np.pi, np.pi)
    if k == 'deSitterStaticPatch2d':
        return r['conformalTimeMin'], r['conformalTimeMax'], lambda t: (-(np.pi/2 - abs(t)), np.pi/2 - abs(t))
    e0, e1 = r['etaPast'], r['etaFuture']
    return e0, e1, lambda t: (-min(t - e0, e1 - t), min(t - e0, e1 - t))

def measure(r, tips=None):
    start, end, section = bounds(r)
    w = factor(r['kind'])
    if tips is not None:
        (pt, px), (qt, qx) = tips
        u0, u1, v0, v1 = pt + px, qt + qx, pt - px, qt - qx
        start, end = max(start, (u0 + v0) / 2), min(end, (u1 + v1) / 2)
        # θ is periodic on the global slab, and a diamond there spans less than π of it: no cut in θ
        inner = (lambda t: (-np.inf, np.inf)) if r['kind'] == 'deSitterSlab2d' else section
        section = lambda t: (max(inner(t)[0], u0 - t, t - v1), min(inner(t)[1], u1 - t, t - v0))
    width = lambda t: max(0.0, section(t)[1] - section(t)[0])
    value, _ = quad(lambda t: width(t) * w(t), start, end, epsabs=0, epsrel=1e-13, limit=500)
    return value

cfg = json.load(sys.stdin)
print(json.dumps({'volumes': [measure(r) for r in cfg['regions']], 'subs': [measure(s['region'], s['tips']) for s in cfg['subs']]}))
`;

describe('2D de Sitter regions', () => {
  it('are registry kinds with conformal labels and a stated refusal of massive fields', () => {
    for (const kind of ['deSitterSlab2d', 'deSitterDiamond2d', 'deSitterStaticPatch2d'] as const) {
      const descriptor = regionDescriptors[kind];
      expect(descriptor.conformal?.t, kind).toMatch(/conformal time/);
      expect(descriptor.massiveField?.supported, kind).toBe(false);
      expect(descriptor.massiveField?.reason, kind).toMatch(/massless/);
      expect(regionSettingsText(regionSpecSchema.parse(descriptor.cli.fromOptions(noOptions)))).toMatch(/ℓ = 1/);
    }
    // the global slab goes round the circle; the static patch and the Poincaré diamond do not
    expect(makeRegion(slab(-1, 1)).periodX).toBeCloseTo(2 * Math.PI, 15);
    expect(makeRegion(staticPatch(-1, 1)).periodX).toBeUndefined();
    // the schemas refuse times outside (−π/2, π/2), out of order, or a Poincaré tip at η ≥ 0
    const refused = (spec: unknown) => {
      const parsed = regionSpecSchema.safeParse(spec);
      return parsed.success ? [] : parsed.error.issues.map((i) => i.path.join('.'));
    };
    expect(refused(slab(-1, 1.6))).toEqual(['conformalTimeMax']);
    expect(refused(staticPatch(0.5, 0.2))).toEqual(['conformalTimeMax']);
    expect(refused(poincare(-1, 0))).toEqual(['etaFuture']);
    expect(refused(poincare(-1, -2))).toEqual(['etaFuture']);
  });

  it('have the exact volumes of scipy quadrature of √−g, also for clipped and horizon-bounded sub-diamonds', () => {
    const subs: { region: RegionSpec; tips: [number[], number[]] }[] = [
      { region: slab(-1, 1), tips: [[-0.5, 0.1], [0.7, 0.3]] },
      // the observer's static patch, between its horizon tips on the conformal boundary, clipped to the slab
      { region: slab(-1, 1), tips: [[-Math.PI / 2, 0], [Math.PI / 2, 0]] },
      { region: slab(0.2, 1.5), tips: [[-Math.PI / 2, 2], [Math.PI / 2, 2]] },
      { region: poincare(-3, -0.5), tips: [[-2.5, 0.2], [-1, -0.1]] },
      { region: poincare(-3, -0.5), tips: [[-3.2, 0], [-1, 0]] },
      { region: staticPatch(-quarter, Math.PI / 3), tips: [[-0.7, 0.1], [1.2, -0.2]] },
    ];
    // scipy.integrate.quad of the cross-section times √−g (the reference)
    const reference = runPython<{ volumes: number[]; subs: number[] }>(QUADRATURE, { regions, subs });
    regions.forEach((spec, k) => expect(Math.abs(makeRegion(spec).volume / reference.volumes[k]! - 1), JSON.stringify(spec)).toBeLessThan(1e-11));
    subs.forEach((s, k) => {
      const volume = makeRegion(s.region).subDiamondVolume!(s.tips[0], s.tips[1]);
      expect(Math.abs(volume / reference.subs[k]! - 1), JSON.stringify(s)).toBeLessThan(1e-10);
    });
    // the closed forms of §17: 2π(tan T₁ − tan T₀), and 2 ln(cos T_L cos T_R/(cos T_p cos T_f)) for a diamond inside the slab
    expect(makeRegion(slab(-1, 1)).volume).toBeCloseTo(4 * Math.PI * Math.tan(1), 12);
    const [p, q] = subs[0]!.tips;
    const [tl, tr] = [(p[0]! + p[1]! + q[0]! - q[1]!) / 2, (q[0]! + q[1]! + p[0]! - p[1]!) / 2];
    expect(makeRegion(slab(-1, 1)).subDiamondVolume!(p, q)).toBeCloseTo(2 * Math.log((Math.cos(tl) * Math.cos(tr)) / (Math.cos(p[0]!) * Math.cos(q[0]!))), 12);
    // the horizon-bounded part of the slab is the static-patch region of the same times
    expect(makeRegion(slab(-1, 1)).subDiamondVolume!([-Math.PI / 2, 0], [Math.PI / 2, 0])).toBeCloseTo(makeRegion(staticPatch(-1, 1)).volume, 12);
  });

  it('draw Poisson counts: mean ρV within its standard error, dispersion by scipy’s χ²', () => {
    const draws = 400;
    const cases = [slab(-1, 1), poincare(-3, -0.5), staticPatch(-quarter, Math.PI / 3)];
    for (const region of cases) {
      const volume = makeRegion(region).volume;
      const density = 150 / volume;
      const counts = Array.from({ length: draws }, (_, s) => sprinkle({ region, process: 'poisson', density, seed: `de-sitter-poisson-${s}`, prng: 'arc4' }).count);
      const mean = counts.reduce((a, b) => a + b, 0) / draws;
      // the standard error of the mean of Poisson(ρV) counts is √(ρV/draws) (Bombelli–Lee–Meyer–Sorkin 1987)
      expect(Math.abs(mean - density * volume), region.kind).toBeLessThan(4 * Math.sqrt((density * volume) / draws));
      // dispersion Σ(N − N̄)²/N̄ is χ² with draws − 1 degrees of freedom for Poisson counts (common practice)
      const result = runPython<{ p: number }>(
        'import json, sys\nimport numpy as np\nfrom scipy.stats import chi2\nc = np.array(json.load(sys.stdin), float)\nd = ((c - c.mean())**2).sum() / c.mean()\nprint(json.dumps({"p": float(2 * min(chi2.cdf(d, len(c) - 1), chi2.sf(d, len(c) - 1)))}))',
        counts,
      );
      expect(result.p, region.kind).toBeGreaterThan(1e-3);
    }
  });

  it('sprinkle by √−g: the time marginal and the cross-section pass scipy’s Kolmogorov–Smirnov test', () => {
    const cases = [slab(-1.2, 1.4), poincare(-3, -0.2), staticPatch(-0.6, 1.45)];
    for (const region of cases) {
      const s = sprinkle({ region, process: 'fixed', count: 20_000, seed: 'de-sitter-ks', prng: 'arc4' });
      const points = Array.from(s.points);
      const result = runPython<{ time: number; across: number; flatTime: number }>(KS_SCRIPT, { region, points });
      expect(result.time, `${region.kind}: time marginal`).toBeGreaterThan(1e-3);
      expect(result.across, `${region.kind}: x across the cross-section`).toBeGreaterThan(1e-3);
      // the test can fail: the same points are far from the marginal of a flat (uniform dt dx) sprinkling
      expect(result.flatTime, `${region.kind}: flat marginal`).toBeLessThan(1e-6);
    }
  });

  it('order the global slab through the images of θ exactly as a brute-force image sum, with K = ½Cᵀ', () => {
    const region = slab(-1.3, 1.2);
    const s = sprinkle({ region, process: 'fixed', count: 400, seed: 'de-sitter-order', prng: 'arc4' });
    const period = makeRegion(region).periodX!;
    const causal = causalMatrix(s.points, 2, period);
    const n = s.count;
    let related = 0;
    let throughImage = 0;
    const disagreements: string[] = [];
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const dt = s.points[2 * j]! - s.points[2 * i]!;
        const images = [-2, -1, 0, 1, 2].filter((k) => dt > Math.abs(s.points[2 * j + 1]! - s.points[2 * i + 1]! + k * period));
        // T₁ − T₀ < π: never more than one image in a light cone, so the image-counted K is ½Cᵀ
        if (causal.has(i, j) !== images.length > 0 || imageCount(s.points, i, j, period) !== images.length || images.length > 1) disagreements.push(`${i}, ${j}`);
        if (images.length) related += 1;
        if (images.length && images[0] !== 0) throughImage += 1;
      }
    }
    expect(disagreements).toEqual([]);
    expect(throughImage).toBeGreaterThan(100);
    expect(related).toBeGreaterThan(1000);
    const green = masslessGreenRelation({ points: s.points, dimension: 2, causal, periodX: period });
    expect(green.weight).toBe(0.5);
    // the static patch spans less than π round the circle: its flat order is the order through images
    const patch = sprinkle({ region: staticPatch(-1, 1.2), process: 'fixed', count: 300, seed: 'de-sitter-order', prng: 'arc4' });
    const flat = causalMatrix(patch.points, 2);
    const wrapped = causalMatrix(patch.points, 2, 2 * Math.PI);
    let differ = 0;
    for (let i = 0; i < patch.count; i++) for (let j = 0; j < patch.count; j++) if (flat.has(i, j) !== wrapped.has(i, j)) differ += 1;
    expect(differ).toBe(0);
    expect(flat.count()).toBeGreaterThan(1000);
  });

  it('takes the horizon-bounded part of the global slab as the sub-diamond between the static patch’s tips', () => {
    const region = slab(-1, 1.2);
    const s = sprinkle({ region, process: 'fixed', count: 3000, seed: 'de-sitter-horizon', prng: 'arc4' });
    const geometry = makeRegion(region);
    const { past, future } = regionDescriptors.deSitterSlab2d.horizonDiamond!(region as RegionSpecOf<'deSitterSlab2d'>);
    expect([past.t, future.t, past.x, future.x]).toEqual([-Math.PI / 2, Math.PI / 2, 0, 0]);
    expect(geometry.isHorizonDiamond!([past.t, past.x], [future.t, future.x], 1e-9)).toBe(true);
    expect(geometry.isHorizonDiamond!([past.t, past.x], [future.t, 0.1], 1e-9)).toBe(false);
    const elements = subregionElements({ kind: 'diamond', past, future }, s.points, 2, geometry.periodX);
    const patch = makeRegion(staticPatch(-1, 1.2));
    const inside = Array.from({ length: s.count }, (_, i) => i).filter((i) => patch.contains(s.points.subarray(2 * i, 2 * i + 2)));
    expect(Array.from(elements)).toEqual(inside);
    // its share of the elements is its share of the volume (binomial, 4σ)
    const share = geometry.subDiamondVolume!([past.t, past.x], [future.t, future.x]) / geometry.volume;
    expect(Math.abs(elements.length / s.count - share)).toBeLessThan(4 * Math.sqrt((share * (1 - share)) / s.count));
    // in the static-patch region itself the same tips give every element
    const own = sprinkle({ region: staticPatch(-1, 1.2), process: 'fixed', count: 500, seed: 'de-sitter-horizon', prng: 'arc4' });
    expect(makeRegion(own.region.spec).isHorizonDiamond!([past.t, past.x], [future.t, future.x], 1e-9)).toBe(true);
    expect(subregionElements({ kind: 'diamond', past, future }, own.points, 2).length).toBe(own.count);
    // the observer at θ = π sees the complementary patch through the seam of θ
    const opposite = subregionElements({ kind: 'diamond', past: { t: past.t, x: -Math.PI }, future: { t: future.t, x: Math.PI } }, s.points, 2, geometry.periodX);
    expect(opposite.length).toBeGreaterThan(0);
    expect(new Set([...opposite, ...elements]).size).toBe(opposite.length + elements.length);
  });
});

const noOptions = {
  option: () => undefined,
  number: (v: string) => Number(v),
  pair: (v: string): [number, number] => v.split(',').map(Number) as [number, number],
  fail: (message: string): never => {
    throw new Error(message);
  },
};

/**
 * Kolmogorov–Smirnov p-values (scipy.stats.kstest) of the sprinkled times against the marginal
 * (hi − lo)√−g of the region, its CDF by scipy quadrature on a fine grid; of x, mapped to (0, 1) across
 * the cross-section at its time, against the uniform law; and of the times against the marginal of a flat
 * sprinkling (width alone), which must fail.
 */
const KS_SCRIPT = `
import json, sys
import numpy as np
from scipy.integrate import quad
from scipy.stats import kstest
cfg = json.load(sys.stdin)
r = cfg['region']; pts = np.array(cfg['points']).reshape(-1, 2)
t, x = pts[:, 0], pts[:, 1]
k = r['kind']
if k == 'deSitterDiamond2d':
    e0, e1 = r['etaPast'], r['etaFuture']
    lo_t, hi_t = e0, e1
    half = lambda s: np.minimum(s - e0, e1 - s)
    w = lambda s: 1 / s**2
else:
    lo_t, hi_t = r['conformalTimeMin'], r['conformalTimeMax']
    half = (lambda s: np.pi + 0 * s) if k == 'deSitterSlab2d' else (lambda s: np.pi/2 - np.abs(s))
    w = lambda s: 1 / np.cos(s)**2
def marginal(weight):
    grid = np.linspace(lo_t, hi_t, 4001)
    pieces = [quad(lambda s: 2 * half(s) * weight(s), a, b, epsabs=0, epsrel=1e-12)[0] for a, b in zip(grid[:-1], grid[1:])]
    cdf = np.concatenate([[0], np.cumsum(pieces)]); cdf /= cdf[-1]
    return lambda s: np.interp(s, grid, cdf)
time = kstest(t, marginal(w)).pvalue
flat = kstest(t, marginal(lambda s: 1.0 + 0 * s)).pvalue
across = kstest((x + half(t)) / (2 * half(t)), 'uniform').pvalue
print(json.dumps({'time': float(time), 'across': float(across), 'flatTime': float(flat)}))
`;
