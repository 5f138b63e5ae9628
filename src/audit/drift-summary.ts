/**
 * Drift, step 7: a short paragraph of what changed, generated from the result — which series
 * signalled first and when, which trends stay significant after the multiple-testing
 * adjustment (adjusted p < 0.05), which months are thin, and how many datasets had no month.
 * Phrased as a screening aid: a signal is a reason to look at those months, not proof.
 */
import type { DriftResult, DriftSeries } from '../types.ts';

const ALPHA = 0.05;
const ADJ = { holm: 'Holm', bh: 'Benjamini–Hochberg', none: 'no' } as const;

function label(s: DriftSeries): string {
  return `${s.measure.replace(/_/g, ' ')}${s.layer ? ` of layer ${s.layer}` : ''}${s.group !== null ? ` (${s.group})` : ''}`;
}

function cap(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

function num(v: number): string {
  return Number.isInteger(v) ? String(v) : Math.abs(v) >= 1e-3 && Math.abs(v) < 1e4 ? String(Number(v.toPrecision(3))) : v.toExponential(2);
}

function list(items: string[], max = 4): string {
  if (items.length <= max) return items.length < 2 ? items.join('') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
  return `${items.slice(0, max).join(', ')} and ${items.length - max} more`;
}

export function driftSummary(d: DriftResult, info: { undated: number; baselineMonths: number }): string {
  const parts: string[] = [];
  const chart = d.chart === 'ewma' ? 'EWMA' : 'CUSUM';
  parts.push(
    `Drift screening over ${d.months.length} months (${d.months[0]} to ${d.months[d.months.length - 1]}), ` +
      `${d.series.length} series, each against its first ${info.baselineMonths} month(s) with ${d.chart === 'ewma' ? 'an' : 'a'} ${chart} chart.`,
  );
  const signalled = d.series.filter((s) => s.firstSignal !== null).sort((a, b) => ((a.firstSignal as string) < (b.firstSignal as string) ? -1 : (a.firstSignal as string) > (b.firstSignal as string) ? 1 : 0));
  if (signalled.length === 0) parts.push(`No series crossed its ${chart} limit.`);
  else {
    const first = signalled[0];
    const rest = signalled.slice(1).map((s) => `${label(s)} in ${s.firstSignal}`);
    parts.push(
      `${cap(label(first))} signalled first, in ${first.firstSignal}` + (rest.length ? `; then ${list(rest)}.` : '.'),
    );
  }
  const sig = d.series.filter((s) => s.pAdjusted !== null && s.pAdjusted < ALPHA && s.theilSen !== null);
  const adj = d.adjustment === 'none' ? 'without adjustment' : `after ${ADJ[d.adjustment]} adjustment over ${d.testsRun} tests`;
  if (d.testsRun === 0) parts.push('No series had the three months needed for a trend test.');
  else if (sig.length === 0) parts.push(`No Mann–Kendall trend was significant at ${ALPHA} ${adj}.`);
  else {
    const items = sig.map((s) => {
      const ts = s.theilSen as NonNullable<DriftSeries['theilSen']>;
      return `${label(s)} (${ts.slope >= 0 ? 'rising' : 'falling'}, ${num(ts.slope)} per month, adjusted p = ${num(s.pAdjusted as number)})`;
    });
    parts.push(`Significant trends at ${ALPHA} ${adj}: ${list(items)}.`);
  }
  const thin = [...new Set(d.series.flatMap((s) => s.points.filter((p) => p.thin).map((p) => p.month)))].sort();
  if (thin.length) parts.push(`Thin months, shown but to be weighed lightly: ${list(thin, 6)}.`);
  if (info.undated > 0) parts.push(`${info.undated} dataset(s) without a month were left out of the series.`);
  parts.push('A signal or a trend is a reason to look at those months’ data, not proof of a change.');
  return parts.join(' ');
}
