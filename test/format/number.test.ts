/**
 * Lacuna's one number policy (src/format/number.ts). Expected strings worked out by hand from
 * ECMA-262 Number.prototype.toPrecision / toExponential (3 significant digits) and the en-US
 * digit grouping of Unicode CLDR (a comma every three digits).
 */
import { describe, expect, it } from 'vitest';
import { AXIS_NUMBER_FORMAT, formatCount, formatLevel, formatNumber } from '../../src/format/number.ts';
import { format as d3format } from 'd3-format';

describe('formatNumber', () => {
  it.each([
    [9596, '9,596'], // a whole count is written in full (was "9.60e+3" on pages, "9600" on charts)
    [47, '47'], // a whole degree: no ".0"
    [-3, '-3'],
    [1_234_567, '1,234,567'], // counts stay exact at any size below 2^53
    [9470.4, '9,470'], // integer part has 4 digits: rounded to a whole number, not 9.47e+3
    [999.6, '1,000'], // toPrecision(3) gives "1.00e+3": written in full instead
    [0.4948261737089201, '0.495'],
    [12.345, '12.3'],
    [-0.05, '-0.0500'], // trailing zeros kept: the precision is visible
    [0.001, '0.00100'],
    [0.000123, '1.23e-4'], // below 0.001: exponent form
    [2_500_000.5, '2.50e+6'], // a non-whole value from a million: exponent form
    [0, '0'],
  ])('%s → %s', (x, want) => {
    expect(formatNumber(x)).toBe(want);
  });

  it('absent and non-finite values', () => {
    expect(formatNumber(null)).toBe('—');
    expect(formatNumber(undefined, { absent: 'n/a' })).toBe('n/a');
    expect(formatNumber(Number.NaN)).toBe('not finite');
    expect(formatNumber(Number.NEGATIVE_INFINITY)).toBe('not finite');
  });

  it('more digits on request', () => {
    expect(formatNumber(0.4948261737089201, { digits: 4 })).toBe('0.4948');
  });
});

describe('counts and levels', () => {
  it('counts are grouped; levels are percentages without trailing zeros', () => {
    expect(formatCount(71568)).toBe('71,568');
    expect(formatCount(null, 'n/a')).toBe('n/a');
    expect(formatLevel(0.95)).toBe('95%');
    expect(formatLevel(0.995)).toBe('99.5%');
  });
});

describe('axis tick format', () => {
  // d3-format (the library Vega formats axis labels with) applied to the specifier the theme sets.
  it.each([
    [9596, '9,596'], // not "9,596.000000", which Vega's default gave on a one-value axis
    [47, '47'], // not "47.0"
    [0.25, '0.25'],
    [1, '1'], // not "1.000000"
  ])('%s → %s', (x, want) => {
    expect(d3format(AXIS_NUMBER_FORMAT)(x)).toBe(want);
  });
});
