import { compareRows, DAYS_PER_YEAR, partInstances, type HistoryPointInput } from '../../api/domain/part-history';

let seq = 0;
/** A reading of R2 (250 kΩ ±10 %) on a date; U 1 % of the nominal unless given. */
const pt = (at: string, ohms: number | null, extra: Partial<HistoryPointInput> = {}): HistoryPointInput => ({
  surveyId: ++seq,
  readingId: seq,
  at,
  state: ohms === null ? 'open' : 'value',
  ohms,
  valueFrom: 'reading',
  nominalOhms: 250_000,
  uncertaintyOhms: 2500,
  band: { lowPct: -10, highPct: 10 },
  verdict: 'in-band',
  method: 'lead-lifted',
  meter: 'Bench DMM',
  ...extra,
});

describe('part instances across surveys (DESIGN.md §3.8)', () => {
  it('counts years from the first survey in Julian years (365.25 days: the IAU year, common practice for rates)', () => {
    const [i] = partInstances('c-r2', 'R2', [pt('2020-01-01T00:00:00Z', 250_000), pt('2021-01-01T00:00:00Z', 255_000)], []);
    expect(i.points[0].years).toBe(0);
    expect(i.points[1].years).toBeCloseTo(366 / DAYS_PER_YEAR, 12); // 2020 is a leap year: 366 days [CALC]
    expect(i.points[1].driftPct!).toBeCloseTo(2, 12); // (255 k − 250 k) / 250 k [CALC]
    expect(i.points[1].uncertaintyPct!).toBeCloseTo(1, 12);
  });

  it('gives a rate from three surveys whose spread exceeds U: 0, +2, +4 % a year apart → +2 %/year (drift-history.ts, least squares [CALC])', () => {
    const [i] = partInstances('c-r2', 'R2', [pt('2020-01-01T00:00:00Z', 250_000), pt('2020-12-31T06:00:00Z', 255_000), pt('2021-12-31T12:00:00Z', 260_000)], []);
    // 365.25 days apart exactly: slope 2 %/year, the points on a line, so the interval comes from the readings' U.
    expect(i.rate.slopePctPerYear!).toBeCloseTo(2, 9);
    if (i.rate.slopePctPerYear !== null) {
      expect(i.rate.interval.low).toBeLessThan(2);
      expect(i.rate.interval.high).toBeGreaterThan(2);
      expect(i.rate.standardErrorFrom).toBe('readings');
    }
    expect(i.projection!.extrapolation).toBeTrue();
    expect(i.projection!.edge).toBe('high');
    // From +4 % at year 2 to the +10 % edge at 2 %/year: 3 years ahead [CALC].
    if (i.projection!.edge !== null) expect(i.projection!.yearsAhead).toBeCloseTo(3, 9);
  });

  it('gives no rate from two surveys, nor from three within U, and says why', () => {
    const two = partInstances('c-r2', 'R2', [pt('2020-01-01T00:00:00Z', 250_000), pt('2022-01-01T00:00:00Z', 260_000)], [])[0];
    expect(two.rate.slopePctPerYear).toBeNull();
    expect(two.projection).toBeNull();
    const flat = partInstances('c-r2', 'R2', [pt('2020-01-01T00:00:00Z', 250_000), pt('2021-01-01T00:00:00Z', 251_000), pt('2022-01-01T00:00:00Z', 250_500)], [])[0];
    expect(flat.rate.slopePctPerYear).toBeNull();
    if (flat.rate.slopePctPerYear === null) expect(flat.rate.reason).toMatch(/uncertainty/);
  });

  it('starts a new instance at a replacement: readings after it belong to the new part, and neither has a rate from the mix', () => {
    const points = [pt('2018-01-01T00:00:00Z', 262_000), pt('2019-01-01T00:00:00Z', 270_000), pt('2020-01-01T00:00:00Z', 280_000), pt('2021-06-01T00:00:00Z', 249_000), pt('2023-06-01T00:00:00Z', 250_000)];
    const [orig, repl] = partInstances('c-r2', 'R2', points, [{ lineId: 9, at: '2021-01-15T00:00:00Z', text: '250k' }]);
    expect(orig.original).toBeTrue();
    expect(orig.points.length).toBe(3);
    expect(orig.endedBy!.lineId).toBe(9);
    expect(orig.rate.slopePctPerYear).not.toBeNull();
    expect(repl.instance).toBe(2);
    expect(repl.original).toBeFalse();
    expect(repl.startedBy!.text).toBe('250k');
    expect(repl.points.map((p) => p.ohms)).toEqual([249_000, 250_000]);
    expect(repl.points[0].years).toBe(0);
    expect(repl.rate.slopePctPerYear).toBeNull();
  });

  it('keeps an instance with no survey yet after a replacement', () => {
    const out = partInstances('c-r2', 'R2', [pt('2020-01-01T00:00:00Z', 300_000)], [{ lineId: 1, at: '2020-02-01T00:00:00Z', text: '240k' }]);
    expect(out.length).toBe(2);
    expect(out[1].points).toEqual([]);
  });

  it('marks a change of meter or method, and an implied value', () => {
    const [i] = partInstances('c-r2', 'R2', [pt('2020-01-01T00:00:00Z', 250_000), pt('2021-01-01T00:00:00Z', 252_000, { meter: 'Analogue VOM' }), pt('2022-01-01T00:00:00Z', 253_000, { meter: 'Analogue VOM', method: 'in-circuit', valueFrom: 'implied' })], []);
    expect(i.points[0].marks).toEqual([]);
    expect(i.points[1].marks).toEqual(['meter-changed']);
    expect(i.points[2].marks).toEqual(['method-changed', 'value-implied']);
  });

  it('shows state readings and readings without U but leaves them out of the rate, saying so', () => {
    const [i] = partInstances('c-r2', 'R2', [pt('2020-01-01T00:00:00Z', 250_000), pt('2021-01-01T00:00:00Z', 260_000, { uncertaintyOhms: null }), pt('2022-01-01T00:00:00Z', null)], []);
    expect(i.points.length).toBe(3);
    expect(i.points[2].driftPct).toBeNull();
    expect(i.leftOut).toBe(2);
    if (i.rate.slopePctPerYear === null) expect(i.rate.reason).toMatch(/2 surveys without a value or a meter uncertainty left out/);
    else fail('no rate expected');
  });
});

describe('before / after comparison', () => {
  const side = (ohms: number | null, verdict: 'high' | 'in-band' | 'open', method: 'in-circuit' | 'lead-lifted' = 'in-circuit') => ({ readingId: 1, text: '', state: ohms === null ? ('open' as const) : ('value' as const), ohms, method, verdict, driftPct: null });

  it('gives the change in percent of two values and marks a verdict or method change', () => {
    const [r] = compareRows([{ testPointKey: 'tp-r2', stageName: 'Audio', label: 'R2', a: side(300_000, 'high'), b: side(250_000, 'in-band', 'lead-lifted') }]);
    expect(r.changePct!).toBeCloseTo(-50_000 / 3000, 12); // (250 k − 300 k) / 300 k × 100 [CALC]
    expect(r.verdictChanged).toBeTrue();
    expect(r.methodChanged).toBeTrue();
  });

  it('gives no change where a side is missing or a state', () => {
    const [missing, state] = compareRows([
      { testPointKey: 'tp-r1', stageName: 'Audio', label: 'R1', a: null, b: side(10e6, 'in-band') },
      { testPointKey: 'tp-r2', stageName: 'Audio', label: 'R2', a: side(null, 'open'), b: side(250_000, 'in-band') },
    ]);
    expect(missing.changePct).toBeNull();
    expect(missing.verdictChanged).toBeFalse();
    expect(state.changePct).toBeNull();
    expect(state.verdictChanged).toBeTrue();
  });
});
