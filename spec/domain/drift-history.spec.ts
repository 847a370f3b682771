import { erf, gamma, lusolve, multiply, transpose } from 'mathjs';
import {
  type DriftPoint,
  type DriftRate,
  driftRate,
  projectToBandEdge,
  studentT975,
  T_975,
} from '../../api/domain/drift-history';

const pts = (rows: ReadonlyArray<[number, number, number]>): DriftPoint[] =>
  rows.map(([years, driftPct, uncertaintyPct]) => ({ years, driftPct, uncertaintyPct }));

function rateOf(points: DriftPoint[]): DriftRate {
  const r = driftRate(points);
  if (r.slopePctPerYear === null) throw new Error(`expected a rate, got: ${(r as { reason: string }).reason}`);
  return r as DriftRate;
}

describe("Student's t table (t₀.₉₇₅)", () => {
  // Re-derive each tabulated value from the t density [CALC]: the CDF must cross 0.975 within
  // ±0.0005 of the three-decimal entry. Density: Γ((ν+1)/2) / (√(νπ) Γ(ν/2)) (1 + x²/ν)^(−(ν+1)/2);
  // mathjs gamma serves as an independent oracle; ν = ∞ uses the normal CDF ½(1 + erf(x/√2)).
  function cdf(t: number, nu: number): number {
    if (!Number.isFinite(nu)) return 0.5 * (1 + erf(t / Math.SQRT2));
    const c = gamma((nu + 1) / 2) / (Math.sqrt(nu * Math.PI) * gamma(nu / 2));
    const f = (x: number) => c * (1 + (x * x) / nu) ** (-(nu + 1) / 2);
    const steps = 20_000; // Simpson's rule on [0, t]
    const h = t / steps;
    let s = f(0) + f(t);
    for (let i = 1; i < steps; i++) s += (i % 2 ? 4 : 2) * f(i * h);
    return 0.5 + (s * h) / 3;
  }
  for (const [df, t] of T_975) {
    it(`has t = ${t} for ${df} degrees of freedom (NIST/SEMATECH e-Handbook §1.3.6.7.2; re-derived [CALC])`, () => {
      expect(cdf(t - 0.0005, df)).toBeLessThan(0.975);
      expect(cdf(t + 0.0005, df)).toBeGreaterThan(0.975);
    });
  }
  it('agrees with the closed form for 1 degree of freedom, ½ + atan(t)/π [CALC]', () => {
    expect(0.5 + Math.atan(12.706) / Math.PI).toBeCloseTo(0.975, 5);
  });
  it('takes the entry below between tabulated degrees of freedom, and refuses 0', () => {
    expect(studentT975(1)).toBe(12.706);
    expect(studentT975(35)).toBe(2.042);
    expect(studentT975(1000)).toBe(1.98);
    expect(() => studentT975(0)).toThrowError(RangeError);
  });
});

describe('driftRate', () => {
  it('gives 0.45 %/year for +5, +9, +14 % at years 0, 10, 20 (check-values §3 [CALC]), interval from the residuals', () => {
    const r = rateOf(pts([[0, 5, 0.5], [10, 9, 0.5], [20, 14, 0.5]]));
    expect(r.slopePctPerYear).toBeCloseTo(0.45, 12);
    expect(r.n).toBe(3);
    expect(r.interceptPct).toBeCloseTo(29 / 6, 12); // ȳ − b x̄ = 28/3 − 4.5 [CALC]
    // s² = (1/36 + 1/9 + 1/36) / 1 = 1/6, SE = √(1/6 / 200) = 0.0288675 [CALC]; t(1) = 12.706
    expect(r.standardErrorFrom).toBe('residuals');
    expect(r.standardErrorPctPerYear).toBeCloseTo(Math.sqrt(1 / 1200), 12);
    expect(r.degreesOfFreedom).toBe(1);
    expect(r.t).toBe(12.706);
    expect(r.interval.low).toBeCloseTo(0.45 - 12.706 * Math.sqrt(1 / 1200), 10);
    expect(r.interval.high).toBeCloseTo(0.45 + 12.706 * Math.sqrt(1 / 1200), 10);
    expect(r.interval.low).toBeCloseTo(0.0832, 4);
    expect(r.interval.high).toBeCloseTo(0.8168, 4);
  });

  it('widens the interval to the readings’ uncertainty when that is larger (GUM §5.1.2 [CALC])', () => {
    // u_i = U_i/2 = 1 %; SE = √(100·1 + 0 + 100·1) / 200 = 0.0707107
    const r = rateOf(pts([[0, 5, 2], [10, 9, 2], [20, 14, 2]]));
    expect(r.slopePctPerYear).toBeCloseTo(0.45, 12);
    expect(r.standardErrorFrom).toBe('readings');
    expect(r.standardErrorPctPerYear).toBeCloseTo(Math.sqrt(200) / 200, 12);
    expect(r.interval.high - r.interval.low).toBeCloseTo(2 * 12.706 * Math.sqrt(200) / 200, 10);
  });

  it('gives no zero-width interval for points that lie exactly on a line', () => {
    const r = rateOf(pts([[0, 0, 1], [10, 5, 1], [20, 10, 1]]));
    expect(r.slopePctPerYear).toBeCloseTo(0.5, 12);
    expect(r.interval.high - r.interval.low).toBeGreaterThan(0.8); // 2 × 12.706 × √50/200 = 0.898
  });

  it('matches the normal equations solved by mathjs lusolve on six surveys (oracle [CALC])', () => {
    const rows: [number, number, number][] = [[0, 2.0, 1], [3, 3.1, 1], [7, 4.9, 1], [12, 7.4, 1], [18, 9.8, 1], [25, 13.9, 1]];
    const X = rows.map(([x]) => [1, x]);
    const y = rows.map(([, d]) => [d]);
    const Xt = transpose(X);
    const beta = lusolve(multiply(Xt, X), multiply(Xt, y)) as number[][];
    const r = rateOf(pts(rows));
    expect(r.slopePctPerYear).toBeCloseTo(beta[1][0], 10);
    expect(r.interceptPct).toBeCloseTo(beta[0][0], 10);
    expect(r.degreesOfFreedom).toBe(4);
    expect(r.t).toBe(2.776);
    expect(r.lastYears).toBe(25);
  });

  // DESIGN §3.8: only from three surveys or more whose spread exceeds U. [points, reason, twin that gives a rate]
  const NULLS: ReadonlyArray<[DriftPoint[], RegExp, DriftPoint[]]> = [
    [pts([]), /needs 3 surveys or more.*are 0/, pts([[0, 5, 1], [10, 9, 1], [20, 14, 1]])],
    [pts([[0, 5, 1], [10, 9, 1]]), /needs 3 surveys or more.*are 2/, pts([[0, 5, 1], [10, 9, 1], [20, 14, 1]])],
    [pts([[0, 5, 2], [10, 5.5, 2], [20, 6, 2]]), /within the uncertainty U = 2 %/, pts([[0, 5, 0.5], [10, 5.5, 0.5], [20, 6, 0.5]])],
    [pts([[0, 5, 1], [10, 6, 1], [20, 5.5, 1]]), /within the uncertainty U = 1 %/, pts([[0, 5, 1], [10, 6.5, 1], [20, 5.5, 1]])],
    [pts([[4, 5, 1], [4, 9, 1], [4, 14, 1]]), /same date/, pts([[4, 5, 1], [5, 9, 1], [4, 14, 1]])],
  ];
  for (const [points, reason, twin] of NULLS) {
    it(`gives no rate for ${JSON.stringify(points.map((p) => [p.years, p.driftPct, p.uncertaintyPct]))} (${reason.source}), and one for its twin`, () => {
      const r = driftRate(points);
      expect(r.slopePctPerYear).toBeNull();
      expect((r as { reason: string }).reason).toMatch(reason);
      expect(driftRate(twin).slopePctPerYear).not.toBeNull();
    });
  }

  it('refuses non-finite numbers and a negative uncertainty', () => {
    expect(() => driftRate(pts([[0, 5, 1], [Number.NaN, 9, 1], [20, 14, 1]]))).toThrowError(RangeError, /points\[1\]\.years/);
    expect(() => driftRate(pts([[0, 5, 1], [10, 9, -1], [20, 14, 1]]))).toThrowError(RangeError, /negative/);
  });
});

describe('projectToBandEdge', () => {
  it('projects an upward drift to the high edge, labelled as an extrapolation [CALC]', () => {
    const rate = rateOf(pts([[0, 5, 0.5], [10, 9, 0.5], [20, 14, 0.5]]));
    const p = projectToBandEdge(rate, { lowPct: -20, highPct: 20 });
    expect(p.extrapolation).toBeTrue();
    expect(p.note).toContain('extrapolation');
    if (p.edge === null) throw new Error('expected an edge');
    expect(p.edge).toBe('high');
    expect(p.fromYears).toBe(20);
    expect(p.fromDriftPct).toBeCloseTo(29 / 6 + 9, 10); // fitted 13.833 % at year 20
    expect(p.yearsAhead).toBeCloseTo((20 - (29 / 6 + 9)) / 0.45, 10); // 13.70 years
    expect(p.atYears).toBeCloseTo(20 + (20 - (29 / 6 + 9)) / 0.45, 10);
    expect(p.range.soonestYearsAhead).toBeCloseTo((20 - (29 / 6 + 9)) / rate.interval.high, 10);
    expect(p.range.latestYearsAhead!).toBeCloseTo((20 - (29 / 6 + 9)) / rate.interval.low, 10);
    expect(p.range.soonestYearsAhead).toBeLessThan(p.yearsAhead);
    expect(p.range.latestYearsAhead!).toBeGreaterThan(p.yearsAhead);
  });

  it('says 0 years when the fitted line is already beyond the edge', () => {
    const rate = rateOf(pts([[0, 5, 0.5], [10, 9, 0.5], [20, 14, 0.5]]));
    const p = projectToBandEdge(rate, { lowPct: -10, highPct: 10 });
    expect(p.edge).toBe('high');
    if (p.edge !== null) expect(p.yearsAhead).toBe(0);
  });

  it('projects a downward drift to the low edge; no latest time when the interval allows no downward drift [CALC]', () => {
    // −2, −4, −7 % at 0, 5, 10 years: slope −0.5 %/year, fitted −6.833 % at year 10, interval −1.234 … +0.234
    const rate = rateOf(pts([[0, -2, 0.5], [5, -4, 0.5], [10, -7, 0.5]]));
    expect(rate.slopePctPerYear).toBeCloseTo(-0.5, 12);
    const p = projectToBandEdge(rate, { lowPct: -10, highPct: 10 });
    if (p.edge === null) throw new Error('expected an edge');
    expect(p.edge).toBe('low');
    expect(p.yearsAhead).toBeCloseTo((10 - 41 / 6) / 0.5, 10); // 6.33 years
    expect(p.range.latestYearsAhead).toBeNull();
    expect(p.range.soonestYearsAhead).toBeCloseTo((10 - 41 / 6) / -rate.interval.low, 10);
  });

  it('meets no edge at a zero rate, and refuses an empty band', () => {
    const rate = rateOf(pts([[0, 0, 1], [10, 5, 1], [20, 0, 1]]));
    expect(rate.slopePctPerYear).toBe(0);
    const p = projectToBandEdge(rate, { lowPct: -10, highPct: 10 });
    expect(p.edge).toBeNull();
    expect(p.extrapolation).toBeTrue();
    expect(() => projectToBandEdge(rate, { lowPct: 10, highPct: 10 })).toThrowError(RangeError, /empty/);
  });
});
