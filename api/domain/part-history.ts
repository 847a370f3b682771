/**
 * Part history (DESIGN.md §3.8, §6 "Drift over years"): each part instance of a set across its
 * surveys, and the before/after comparison of two surveys.
 *
 * - A part instance is one physical part in one position: a `replaced` parts-record line ends the
 *   instance and starts a new one (readings taken after the replacement belong to the new part).
 * - Each point carries the part's value (the reading on its own leads, or the implied value in
 *   circuit where the network gives one), its drift from the nominal, U, the band, the meter and
 *   the method; a change of meter or method from the previous point is marked, since either can
 *   move a reading without the part moving.
 * - The drift rate per year comes from drift-history.ts (least squares with its 95 % interval,
 *   only from three surveys or more whose spread exceeds U); points without an uncertainty (no
 *   meter profile) are shown but left out of the rate, which says so. A projection to the band
 *   edge is always labelled an extrapolation.
 *
 * Years are counted in Julian years of 365.25 days (the IAU's year for time intervals; common
 * practice for "per year" rates).
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { driftRate, projectToBandEdge, type BandEdgeProjection, type DriftRate, type NoDriftRate } from './drift-history';
import type { Method, ReadingState, Verdict } from './words';

export const DAYS_PER_YEAR = 365.25;
const MS_PER_YEAR = DAYS_PER_YEAR * 24 * 3600 * 1000;

export interface HistoryPointInput {
  surveyId: number;
  readingId: number;
  /** When the reading was taken (ISO 8601). */
  at: string;
  state: ReadingState;
  /** The part's value, ohms (null for a state reading). */
  ohms: number | null;
  /** `reading`: on its own leads (or no network); `implied`: from an in-circuit reading through the network. */
  valueFrom: 'reading' | 'implied';
  nominalOhms: number | null;
  /** Expanded uncertainty U (k = 2) of the value, ohms; null without a meter profile. */
  uncertaintyOhms: number | null;
  /** The part's band, signed percent. */
  band: { lowPct: number; highPct: number } | null;
  verdict: Verdict;
  method: Method;
  /** The meter's name (a change is marked). */
  meter: string | null;
}

export interface PartReplacementInput {
  lineId: number;
  at: string;
  /** The new part's value as recorded (`47k`). */
  text: string;
}

export type PointMark = 'meter-changed' | 'method-changed' | 'value-implied';

export interface HistoryPoint extends HistoryPointInput {
  /** Years since the instance's first point. */
  years: number;
  driftPct: number | null;
  uncertaintyPct: number | null;
  marks: PointMark[];
}

export interface PartInstance {
  componentKey: string;
  ref: string;
  /** 1 for the part found in the set, 2 for its first replacement, … */
  instance: number;
  original: boolean;
  /** The replacement that started this instance (null for the original part). */
  startedBy: PartReplacementInput | null;
  /** The replacement that ended it (null while it is in the set). */
  endedBy: PartReplacementInput | null;
  points: HistoryPoint[];
  rate: DriftRate | NoDriftRate;
  /** Points left out of the rate because they have no uncertainty or no value. */
  leftOut: number;
  projection: BandEdgeProjection | null;
}

const time = (iso: string): number => {
  const t = Date.parse(iso);
  if (!Number.isFinite(t)) throw new RangeError(`not a date: "${iso}"`);
  return t;
};

/** Splits one position's points into part instances at each replacement and gives each its rate. */
export function partInstances(componentKey: string, ref: string, points: readonly HistoryPointInput[], replacements: readonly PartReplacementInput[]): PartInstance[] {
  // Each date is read once (a set's history sorts thousands of points: parsing in the comparator dominated).
  const reps = replacements.map((r) => ({ r, t: time(r.at) })).sort((a, b) => a.t - b.t || a.r.lineId - b.r.lineId);
  const sorted = points.map((p) => ({ p, t: time(p.at) })).sort((a, b) => a.t - b.t || a.p.readingId - b.p.readingId);
  const instances: PartInstance[] = [];
  for (let i = 0; i <= reps.length; i++) {
    const startedBy = i === 0 ? null : reps[i - 1];
    const endedBy = i < reps.length ? reps[i] : null;
    const from = startedBy ? startedBy.t : -Infinity;
    const to = endedBy ? endedBy.t : Infinity;
    const mine = sorted.filter((x) => x.t >= from && x.t < to);
    instances.push(instanceOf(componentKey, ref, i + 1, startedBy?.r ?? null, endedBy?.r ?? null, mine));
  }
  return instances;
}

function instanceOf(
  componentKey: string,
  ref: string,
  instance: number,
  startedBy: PartReplacementInput | null,
  endedBy: PartReplacementInput | null,
  input: readonly { p: HistoryPointInput; t: number }[],
): PartInstance {
  const t0 = input.length ? input[0].t : 0;
  const points: HistoryPoint[] = [];
  let prev: HistoryPointInput | null = null;
  for (const { p, t } of input) {
    const hasValue = p.ohms !== null && p.nominalOhms !== null && p.nominalOhms > 0;
    const marks: PointMark[] = [];
    if (prev && prev.meter !== p.meter) marks.push('meter-changed');
    if (prev && prev.method !== p.method) marks.push('method-changed');
    if (p.valueFrom === 'implied') marks.push('value-implied');
    // Object.assign rather than `{ ...p, years, … }`: the same object, but V8 (Node 20) builds a spread
    // followed by more properties slowly, and a set's history makes thousands of these.
    points.push(
      Object.assign({}, p, {
        years: (t - t0) / MS_PER_YEAR,
        driftPct: hasValue ? ((p.ohms! - p.nominalOhms!) / p.nominalOhms!) * 100 : null,
        uncertaintyPct: hasValue && p.uncertaintyOhms !== null ? (p.uncertaintyOhms / p.nominalOhms!) * 100 : null,
        marks,
      }),
    );
    prev = p;
  }
  const usable = points.filter((p) => p.driftPct !== null && p.uncertaintyPct !== null);
  let rate: DriftRate | NoDriftRate = driftRate(usable.map((p) => ({ years: p.years, driftPct: p.driftPct!, uncertaintyPct: p.uncertaintyPct! })));
  const leftOut = points.length - usable.length;
  if (rate.slopePctPerYear === null && leftOut > 0) {
    rate = { slopePctPerYear: null, reason: `${rate.reason} (${leftOut} survey${leftOut === 1 ? '' : 's'} without a value or a meter uncertainty left out)` };
  }
  const band = [...points].reverse().find((p) => p.band !== null)?.band ?? null;
  const projection = rate.slopePctPerYear !== null && band !== null && band.lowPct < band.highPct ? projectToBandEdge(rate, band) : null;
  return { componentKey, ref, instance, original: instance === 1, startedBy, endedBy, points, rate, leftOut, projection };
}

// ---------------------------------------------------------------------------------------------
// Before / after

export interface CompareSide {
  readingId: number;
  text: string;
  state: ReadingState;
  ohms: number | null;
  method: Method;
  verdict: Verdict;
  driftPct: number | null;
}

export interface CompareRowInput {
  testPointKey: string;
  stageName: string;
  label: string;
  a: CompareSide | null;
  b: CompareSide | null;
}

export interface CompareRow extends CompareRowInput {
  /** (b − a) / a × 100 of the two values; null unless both are values. */
  changePct: number | null;
  /** The verdict moved (e.g. high → in-band after a replacement). */
  verdictChanged: boolean;
  /** The two readings were taken by different methods: the change may be the method's. */
  methodChanged: boolean;
}

/** Per test point both sides, the change in percent, and whether the verdict or the method changed. */
export function compareRows(rows: readonly CompareRowInput[]): CompareRow[] {
  return rows.map((r) => {
    const both = r.a !== null && r.b !== null;
    const changePct = both && r.a!.ohms !== null && r.b!.ohms !== null && r.a!.ohms > 0 ? ((r.b!.ohms - r.a!.ohms) / r.a!.ohms) * 100 : null;
    return { ...r, changePct, verdictChanged: both && r.a!.verdict !== r.b!.verdict, methodChanged: both && r.a!.method !== r.b!.method };
  });
}
