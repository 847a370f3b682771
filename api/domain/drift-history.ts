/**
 * Drift over years (DESIGN.md §3.8, §6): the drift rate of one part instance across a set's
 * surveys, as an ordinary least-squares slope in %/year with a 95 % interval from Student's t
 * (n − 2 degrees of freedom), and its projection to the band edge, always labelled as an
 * extrapolation. No standard gives a drift rate for carbon composition (check-values.md §5):
 * the straight line is a summary of the readings, not a model of the part.
 *
 * A rate is given only from three surveys or more whose spread exceeds U (the largest expanded
 * uncertainty among the points): below that the readings cannot tell drift from the meter.
 *
 * Standard error of the slope: the larger of
 *   - the residual scatter, s / √Sxx with s² = Σ residual² / (n − 2) (any regression text, e.g.
 *     NIST/SEMATECH e-Handbook of Statistical Methods §4.4.4), and
 *   - the readings' own uncertainty carried through the slope, √(Σ (x_i − x̄)² u_i²) / Sxx with
 *     u_i = U_i / 2 (GUM, JCGM 100:2008 §5.1.2, law of propagation for a linear function),
 * so that three points that happen to lie on a line do not claim a zero-width interval.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */

export interface DriftPoint {
  /** Time of the survey in years (from any origin, e.g. years since the first survey). */
  years: number;
  /** Drift of the reading from the expected value, %. */
  driftPct: number;
  /** Expanded uncertainty U (k = 2) of that drift, %. */
  uncertaintyPct: number;
}

export interface DriftRate {
  slopePctPerYear: number;
  /** 95 % interval of the slope (Student's t, n − 2 degrees of freedom). */
  interval: { low: number; high: number };
  n: number;
  /** Fitted drift at years = 0, %. */
  interceptPct: number;
  standardErrorPctPerYear: number;
  standardErrorFrom: 'residuals' | 'readings';
  degreesOfFreedom: number;
  t: number;
  /** The latest survey's time, years: where a projection starts by default. */
  lastYears: number;
}

export interface NoDriftRate {
  slopePctPerYear: null;
  reason: string;
}

/** The minimum number of surveys for a rate (DESIGN.md §3.8). */
export const MIN_DRIFT_POINTS = 3;

/**
 * Two-sided 95 % quantiles of Student's t (t₀.₉₇₅ by degrees of freedom), from the standard table
 * (NIST/SEMATECH e-Handbook of Statistical Methods §1.3.6.7.2, critical values of the t
 * distribution); the spec re-derives each entry from the t density [CALC]. Degrees of freedom
 * between entries take the entry below (the larger t, the wider interval).
 */
export const T_975: ReadonlyArray<readonly [number, number]> = [
  [1, 12.706],
  [2, 4.303],
  [3, 3.182],
  [4, 2.776],
  [5, 2.571],
  [6, 2.447],
  [7, 2.365],
  [8, 2.306],
  [9, 2.262],
  [10, 2.228],
  [11, 2.201],
  [12, 2.179],
  [13, 2.16],
  [14, 2.145],
  [15, 2.131],
  [16, 2.12],
  [17, 2.11],
  [18, 2.101],
  [19, 2.093],
  [20, 2.086],
  [21, 2.08],
  [22, 2.074],
  [23, 2.069],
  [24, 2.064],
  [25, 2.06],
  [26, 2.056],
  [27, 2.052],
  [28, 2.048],
  [29, 2.045],
  [30, 2.042],
  [40, 2.021],
  [60, 2.0],
  [120, 1.98],
  [Number.POSITIVE_INFINITY, 1.96],
];

/** t₀.₉₇₅ for the given degrees of freedom (≥ 1), from T_975. */
export function studentT975(degreesOfFreedom: number): number {
  if (!(degreesOfFreedom >= 1)) throw new RangeError(`Student's t needs at least 1 degree of freedom, not ${degreesOfFreedom}`);
  let t = T_975[0][1];
  for (const [df, value] of T_975) {
    if (df <= degreesOfFreedom) t = value;
  }
  return t;
}

/** Least-squares drift rate with its 95 % interval, or null with the reason it cannot be given. */
export function driftRate(points: readonly DriftPoint[]): DriftRate | NoDriftRate {
  for (const [i, p] of points.entries()) {
    for (const key of ['years', 'driftPct', 'uncertaintyPct'] as const) {
      if (typeof p[key] !== 'number' || !Number.isFinite(p[key])) {
        throw new RangeError(`points[${i}].${key} must be a finite number, not ${String(p[key])}`);
      }
    }
    if (p.uncertaintyPct < 0) throw new RangeError(`points[${i}].uncertaintyPct cannot be negative`);
  }
  const n = points.length;
  if (n < MIN_DRIFT_POINTS) {
    return {
      slopePctPerYear: null,
      reason: `a drift rate needs ${MIN_DRIFT_POINTS} surveys or more of this part; there ${n === 1 ? 'is' : 'are'} ${n}`,
    };
  }
  const drifts = points.map((p) => p.driftPct);
  const spread = Math.max(...drifts) - Math.min(...drifts);
  const U = Math.max(...points.map((p) => p.uncertaintyPct));
  if (!(spread > U)) {
    return {
      slopePctPerYear: null,
      reason: `the readings spread over ${round(spread)} %, within the uncertainty U = ${round(U)} %: the meter cannot tell drift from noise here`,
    };
  }
  const xMean = points.reduce((s, p) => s + p.years, 0) / n;
  const yMean = drifts.reduce((s, y) => s + y, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (const p of points) {
    sxx += (p.years - xMean) ** 2;
    sxy += (p.years - xMean) * (p.driftPct - yMean);
  }
  if (sxx === 0) {
    return { slopePctPerYear: null, reason: 'all the surveys carry the same date: a rate needs surveys at different times' };
  }
  const slope = sxy / sxx;
  const intercept = yMean - slope * xMean;
  const df = n - 2;
  let ssr = 0;
  let propagated = 0;
  for (const p of points) {
    ssr += (p.driftPct - (intercept + slope * p.years)) ** 2;
    propagated += (p.years - xMean) ** 2 * (p.uncertaintyPct / 2) ** 2;
  }
  const seResiduals = Math.sqrt(ssr / df / sxx);
  const seReadings = Math.sqrt(propagated) / sxx;
  const se = Math.max(seResiduals, seReadings);
  const t = studentT975(df);
  return {
    slopePctPerYear: slope,
    interval: { low: slope - t * se, high: slope + t * se },
    n,
    interceptPct: intercept,
    standardErrorPctPerYear: se,
    standardErrorFrom: seResiduals >= seReadings ? 'residuals' : 'readings',
    degreesOfFreedom: df,
    t,
    lastYears: Math.max(...points.map((p) => p.years)),
  };
}

export const EXTRAPOLATION_NOTE =
  'extrapolation: a straight line carried beyond the surveys; carbon-composition drift follows no published law';

export type BandEdgeProjection =
  | {
      extrapolation: true;
      note: string;
      edge: 'high' | 'low';
      /** Fitted drift at the start of the projection, %. */
      fromDriftPct: number;
      fromYears: number;
      /** Years from `fromYears` until the fitted line meets the edge (0 when already beyond it). */
      yearsAhead: number;
      atYears: number;
      /** From the slope's 95 % interval: soonest and latest; latest null when the interval allows no drift towards the edge. */
      range: { soonestYearsAhead: number; latestYearsAhead: number | null };
    }
  | { extrapolation: true; note: string; edge: null; reason: string };

/**
 * Where the fitted line meets the band edge it is heading for, from `fromYears` (default: the
 * latest survey). Band edges are drift percentages (e.g. −10 and +10). Always labelled as an extrapolation.
 */
export function projectToBandEdge(
  rate: DriftRate,
  band: { lowPct: number; highPct: number },
  fromYears: number = rate.lastYears,
): BandEdgeProjection {
  if (!(band.lowPct < band.highPct)) throw new RangeError(`the band ${band.lowPct}…${band.highPct} % is empty`);
  // The two common keys written out rather than spread from one object: V8 (Node 20) builds
  // `{ ...base, more }` slowly, and a set's history projects hundreds of parts.
  const slope = rate.slopePctPerYear;
  if (slope === 0) return { extrapolation: true, note: EXTRAPOLATION_NOTE, edge: null, reason: 'the fitted rate is zero: the line meets no edge' };
  const fromDriftPct = rate.interceptPct + slope * fromYears;
  const edge = slope > 0 ? 'high' : 'low';
  const gap = Math.max(0, edge === 'high' ? band.highPct - fromDriftPct : fromDriftPct - band.lowPct);
  const speed = Math.abs(slope);
  // The interval's bound towards the edge gives the soonest time; the bound away from it the latest (none if it turns back).
  const fast = edge === 'high' ? rate.interval.high : -rate.interval.low;
  const slow = edge === 'high' ? rate.interval.low : -rate.interval.high;
  const yearsAhead = gap / speed;
  return {
    extrapolation: true,
    note: EXTRAPOLATION_NOTE,
    edge,
    fromDriftPct,
    fromYears,
    yearsAhead,
    atYears: fromYears + yearsAhead,
    range: { soonestYearsAhead: gap / fast, latestYearsAhead: slow > 0 ? gap / slow : null },
  };
}

function round(x: number): string {
  return String(Number(x.toPrecision(3)));
}
