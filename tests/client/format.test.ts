/**
 * The client's number formatting and ordering (src/lib/format.ts). Check values are worked by hand
 * from the rule stated in format.ts (two significant digits of u, the value to the same place;
 * "(m ± s)·10ⁿ" when more than six decimals would be needed) unless a source is named.
 */
import { describe, expect, it } from 'vitest';
import { chiSquaredText, decimalsFor, estimatorName, formatMeasurement, formatSig, metricName, naturalCompare, powerOfTen } from '@/lib/format';

describe('formatMeasurement', () => {
  it('rounds the value to the second significant digit of u (GUM 7.2.6, common practice)', () => {
    expect(formatMeasurement(0.123456, 0.0012).text).toBe('0.1235 ± 0.0012');
    expect(formatMeasurement(-0.5, 0.031).text).toBe('\u22120.500 ± 0.031');
    expect(decimalsFor(0.0012)).toBe(4);
  });

  it('writes small numbers over a power of ten, never with an "e"', () => {
    const f = formatMeasurement(6.29e-5, 1.2e-6);
    expect(f.text).toBe('(6.29 ± 0.12)\u00B710\u207B\u2075');
    expect(f.text).not.toMatch(/e-?\d/);
    expect(f.scale).toBe('\u00B710\u207B\u2075');
    expect(formatMeasurement(2.5e6, 3e4).text).toBe('(2.500 ± 0.030)\u00B710\u2076');
    // a value far smaller than its uncertainty takes the uncertainty's power
    expect(formatMeasurement(1e-12, 3.4e-8).text).toBe('(0.0 ± 3.4)\u00B710\u207B\u2078');
  });

  it('says "exact" for a zero uncertainty and a dash for a missing value', () => {
    expect(formatMeasurement(0.955336489125606, 0).text).toBe('0.955336 (exact)');
    expect(formatMeasurement(null, 0.1).text).toBe('—');
  });
});

describe('formatSig', () => {
  it('uses plain decimals for ordinary magnitudes and m·10ⁿ otherwise', () => {
    expect(formatSig(0.01234, 3)).toBe('0.0123');
    expect(formatSig(6.29e-5, 3)).toBe('6.29\u00B710\u207B\u2075');
    expect(formatSig(-1.5e7, 2)).toBe('\u22121.5\u00B710\u2077');
    // the mantissa's rounding carries into the exponent: 9.996e-5 to 3 digits is 1.00·10⁻⁴
    expect(formatSig(9.996e-5, 3)).toBe('1.00\u00B710\u207B\u2074');
    expect(powerOfTen(-12)).toBe('\u00B710\u207B\u00B9\u00B2');
  });
});

describe('naturalCompare', () => {
  it('orders numbers inside keys by value', () => {
    expect(['t12', 't2', 't1'].sort(naturalCompare)).toEqual(['t1', 't2', 't12']);
    expect(['t4-h0.785398:z10', 't4-h0.785398:z9', 't12-h0.100000:z1', 't2-h0.100000:z1'].sort(naturalCompare))
      .toEqual(['t2-h0.100000:z1', 't4-h0.785398:z9', 't4-h0.785398:z10', 't12-h0.100000:z1']);
  });
  it('is a total order: distinct keys never compare equal', () => {
    expect(naturalCompare('Z1', 'z1')).not.toBe(0);
    expect(naturalCompare('a', 'a')).toBe(0);
  });
});

describe('names in words', () => {
  it('names estimators and metrics, and writes chi-squared per degree of freedom', () => {
    expect(estimatorName('random-effects-dl')).toBe('random-effects mean (DerSimonian–Laird)');
    expect(metricName('crps-verifiable')).toBe('CRPS on targets with an exact reference');
    expect(metricName('rmse-verifiable')).toBe('proper score on every ranked target');
    expect(estimatorName('something-new')).toBe('something new');
    expect(chiSquaredText(12.345, 4)).toBe('12.3/4');
    expect(chiSquaredText(null, 4)).toBe('—');
  });
});

describe('endOfLocalDay', () => {
  it('reads a picked date as the end of that day in the reader\'s time zone', async () => {
    const { endOfLocalDay } = await import('@/lib/format-time');
    const iso = endOfLocalDay('2026-12-04');
    const d = new Date(iso);
    // local calendar fields, whatever zone the test runs in
    expect([d.getFullYear(), d.getMonth() + 1, d.getDate(), d.getHours(), d.getMinutes()]).toEqual([2026, 12, 4, 23, 59]);
    expect(endOfLocalDay('2026-12-04T10:00:00Z')).toBe('2026-12-04T10:00:00Z');
  });
});
