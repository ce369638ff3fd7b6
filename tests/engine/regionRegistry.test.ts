import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import {
  regionDefaultSubDiamond,
  regionDescriptors,
  regionDimension,
  regionFieldDefaults,
  regionFieldKeys,
  regionFormFields,
  regionFromFieldText,
  regionKinds,
  regionKindsOfDimension,
  regionLatex,
  regionOutlineOf,
  regionOwnDiamond,
  regionSettingsText,
  regionSpecSchema,
  regionText,
  type Event,
  type RegionKind,
  type RegionOptionReader,
  type RegionSpec,
} from '@shared/regions';
import { makeRegion, precedes, regionGeometries } from '../../server/engine/regions';
import { diamondPlacementIssue } from '../../server/engine/subregionCheck';
import { diamondVolume } from '../../server/studies/plan';

/**
 * The region registry: every kind has its descriptor (shared/regions.ts) and its geometry
 * (server/engine/regions/), and they agree. The volumes are checked against Monte Carlo membership, a
 * fact of the trade (common practice): the volume of a region is the fraction of uniform samples of a
 * box that fall inside it, times the box's volume — weighted by the region's √−g where it has its own
 * measure (de Sitter, server/engine/README.md §17). A kind added to the registry is checked here without
 * editing this file.
 */

/** The spec a form starts from for a kind: the registry's defaults, parsed by the shared schema. */
const defaultSpec = (kind: RegionKind): RegionSpec => regionSpecSchema.parse(regionFromFieldText({ regionKind: kind, ...regionFieldDefaults() }));

/** Further specs per kind where a shape has a second regime (a tilted diamond, a cylinder wrapped round). */
const moreSpecs: RegionSpec[] = [
  { kind: 'diamond2d', past: { t: -0.3, x: 0.2 }, future: { t: 1.1, x: 0.9 } },
  { kind: 'cylinder2d', properTime: 3, circumference: 2 },
  { kind: 'slab2d', tMin: -2, tMax: -0.5, xMin: -1, xMax: 3 },
  { kind: 'deSitterSlab2d', conformalTimeMin: 0.2, conformalTimeMax: 1.4 },
  { kind: 'deSitterDiamond2d', etaPast: -1, etaFuture: -0.05 },
  { kind: 'deSitterStaticPatch2d', conformalTimeMin: 0.3, conformalTimeMax: 1.3 },
];

const specs: RegionSpec[] = [...regionKinds.map(defaultSpec), ...moreSpecs];
const coordinates = (e: Event): number[] => ('y' in e ? [e.t, e.x, e.y, e.z] : [e.t, e.x]);

describe('the region registry', () => {
  it('has a descriptor and a geometry for every kind, and they agree on dimension and periodicity', () => {
    expect(Object.keys(regionGeometries).sort()).toEqual([...regionKinds].sort());
    for (const kind of regionKinds) {
      expect(regionDescriptors[kind].kind).toBe(kind);
      expect(regionGeometries[kind].kind).toBe(kind);
      const region = makeRegion(defaultSpec(kind));
      expect(region.dimension, kind).toBe(regionDimension(kind));
      expect(region.periodX !== undefined, kind).toBe(regionDescriptors[kind].periodic);
      expect(regionKindsOfDimension(regionDimension(kind))).toContain(kind);
    }
  });

  it('gives each kind a label, a description, text, settings and LaTeX forms of its own', () => {
    const labels = regionKinds.map((k) => regionDescriptors[k].label);
    const descriptions = regionKinds.map((k) => regionDescriptors[k].description);
    expect(new Set(labels).size).toBe(regionKinds.length);
    expect(new Set(descriptions).size).toBe(regionKinds.length);
    for (const spec of specs) {
      for (const text of [regionText(spec), regionSettingsText(spec), regionLatex(spec)]) expect(text.trim().length, spec.kind).toBeGreaterThan(5);
      expect(regionSettingsText(spec).startsWith(regionDescriptors[spec.kind].label)).toBe(true);
      // LaTeX math is balanced: every $ opens and closes
      expect((regionLatex(spec).match(/\$/g) ?? []).length % 2).toBe(0);
    }
  });

  it('has volumes that agree with Monte Carlo membership, and bounding boxes that hold the region', () => {
    const samples = 100_000;
    for (const spec of specs) {
      const region = makeRegion(spec);
      const random = seedrandom(`registry-${JSON.stringify(spec)}`);
      const { min, max } = region.boundingBox;
      expect(min).toHaveLength(region.dimension);
      // sample a box half again as wide, so points of the region outside its bounding box would be caught
      const lo = min.map((m, k) => m - 0.25 * (max[k]! - m));
      const hi = max.map((m, k) => m + 0.25 * (m - min[k]!));
      const boxVolume = lo.reduce((v, l, k) => v * (hi[k]! - l), 1);
      // Σ w and Σ w² over the samples inside, w = √−g (1 on flat regions)
      let inside = 0;
      let insideSquares = 0;
      let outsideBox = 0;
      let marginDisagrees = 0;
      for (let s = 0; s < samples; s++) {
        const e = lo.map((l, k) => l + random() * (hi[k]! - l));
        const inBox = e.every((c, k) => c >= min[k]! && c <= max[k]!);
        const margin = region.insideMargin(e);
        if (region.contains(e)) {
          const w = region.measure ? region.measure.density(e) : 1;
          inside += w;
          insideSquares += w * w;
          if (!inBox) outsideBox += 1;
          if (margin < 0) marginDisagrees += 1;
          // the margin used for tips agrees with membership: ≥ 0 inside, ≤ 0 outside (the boundary has measure zero)
        } else if (inBox && margin > 0) marginDisagrees += 1;
      }
      expect(outsideBox, `${spec.kind}: points of the region outside its bounding box`).toBe(0);
      expect(marginDisagrees, `${spec.kind}: insideMargin against contains`).toBe(0);
      const p = inside / samples;
      const sigma = boxVolume * Math.sqrt((insideSquares / samples - p * p) / samples);
      expect(Math.abs(p * boxVolume - region.volume), `${JSON.stringify(spec)}: MC ${p * boxVolume} vs ${region.volume}`).toBeLessThan(4 * sigma);
    }
  });

  it('offers a default sub-diamond inside each region, and its own diamond where it has one', () => {
    const random = seedrandom('registry-sub-diamonds');
    for (const spec of specs) {
      const region = makeRegion(spec);
      const { past, future } = regionDefaultSubDiamond(spec);
      const p = coordinates(past);
      const q = coordinates(future);
      expect(p).toHaveLength(region.dimension);
      expect(diamondPlacementIssue(p, q, spec), spec.kind).toBeNull();
      // events between the tips (p ≺ e ≺ q), drawn from the sub-diamond's box, lie in the region
      const reach = q[0]! - p[0]!;
      let checked = 0;
      while (checked < 200) {
        const e = p.map((c, k) => (k === 0 ? p[0]! + random() * reach : (c + q[k]!) / 2 + (random() - 0.5) * reach));
        const flat = [...p, ...e, ...q];
        if (!precedes(flat, region.dimension, 0, 1, region.periodX) || !precedes(flat, region.dimension, 1, 2, region.periodX)) continue;
        expect(region.contains(e), `${spec.kind} ${e}`).toBe(true);
        checked += 1;
      }
      const own = regionOwnDiamond(spec);
      if (own) {
        // the region's own tips give the whole region, and a diamond region has the volume of its diamond
        expect(diamondPlacementIssue(coordinates(own.past), coordinates(own.future), spec)).toBeNull();
        if (!region.periodX || (spec.kind === 'cylinder2d' && spec.properTime <= spec.circumference)) {
          // a region with its own measure states the volume of a diamond in it (∫√−g), a flat one τ²/2
          const ownVolume = region.subDiamondVolume ? region.subDiamondVolume(coordinates(own.past), coordinates(own.future)) : diamondVolume(own);
          expect(ownVolume).toBeCloseTo(region.volume, 12);
        }
      }
    }
  });

  it('draws 2D outlines within the bounding box and none in 4D', () => {
    for (const spec of specs) {
      const outline = regionOutlineOf(spec);
      const { min, max } = makeRegion(spec).boundingBox;
      if (regionDimension(spec.kind) === 4) {
        expect(outline).toBeNull();
        continue;
      }
      expect(outline, spec.kind).not.toBeNull();
      outline!.x.forEach((x, k) => {
        const t = outline!.y[k]!;
        expect(t).toBeGreaterThanOrEqual(min[0]! - 1e-12);
        expect(t).toBeLessThanOrEqual(max[0]! + 1e-12);
        expect(x).toBeGreaterThanOrEqual(min[1]! - 1e-12);
        expect(x).toBeLessThanOrEqual(max[1]! + 1e-12);
      });
    }
  });
});

describe('the region form fields', () => {
  it('lists each kind’s fields with a label, and the fields with their defaults make a valid spec', () => {
    for (const kind of regionKinds) {
      const fields = regionFormFields(kind);
      expect(fields.map((f) => f.key), kind).toEqual([...regionDescriptors[kind].fields]);
      expect(fields.length).toBeGreaterThan(0);
      for (const f of fields) expect(f.label.trim(), `${kind}.${f.key}`).not.toBe('');
      const spec = defaultSpec(kind);
      expect(regionDescriptors[kind].schema.safeParse(spec).success).toBe(true);
      // every value of the spec comes from a field of the form
      expect(Object.keys(spec).filter((k) => k !== 'kind').sort()).toEqual([...regionDescriptors[kind].fields].sort());
      const refinement = regionDescriptors[kind].refinementField;
      if (refinement) expect(regionDescriptors[kind].fields).toContain(refinement);
    }
  });

  it('keeps one default per shared field, and names a blank field to the schema', () => {
    for (const key of regionFieldKeys) {
      const given = regionKinds.map((k) => regionDescriptors[k].defaults[key]).filter((v) => v !== undefined);
      expect(new Set(given).size, key).toBeLessThanOrEqual(1);
    }
    const blank = regionSpecSchema.safeParse(regionFromFieldText({ regionKind: 'cylinder2d', ...regionFieldDefaults(), circumference: ' ' }));
    expect(blank.success ? [] : blank.error.issues.map((i) => [i.path.join('.'), i.message])).toEqual([['circumference', 'must be a number']]);
  });

  it('takes a form’s own wording: labels, hints by kind, or no hint', () => {
    const fields = regionFormFields('cylinder2d', { properTime: { label: 'L', hint: (kind) => `${kind} tips` }, circumference: { hint: null } });
    expect(fields).toEqual([
      { key: 'properTime', label: 'L', hint: 'cylinder2d tips' },
      { key: 'circumference', label: 'Circumference' },
    ]);
  });

  it('reads every kind from the command line with its defaults, and refuses what the reader refuses', () => {
    const reader = (options: Record<string, string>): RegionOptionReader => ({
      option: (name) => options[name],
      number: (value, what) => {
        const v = Number(value);
        if (!Number.isFinite(v)) throw new Error(`${what}: ${value}`);
        return v;
      },
      pair: (value, what) => {
        const [a, b] = value.split(',').map(Number);
        if (!Number.isFinite(a) || !Number.isFinite(b)) throw new Error(`${what}: ${value}`);
        return [a!, b!];
      },
      fail: (message) => {
        throw new Error(message);
      },
    });
    for (const kind of regionKinds) {
      const cli = regionDescriptors[kind].cli;
      expect(cli.options.length, kind).toBeGreaterThan(0);
      expect(regionSpecSchema.safeParse(cli.fromOptions(reader({}))).success, kind).toBe(true);
    }
    expect(regionDescriptors.diamond2d.cli.fromOptions(reader({ tips: '0,0:1,0.5' }))).toEqual({ kind: 'diamond2d', past: { t: 0, x: 0 }, future: { t: 1, x: 0.5 } });
    expect(() => regionDescriptors.diamond2d.cli.fromOptions(reader({ tips: '0,0:1,0.5', 'proper-time': '2' }))).toThrow(/not both/);
  });
});
