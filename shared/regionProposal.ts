import { regionSettingsText, regionSpecSchema, type RegionSpec } from './regions';

/**
 * The region a file of coordinates was made in, written by `tacet sprinkle` as its first line:
 * `# tacet region {"kind":"diamond2d","properTime":2}` (our own format: the prefix, then the region
 * spec as JSON). The CSV readers skip `#` lines, so the file stays a plain t,x CSV.
 */
export const REGION_COMMENT_PREFIX = '# tacet region ';

export function regionCommentLine(region: RegionSpec): string {
  return REGION_COMMENT_PREFIX + JSON.stringify(region);
}

/** The region recorded in the file's leading comment lines, or null when none is recorded or it does not parse. */
export function recordedRegion(text: string): RegionSpec | null {
  for (const raw of text.replace(/^\ufeff/, '').split(/\r\n|\n|\r/)) {
    const line = raw.trim();
    if (line === '') continue;
    if (!line.startsWith('#')) return null;
    if (!line.startsWith(REGION_COMMENT_PREFIX.trim())) continue;
    try {
      const parsed = regionSpecSchema.safeParse(JSON.parse(line.slice(REGION_COMMENT_PREFIX.trim().length).trim()));
      return parsed.success ? parsed.data : null;
    } catch {
      return null;
    }
  }
  return null;
}

/** |t| + |x⃗| of an event (t first): it lies inside the centred diamond of proper time T iff this is below T/2. */
export function centredDiamondReach(event: ArrayLike<number>, dimension: 2 | 4): number {
  let r2 = 0;
  for (let k = 1; k < dimension; k++) r2 += event[k]! * event[k]!;
  return Math.abs(event[0]!) + Math.sqrt(r2);
}

/**
 * The smallest proper time, rounded up to two significant figures, of a centred diamond holding events
 * of the given largest reach strictly inside (a point on the boundary is outside, as in the engine's
 * membership). Rounding keeps the proposal readable; it adds at most 10 % to T.
 */
export function properTimeForReach(reach: number): number {
  const needed = 2 * reach;
  if (!(needed > 0)) return 1;
  const step = 10 ** (Math.floor(Math.log10(needed)) - 1);
  let properTime = Number((Math.ceil(needed / step - 1e-9) * step).toPrecision(12));
  if (!(properTime > needed)) properTime = Number((properTime + step).toPrecision(12));
  return properTime;
}

/** The smallest centred causal diamond (2D or 4D, T at two significant figures) holding every point strictly inside. */
export function smallestCentredDiamond(points: ArrayLike<number>, dimension: 2 | 4): RegionSpec {
  let reach = 0;
  for (let i = 0; i + dimension <= points.length; i += dimension) {
    reach = Math.max(reach, centredDiamondReach(Array.prototype.slice.call(points, i, i + dimension) as number[], dimension));
  }
  return centredDiamondOfReach(reach, dimension);
}

/** The centred diamond of `properTimeForReach(reach)`, 2D or 4D. */
export function centredDiamondOfReach(reach: number, dimension: 2 | 4): RegionSpec {
  const properTime = properTimeForReach(reach);
  return dimension === 2 ? { kind: 'diamond2d', properTime } : { kind: 'diamond4d', properTime };
}

/** What the import's messages and form say of a region: its settings text and its spec, e.g. "2D causal diamond, T = 2 (diamond2d, properTime 2)". */
export function regionProposalText(region: RegionSpec): string {
  const fields = Object.entries(region).filter(([key]) => key !== 'kind').map(([key, value]) => `${key} ${typeof value === 'object' ? JSON.stringify(value) : value}`);
  return `${regionSettingsText(region)} (${[region.kind, ...fields].join(', ')})`;
}
