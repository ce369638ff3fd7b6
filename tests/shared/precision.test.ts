import { describe, expect, it } from 'vitest';
import {
  ENTROPY_FLOOR,
  belowEntropyFloor,
  errorDecimals,
  formatCheckPair,
  formatEntropy,
  formatQuantity,
  formatSignificantDigits,
  formatWithError,
  splitWithError,
} from '@shared/precision';

// Worked examples of the rounding of a measured value with its uncertainty (common practice: the
// error to two significant digits when its leading digit is 1 or 2, else one; the value to the same place).
describe('formatWithError', () => {
  it('rounds the error to 1–2 significant digits and the value to the same place', () => {
    expect(formatWithError(44.43, 1.83)).toBe('44.4 ± 1.8');
    expect(formatWithError(44.43, 1.83, 'latex')).toBe('44.4 \\pm 1.8');
    expect(formatWithError(0.71942, 0.0381)).toBe('0.72 ± 0.04');
    expect(formatWithError(0.71942, 0.0251)).toBe('0.719 ± 0.025');
    expect(formatWithError(1234.5, 56)).toBe('1230 ± 60');
    expect(formatWithError(-0.3333, 0.012)).toBe('−0.333 ± 0.012');
  });
  it('falls back to the kind’s digits without an error', () => {
    expect(formatWithError(1.309974, null)).toBe('1.310');
    expect(formatWithError(1.309974, 0, 'text', 'cut')).toBe('1.310');
  });
  it('places the error by its leading digit', () => {
    expect(errorDecimals(1.8)).toBe(1);
    expect(errorDecimals(0.4)).toBe(1);
    expect(errorDecimals(0.029)).toBe(3);
    expect(errorDecimals(35)).toBe(-1);
  });
});

describe('formatQuantity', () => {
  it('gives each kind its digits', () => {
    expect(formatQuantity(1.309974, 'cut')).toBe('1.310');
    expect(formatQuantity(44.4512, 'entropy')).toBe('44.45');
    expect(formatQuantity(3.217e-9, 'residual')).toBe('3.2×10^-9');
    expect(formatQuantity(3.217e-9, 'residual', 'latex')).toBe('3.2 \\times 10^{-9}');
    expect(formatQuantity(126.4, 'count')).toBe('126');
    expect(formatSignificantDigits(-2.5e7, 2)).toBe('−2.5×10^7');
  });
});

describe('formatEntropy', () => {
  it('shows a pure state as zero below the floor, not as rounding noise', () => {
    expect(belowEntropyFloor(3.4e-10)).toBe(true);
    expect(belowEntropyFloor(-2e-11)).toBe(true);
    expect(belowEntropyFloor(2 * ENTROPY_FLOOR)).toBe(false);
    expect(formatEntropy(3.4e-10)).toBe('0 (below the numerical floor 1e-6)');
    expect(formatEntropy(3.4e-10, 'latex')).toContain('10^{-6}');
    expect(formatEntropy(1.63412)).toBe('1.634');
  });
});

describe('formatCheckPair', () => {
  it('shows both values and the difference that rounding would hide', () => {
    const pair = formatCheckPair(150.0000003, 150, 'entropy');
    expect(pair.first).toBe('150.0');
    expect(pair.second).toBe('150.0');
    expect(pair.difference).toBe('3.0×10^-7');
    expect(pair.text).toBe('150.0 vs 150.0 (difference 3.0×10^-7)');
    expect(formatCheckPair(63, 64, 'count').difference).toBe('−1');
    expect(formatCheckPair(2.308, 1.634, 'entropy', 'latex').text).toBe('2.308 vs 1.634 (\\text{difference} 0.67)');
  });
});

describe('splitWithError', () => {
  it('gives the two columns of a table the same rounding as the one-string form', () => {
    expect(splitWithError(44.43, 1.83)).toEqual({ value: '44.4', error: '1.8' });
    expect(splitWithError(-0.12345, 0.0061)).toEqual({ value: '−0.123', error: '0.006' });
  });
});
