/**
 * One precision rule for every output (pages, plot legends and hovers, e-mails, LaTeX): a value is
 * printed to the precision its error or check supports, and the same quantity reads the same
 * everywhere. Pure functions, no dependencies, so server and client share them.
 *
 * - `formatWithError(44.45, 1.83)` → "44.4 ± 1.8": the error to two significant digits when its
 *   leading digit is 1 or 2, else one (the usual rounding of an uncertainty, common practice), and the
 *   value to the same decimal place.
 * - `formatQuantity(value, kind)`: a value without an error at the significant digits of its kind.
 * - `formatEntropy(S)`: an entropy at or below the numerical floor reads "0 (below the numerical
 *   floor 1e-6)" instead of rounding noise.
 * - `formatCheckPair(a, b, kind)`: two checks that must agree, both values and their difference.
 *
 * Every formatter takes an optional `style`: 'text' (Unicode ±, ×10^) or 'latex' (\pm, \times 10^{}).
 */

export type NumberStyle = 'text' | 'latex';

/** Significant digits of a value shown without an error, by what it is. */
export const quantityDigits = {
  /** a cut λ_c (whole-region or restricted): four digits tell rules apart without rounding noise */
  cut: 4,
  /** an entropy S (single run): four digits; single sprinklings scatter by tenths (§9) */
  entropy: 4,
  /** a diagnostic residual or check norm: two digits, its size is what matters */
  residual: 2,
  /** an eigenvalue or other spectral value */
  spectral: 4,
  /** a fit parameter or an estimator without an error (slope, R², a dimension estimate) */
  fit: 3,
  /** a volume, a density, a ratio of counts: four digits, the sprinkling's own scatter is larger */
  measure: 4,
  /** a count (elements, modes, pairs): exact */
  count: 0,
} as const;

export type QuantityKind = keyof typeof quantityDigits;

/**
 * The entropy floor: the engine's pure-state entropies now come out near 1e-11 to 4e-10 (README,
 * "Numerical cautions"), older stored runs showed up to 1e-6 (1e-4 only with kept modes at 1e-6 of the
 * largest), and S itself carries a relative rounding of about 1e-7 untruncated (server/engine/README.md
 * §6, §15). A |S| at or below 1e-6 is therefore indistinguishable from zero.
 */
export const ENTROPY_FLOOR = 1e-6;

const MINUS = '−';

function exponentText(mantissa: string, exponent: number, style: NumberStyle): string {
  return style === 'latex' ? `${mantissa} \\times 10^{${exponent}}` : `${mantissa}×10^${exponent}`;
}

function signed(text: string, style: NumberStyle): string {
  return style === 'text' && text.startsWith('-') ? MINUS + text.slice(1) : text;
}

/** A value to `digits` significant digits; exponent form below 1e-3 or from 1e6. */
export function formatSignificantDigits(value: number, digits: number, style: NumberStyle = 'text'): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e6 || magnitude < 1e-3) {
    const [mantissa, exponent] = value.toExponential(Math.max(0, digits - 1)).split('e');
    return signed(exponentText(mantissa, Number(exponent), style), style);
  }
  const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)));
  return signed(value.toFixed(Math.min(decimals, 12)), style);
}

/** A value of a kind without an error; a count is rounded to an integer. */
export function formatQuantity(value: number, kind: QuantityKind, style: NumberStyle = 'text'): string {
  if (!Number.isFinite(value)) return String(value);
  if (kind === 'count') return signed(String(Math.round(value)), style);
  return formatSignificantDigits(value, quantityDigits[kind], style);
}

/** The decimal place an error fixes: two significant digits for a leading 1 or 2, else one. */
export function errorDecimals(error: number): number {
  const magnitude = Math.abs(error);
  const leadingPower = Math.floor(Math.log10(magnitude));
  const leading = magnitude / 10 ** leadingPower;
  const significant = leading < 3 ? 2 : 1;
  return significant - 1 - leadingPower;
}

function fixedAt(value: number, decimals: number): string {
  if (decimals >= 0) return value.toFixed(Math.min(decimals, 15));
  const step = 10 ** -decimals;
  return String(Math.round(value / step) * step);
}

/**
 * A value with its error: "44.4 ± 1.8" (text) or "44.4 \pm 1.8" (latex). A missing, zero or
 * non-finite error gives the value at `fallbackKind`'s digits.
 */
export function formatWithError(
  value: number,
  error: number | null | undefined,
  style: NumberStyle = 'text',
  fallbackKind: QuantityKind = 'entropy',
): string {
  if (!Number.isFinite(value)) return String(value);
  if (error === null || error === undefined || !Number.isFinite(error) || error <= 0) return formatQuantity(value, fallbackKind, style);
  const decimals = errorDecimals(error);
  const plusMinus = style === 'latex' ? ' \\pm ' : ' ± ';
  const valueText = fixedAt(value, decimals);
  return signed(Object.is(Number(valueText), -0) ? valueText.replace('-', '') : valueText, style) + plusMinus + fixedAt(error, decimals);
}

/** True when an entropy is indistinguishable from zero (§6, §15). */
export function belowEntropyFloor(entropy: number): boolean {
  return Number.isFinite(entropy) && Math.abs(entropy) <= ENTROPY_FLOOR;
}

/** An entropy: the floor text for a pure state, else its digits. */
export function formatEntropy(entropy: number, style: NumberStyle = 'text'): string {
  if (belowEntropyFloor(entropy)) {
    return style === 'latex' ? '0\\ (\\text{below the numerical floor } 10^{-6})' : '0 (below the numerical floor 1e-6)';
  }
  return formatQuantity(entropy, 'entropy', style);
}

/**
 * Two values that must agree (a count and the modes kept, S_O and S_O′, a trace and N/2): both at the
 * kind's digits and their difference a − b, which rounding both values would hide.
 */
export function formatCheckPair(
  first: number,
  second: number,
  kind: QuantityKind,
  style: NumberStyle = 'text',
): { first: string; second: string; difference: string; text: string } {
  const difference = first - second;
  const firstText = formatQuantity(first, kind, style);
  const secondText = formatQuantity(second, kind, style);
  const differenceText = kind === 'count' ? formatQuantity(difference, 'count', style) : formatSignificantDigits(difference, 2, style);
  const label = style === 'latex' ? '\\text{difference}' : 'difference';
  return { first: firstText, second: secondText, difference: differenceText, text: `${firstText} vs ${secondText} (${label} ${differenceText})` };
}

/** The value and the error of `formatWithError` apart, for tables that put them in two columns. */
export function splitWithError(value: number, error: number): { value: string; error: string } {
  const [valueText, errorText] = formatWithError(value, error).split(' ± ');
  return { value: valueText, error: errorText ?? '' };
}
