import {
  regionSpecSchema,
  renyiOrdersSchema,
  restrictedCutSchema,
  sprinklingSpecSchema,
  subregionPairSchema,
  subregionSpecSchema,
  truncationRuleSchema,
  type RegionSpec,
} from '@shared/vacuum';
import { regionDescriptor } from '@shared/regions';
import { relationNeighbourhood } from './causalSeparation';
import { subregionElements } from './entropy';
import { sizeLimitFor } from './engineForRequest';
import { EngineInputError } from './errors';
import { checkDenseSize } from './limits';
import { pairIssue } from './mutualInformation';
import { BitRelation } from './order';
import { makeRegion, precedes } from './regions';
import type { VacuumRequest } from './request';
import { diamondPlacementIssue, elementListIssue, subregionPairIssue, tipCoordinates } from './subregionCheck';

/**
 * Validates a request before any work: schemas, consistency (density for massive or 4D fields,
 * subregion dimension; Rényi orders and the complement need a subregion; a mutual-information pair as
 * subregionPairIssue rules, server/engine/README.md §15) and the dense size limit — for Poisson sprinklings the expected N plus five
 * standard deviations. Throws EngineInputError with a message for the user.
 */
export function validateVacuumRequest(request: VacuumRequest, maxN: number = sizeLimitFor(request)): void {
  const fail = (message: string, field?: string): never => {
    throw new EngineInputError(message, field);
  };
  const zodMessage = (e: { issues: { path: PropertyKey[]; message: string }[] }) =>
    e.issues.map((i) => (i.path.length ? `${i.path.join('.')}: ${i.message}` : i.message)).join('; ');
  let dimension: 2 | 4;
  let hasDensity: boolean;
  // N, or for a Poisson sprinkling its largest plausible value; and the region the points lie in
  let size: { n: number; exact: boolean };
  let placedIn: RegionSpec | null = null;
  if (request.source.kind === 'sprinkling') {
    const parsed = sprinklingSpecSchema.safeParse(request.source.sprinkling);
    if (!parsed.success) return fail(`invalid sprinkling: ${zodMessage(parsed.error)}`);
    const region = makeRegion(parsed.data.region);
    dimension = region.dimension;
    hasDensity = true;
    const mean = parsed.data.count ?? (parsed.data.density as number) * region.volume;
    const worst = parsed.data.process === 'fixed' ? mean : Math.ceil(mean + 5 * Math.sqrt(mean));
    if (worst > maxN) checkDenseSize(worst, maxN);
    if (parsed.data.process === 'fixed' && mean < 2) fail('a sprinkling needs at least 2 elements');
    size = { n: worst, exact: parsed.data.process === 'fixed' };
    placedIn = parsed.data.region;
  } else if (request.source.kind === 'order') {
    const { causal, count, dimension: d, density } = request.source;
    if (d !== 2 && d !== 4) fail(`dimension must be 2 or 4, got ${String(d)}`);
    dimension = d;
    if (!Number.isInteger(count)) fail(`the element count must be a whole number, got ${count}`);
    checkDenseSize(count, maxN);
    size = { n: count, exact: true };
    const words = (count + 31) >>> 5;
    if (causal.length !== words * count) fail(`a relation on ${count} elements has ${words * count} words, got ${causal.length}`);
    for (let i = 0; i < count; i++) {
      if (causal[i * words + (i >>> 5)] & (1 << (i & 31))) fail(`element ${i} precedes itself; a causal order is irreflexive`);
    }
    if (density !== undefined && !(density > 0 && Number.isFinite(density))) fail('density must be a positive number');
    hasDensity = density !== undefined;
    if (request.subregion?.kind === 'diamond') {
      fail('a causal set given by its relation has no coordinates: give the subregion as a list of elements', 'subregion');
    }
  } else {
    const { points, dimension: d } = request.source;
    if (d !== 2 && d !== 4) fail(`dimension must be 2 or 4, got ${String(d)}`);
    dimension = d;
    if (points.length % d !== 0) fail(`${points.length} coordinates do not make whole ${d}D points`);
    for (let k = 0; k < points.length; k++) {
      if (!Number.isFinite(points[k])) fail(`coordinate ${k % d} of element ${Math.floor(k / d)} is not a finite number`);
    }
    checkDenseSize(points.length / d, maxN);
    size = { n: points.length / d, exact: true };
    if (request.source.density !== undefined && !(request.source.density > 0 && Number.isFinite(request.source.density))) {
      fail('density must be a positive number');
    }
    if (request.source.region) {
      const parsed = regionSpecSchema.safeParse(request.source.region);
      if (!parsed.success) return fail(`invalid region: ${zodMessage(parsed.error)}`);
      if (makeRegion(parsed.data).dimension !== d) fail(`region ${parsed.data.kind} is not ${d}-dimensional`);
      placedIn = parsed.data;
    }
    hasDensity = request.source.density !== undefined || request.source.region !== undefined;
  }
  const mass = request.mass ?? 0;
  if (!(mass >= 0) || !Number.isFinite(mass)) fail('mass must be a finite number ≥ 0', 'mass');
  // a region that offers only the massless field says why (the de Sitter kinds, server/engine/README.md §17)
  const massiveField = placedIn ? regionDescriptor(placedIn.kind).massiveField : undefined;
  if (mass > 0 && massiveField) fail(`mass ${mass} on the ${regionDescriptor(placedIn!.kind).label} region: ${massiveField.reason}`, 'mass');
  if (!hasDensity && (mass > 0 || dimension === 4)) {
    fail(`${mass > 0 ? 'a massive field' : 'the 4D Green function'} needs a density: give the density or the region`);
  }
  if (request.truncation) {
    const parsed = truncationRuleSchema.safeParse(request.truncation);
    if (!parsed.success) return fail(`invalid truncation: ${zodMessage(parsed.error)}`, 'truncation');
    // iΔ is real antisymmetric: its nonzero eigenvalues come in ± pairs, at most ⌊N/2⌋ positive (common practice)
    const pairs = Math.floor(size.n / 2);
    if (parsed.data.rule === 'modes' && parsed.data.count > pairs) {
      fail(`modes:${parsed.data.count} asks for more positive eigenvalues of iΔ than ${size.exact ? '' : 'about '}${size.n} elements can have (at most ${pairs})`, 'truncation.count');
    }
    if (parsed.data.rule === 'knee' && pairs < 4) fail(`the knee finder needs at least 4 positive eigenvalues of iΔ; ${size.n} elements have at most ${pairs}`, 'truncation');
  }
  if (request.subregion) {
    const parsed = subregionSpecSchema.safeParse(request.subregion);
    if (!parsed.success) return fail(`invalid subregion: ${zodMessage(parsed.error)}`, 'subregion');
    if (parsed.data.kind === 'diamond' && (('y' in parsed.data.past ? 4 : 2) !== dimension || ('y' in parsed.data.future ? 4 : 2) !== dimension)) {
      fail(`subregion tips must have ${dimension} coordinates like the points`, 'subregion');
    }
    // A Poisson sprinkling draws its N in the worker: a label below the plausible maximum may or may not
    // exist, and whether a diamond holds two elements depends on the points; both are checked again there.
    const issue =
      parsed.data.kind === 'elements'
        ? elementListIssue(parsed.data.indices, size.n, size.exact)
        : diamondPlacementIssue(tipCoordinates(parsed.data.past), tipCoordinates(parsed.data.future), placedIn);
    if (issue) fail(issue.message, issue.field ? `subregion.${issue.field}` : 'subregion');
    if (parsed.data.kind === 'diamond' && request.source.kind === 'points') {
      const held = subregionElements(parsed.data, request.source.points, dimension, placedIn ? makeRegion(placedIn).periodX : undefined).length;
      if (held < 2) fail(`the subregion holds ${held} of the ${size.n} elements; the entropy needs at least 2`, 'subregion');
    }
  }
  if (request.renyi !== undefined) {
    const parsed = renyiOrdersSchema.safeParse(request.renyi);
    if (!parsed.success) fail(`invalid Rényi orders: ${zodMessage(parsed.error)}`, 'renyi');
    if (!request.subregion) fail('Rényi entropies need a subregion: they are entropies of the subregion', 'renyi');
  }
  if (request.complement && !request.subregion) fail('the complement check needs a subregion: it compares the subregion with its causal complement', 'complement');
  if (request.mutualInformation !== undefined) {
    const parsed = subregionPairSchema.safeParse(request.mutualInformation);
    if (!parsed.success) {
      const issue = parsed.error.issues[0]!;
      fail(`invalid mutual-information pair: ${zodMessage(parsed.error)}`, ['mutualInformation', ...issue.path.slice(0, 1)].join('.'));
      return;
    }
    const placement = subregionPairIssue(parsed.data, dimension, placedIn, { elementCount: size, hasCoordinates: request.source.kind !== 'order' });
    if (placement) fail(placement.message, `mutualInformation.${placement.field}`);
    const { a, b } = parsed.data;
    if (a.kind === 'elements' && b.kind === 'elements' && request.source.kind !== 'sprinkling') {
      // the order is known here (a sprinkling's only in the worker, which checks right after the order stage)
      const source = request.source;
      const order =
        source.kind === 'order'
          ? relationNeighbourhood(BitRelation.fromWords(source.causal, source.count), a.indices)
          : (i: number, j: number) => precedes(source.points, dimension, i, j, placedIn ? makeRegion(placedIn).periodX : undefined);
      const related = pairIssue(a.indices, b.indices, order);
      if (related) fail(related.message, 'mutualInformation.b');
    }
    if (request.source.kind === 'points') {
      const points = request.source.points;
      for (const side of ['a', 'b'] as const) {
        const spec = parsed.data[side];
        if (spec.kind !== 'diamond') continue;
        const held = subregionElements(spec, points, dimension, placedIn ? makeRegion(placedIn).periodX : undefined).length;
        if (held < 2) fail(`subregion ${side.toUpperCase()} holds ${held} of the ${size.n} elements; its entropy needs at least 2`, `mutualInformation.${side}`);
      }
    }
  }
  if (request.doubleTruncation && !request.subregion && !request.mutualInformation) fail('double truncation needs a subregion or a mutual-information pair', 'doubleTruncation');
  if (request.restrictedCut !== undefined) {
    if (!request.doubleTruncation) fail('restrictedCut: a restricted cut applies only with double truncation (doubleTruncation: true)');
    const parsed = restrictedCutSchema.safeParse(request.restrictedCut);
    if (!parsed.success) fail(`invalid restrictedCut: ${zodMessage(parsed.error)}`);
  }
}
