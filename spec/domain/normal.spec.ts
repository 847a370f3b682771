import { erf } from 'mathjs';
import { normalCdf } from '../../api/domain/normal';

describe('normalCdf (Φ, W. J. Cody’s rational approximations, ACM TOMS Algorithm 715 ANORM)', () => {
  // Abramowitz & Stegun, Handbook of Mathematical Functions (1964, 10th printing 1972),
  // Table 26.1 "Normal probability function", P(x) to 15 decimals. The digits below are quoted
  // from memory [MEM] and were confirmed against CPython 3.11 math.erfc [CALC]:
  // P(x) = ½·erfc(−x/√2).
  const table: [number, number][] = [
    [0, 0.5],
    [0.5, 0.691462461274013],
    [1, 0.841344746068543],
    [1.5, 0.933192798731142],
    [2, 0.977249868051821],
    [2.5, 0.993790334674224],
    [3, 0.99865010196837],
    [4, 0.999968328758167],
    [5, 0.999999713348428],
  ];
  for (const [x, p] of table) {
    it(`Φ(${x}) = ${p} to 1e-12 (A&S Table 26.1)`, () => {
      expect(Math.abs(normalCdf(x) - p)).toBeLessThan(1e-12);
    });
  }

  it('Φ(2) = 0.977250 to six places (check-values §6) and 1 − Φ(2) = 2.275 % (ILAC-G8:09/2019 §4.2.3 false-accept risk with w = U)', () => {
    expect(normalCdf(2).toFixed(6)).toBe('0.977250');
    expect(((1 - normalCdf(2)) * 100).toFixed(3)).toBe('2.275');
  });

  // Lower tail, relative accuracy (the absolute error there is far below 1e-9 anyway):
  // values from CPython 3.11 math.erfc [CALC], ½·erfc(−x/√2).
  const tails: [number, number][] = [
    [-0.3, 0.3820885778110474],
    [-0.66291, 0.25369409838973994], // Cody's first interval boundary
    [-1.96, 0.024997895148220435],
    [-5, 2.866515718791946e-7],
    [-5.7, 5.990371401063533e-9], // third interval, beyond √32
    [-6, 9.865876450377012e-10],
    [-8, 6.220960574271819e-16],
    [-10, 7.619853024160593e-24],
    [-20, 2.7536241186063314e-89],
    [-37, 5.725571222525139e-300],
  ];
  for (const [x, p] of tails) {
    it(`Φ(${x}) = ${p} to a relative 1e-13 (CPython math.erfc)`, () => {
      expect(Math.abs(normalCdf(x) - p) / p).toBeLessThan(1e-13);
    });
  }

  it('agrees with mathjs 15 erf, Φ(x) = (1 + erf(x/√2))/2, to 1e-9 from −8 to 8 in steps of 0.01', () => {
    let worst = 0;
    for (let i = -800; i <= 800; i++) {
      const x = i / 100;
      worst = Math.max(worst, Math.abs(normalCdf(x) - (1 + erf(x / Math.SQRT2)) / 2));
    }
    expect(worst).toBeLessThan(1e-9);
  });

  it('is symmetric, Φ(x) + Φ(−x) = 1, and never decreases across the interval boundaries', () => {
    let previous = -1;
    for (let i = -1000; i <= 1000; i++) {
      const x = i / 100;
      const p = normalCdf(x);
      expect(Math.abs(p + normalCdf(-x) - 1)).toBeLessThan(1e-15);
      expect(p).toBeGreaterThanOrEqual(previous);
      previous = p;
    }
  });

  it('gives 0 and 1 at the infinities, 0 below Cody’s XLOW, 1 above his XUPPR, NaN for NaN', () => {
    expect(normalCdf(Number.NEGATIVE_INFINITY)).toBe(0);
    expect(normalCdf(Number.POSITIVE_INFINITY)).toBe(1);
    expect(normalCdf(-40)).toBe(0);
    expect(normalCdf(9)).toBe(1);
    expect(normalCdf(-37)).toBeGreaterThan(0); // twin: just inside XLOW it has not vanished
    expect(normalCdf(Number.NaN)).toBeNaN();
  });
});
