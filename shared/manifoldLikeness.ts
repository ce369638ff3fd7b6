import { z } from 'zod';
import { formatWithError } from './precision';

/**
 * Manifold-likeness of a causal set as the API, the pages and the command line show it (computed by
 * server/engine/manifoldLikeness.ts; the estimators are described in server/engine/README.md §16).
 */
export const manifoldLikenessSchema = z.object({
  N: z.number().int(),
  relations: z.number().int(),
  links: z.number().int(),
  longestChain: z.number().int(),
  orderingFraction: z.number(),
  dimension: z.object({
    myrheimMeyer: z.object({ estimate: z.number().nullable(), error: z.number().nullable(), subIntervals: z.number().int() }),
    midpoint: z.object({ estimate: z.number().nullable(), halfSize: z.number().int() }),
  }),
  /** N_k: related pairs with exactly k elements between them, k = 0, 1, … (N_0 = links) */
  intervalAbundances: z.array(z.number().int()),
});
export type ManifoldLikenessReport = z.infer<typeof manifoldLikenessSchema>;

/** A declared dimension further than this many stated errors from the Myrheim–Meyer estimate gets a warning (about a 95% band). */
export const DIMENSION_WARNING_SIGMAS = 2;

/**
 * The warning for a causal set whose declared dimension disagrees with its Myrheim–Meyer estimate by
 * more than DIMENSION_WARNING_SIGMAS stated errors; null when they agree or there is no error to judge by.
 * The estimate assumes the set is an interval (a causal diamond); a set that is not (a slab) can
 * disagree while being manifold-like, which the warning says.
 */
export function dimensionWarning(declared: number, report: Pick<ManifoldLikenessReport, 'dimension'>): string | null {
  const { estimate, error } = report.dimension.myrheimMeyer;
  if (estimate === null || error === null) return null;
  if (Math.abs(estimate - declared) <= DIMENSION_WARNING_SIGMAS * error) return null;
  return (
    `Declared ${declared}D, but the Myrheim–Meyer dimension of its order is ${formatDimension(estimate, error)}, more than ${DIMENSION_WARNING_SIGMAS} errors away. ` +
    `The Green function and the cuts chosen for ${declared}D may not fit this causal set. (The estimate assumes a causal diamond; a slab or another region reads differently.)`
  );
}

/** "2.03 ± 0.05": the estimate to the digit its error supports. */
export function formatDimension(estimate: number, error: number | null): string {
  return formatWithError(estimate, error, 'text', 'fit');
}

/** The longest chain of a d-dimensional diamond is about m_d (ρV)^{1/d}: m_2 = 2; 1.77 ≤ m_d ≤ 2.72 for d > 2 (Brightwell–Gregory 1991, recalled from memory). */
export function longestChainConstant(dimension: number): { low: number; high: number } {
  return dimension === 2 ? { low: 2, high: 2 } : { low: 1.77, high: 2.72 };
}
