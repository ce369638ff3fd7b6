/**
 * Number text for tables: a fixed count of significant digits, split at the decimal point so columns
 * can align on it (integer part right-aligned, fraction left-aligned).
 */
export function formatSignificant(value: number, digits = 5): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e6 || magnitude < 1e-4) return value.toExponential(digits - 1).replace('e', '×10^').replace('^+', '^');
  const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)));
  return value.toFixed(Math.min(decimals, 12));
}

export function splitDecimal(text: string): { whole: string; fraction: string } {
  const exponent = text.indexOf('×');
  const mantissa = exponent === -1 ? text : text.slice(0, exponent);
  const rest = exponent === -1 ? '' : text.slice(exponent);
  const dot = mantissa.indexOf('.');
  if (dot === -1) return { whole: mantissa, fraction: rest };
  return { whole: mantissa.slice(0, dot), fraction: mantissa.slice(dot) + rest };
}
