import { formatQuantity, splitWithError, type QuantityKind } from '@shared/precision';
import { formatSignificant, splitDecimal } from '../lib/numbers';

interface FigureProps {
  value: number | null | undefined;
  digits?: number;
  /** width of the integer part and of the fraction, in characters of the mono face */
  whole?: number;
  fraction?: number;
  /** what the value is: its digits then follow the one precision rule of shared/precision.ts */
  kind?: QuantityKind;
  /** the value's error: the value is then shown to the decimal place the error supports */
  error?: number | null;
}

/**
 * A number aligned on its decimal point: the integer part right-aligned in a fixed number of mono
 * characters, the fraction left-aligned after it, so every row of a column lines up.
 */
export function Figure({ value, digits = 5, whole = 6, fraction = 9, kind, error }: FigureProps) {
  if (value === null || value === undefined) {
    return (
      <span className="figures inline-flex whitespace-nowrap text-ink-faint">
        <span className="inline-block text-right" style={{ width: `${whole}ch` }}>—</span>
        <span className="inline-block" style={{ width: `${fraction}ch` }} />
      </span>
    );
  }
  const formatted = error != null && error > 0 && Number.isFinite(error) ? splitWithError(value, error).value : kind !== undefined ? formatQuantity(value, kind) : Number.isInteger(value) && Math.abs(value) < 1e9 ? String(value) : formatSignificant(value, digits);
  const parts = splitDecimal(formatted);
  const exponentAt = parts.fraction.indexOf('×10^');
  return (
    <span className="figures inline-flex whitespace-nowrap" title={String(value)}>
      <span className="inline-block text-right" style={{ width: `${whole}ch` }}>
        {parts.whole}
      </span>
      <span className="inline-block text-left" style={{ minWidth: `${fraction}ch` }}>
        {exponentAt === -1 ? (
          parts.fraction
        ) : (
          <>
            {parts.fraction.slice(0, exponentAt)}×10<sup>{parts.fraction.slice(exponentAt + 4)}</sup>
          </>
        )}
      </span>
    </span>
  );
}
