/**
 * Lacuna's one number-format policy, shared by report pages (`src/report/site-format.ts`), chart
 * labels and chart text alternatives (`src/charts/format.ts`), so a value reads the same in a
 * table, on a chart and in a caption.
 *
 *   whole numbers (counts, L0, degrees)  → written in full with thousands separators: `9,596`, `47`
 *   other values, 0.001 ≤ |x| < 10⁶      → `digits` significant digits, trailing zeros kept so the
 *                                          precision shows (`0.0500`, `12.3`); never fewer digits than
 *                                          the integer part has (`1234.6` → `1,235`, not `1.23e+3`)
 *   other values outside that range      → exponent form, `digits` significant digits (`1.23e-4`)
 *   exact zero                           → `0`
 *   null / undefined                     → `absent` (pages `—`; text alternatives `n/a`)
 *   NaN, ±Infinity                       → `not finite` (they should never reach an output, but an
 *                                          output must not hide them)
 *
 * Chart axes cannot call this function (Vega formats tick values itself), so they use
 * AXIS_NUMBER_FORMAT, the d3-format form of the same rule for the round numbers an axis shows:
 * thousands separators, no trailing zeros, no exponent for whole numbers.
 */

/** Shown where a number is absent on a page; the page always says why next to it. */
export const NONE = '—';

/** Significant digits of a measured value, everywhere. */
export const DIGITS = 3;

/** d3-format specifier for chart axis ticks: `9,596`, `0.25`, `47` (never `9,596.000000` or `47.0`). */
export const AXIS_NUMBER_FORMAT = ',~r';

/** Below this magnitude integers are exact in float64 and written in full. */
const EXACT_INTEGER = 2 ** 53;

const grouped = new Intl.NumberFormat('en-US', { maximumFractionDigits: 0, useGrouping: true });

/** A number as text under the policy above. */
export function formatNumber(x: number | null | undefined, options: { digits?: number; absent?: string } = {}): string {
  const digits = options.digits ?? DIGITS;
  if (x === null || x === undefined) return options.absent ?? NONE;
  if (!Number.isFinite(x)) return 'not finite';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (Number.isInteger(x) && a < EXACT_INTEGER) return grouped.format(x);
  if (a >= 1e6 || a < 1e-3) return x.toExponential(digits - 1);
  // Integer part already has `digits` digits or more: round to a whole number rather than drop digits.
  if (a >= 10 ** digits) return grouped.format(Math.round(x));
  const p = x.toPrecision(digits);
  // toPrecision can round up into the next decade (999.6 → "1.00e+3"): write that in full too.
  return p.includes('e') ? grouped.format(Number(p)) : p;
}

/** A count with thousands separators: `12,345` (rounded to a whole number). */
export function formatCount(n: number | null | undefined, absent = NONE): string {
  if (n === null || n === undefined) return absent;
  if (!Number.isFinite(n)) return 'not finite';
  return grouped.format(Math.round(n));
}

/** A confidence level as a percentage: 0.95 → `95%`, 0.995 → `99.5%` (up to six significant digits, no trailing zeros). */
export function formatLevel(level: number | null | undefined, absent = NONE): string {
  if (level === null || level === undefined || !Number.isFinite(level)) return absent;
  return `${Number((level * 100).toPrecision(6))}%`;
}
