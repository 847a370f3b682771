import type { PartInstance } from '@domain/part-history';

/*
 * The history chart's data, apart from the chart component so that the set page can use it
 * without loading Chart.js (the chart itself comes in a lazily loaded chunk).
 */

const YEAR_MS = 365.25 * 24 * 3600 * 1000;

/** A date as a decimal year (2019.5 is about the first of July 2019). */
export function decimalYear(iso: string): number {
  const t = Date.parse(iso);
  const y = new Date(t).getUTCFullYear();
  return y + (t - Date.UTC(y, 0, 1)) / YEAR_MS;
}

/** One point as the chart draws it: drift % at a decimal year, with U (k = 2) as a whisker. */
export interface ChartPoint {
  x: number;
  y: number;
  u: number | null;
  /** The meter or the method changed since the point before: drawn with another marker. */
  changed: boolean;
}

/** The readable points of a part instance (states and missing drifts are left out of the chart; the table shows them). */
export function chartPoints(part: PartInstance): ChartPoint[] {
  return part.points
    .filter((p) => p.driftPct !== null && Number.isFinite(p.driftPct))
    .map((p) => ({ x: decimalYear(p.at), y: p.driftPct!, u: p.uncertaintyPct, changed: p.marks.includes('meter-changed') || p.marks.includes('method-changed') }));
}

/** The part's band (signed percent): the newest point's. */
export function bandOf(part: PartInstance): { lowPct: number; highPct: number } | null {
  return [...part.points].reverse().find((p) => p.band !== null)?.band ?? null;
}

