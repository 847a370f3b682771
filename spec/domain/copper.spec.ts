import { COPPER_ALPHA_20, copperResistanceAt, copperResistanceTo20 } from '../../api/domain/copper';

describe('copper temperature correction (IEC 60028)', () => {
  it('uses α₂₀ = 0.00393 /K (IEC 60028)', () => {
    expect(COPPER_ALPHA_20).toBe(0.00393);
  });

  // [R at 20 °C, temperature °C, R at that temperature, source]
  const ROWS: ReadonlyArray<[number, number, number, string]> = [
    [300, 30, 311.79, 'check-values §5 [CALC]: 300 Ω at 20 °C reads 311.79 Ω at 30 °C'],
    [300, 20, 300, 'the reference temperature itself'],
    [300, 0, 276.42, '[CALC] 300 × (1 − 0.0786)'],
    [450, 25, 458.8425, '[CALC] an output-transformer primary on a warm bench, 450 × 1.01965'],
    [2.5, 60, 2.893, '[CALC] a speaker-field or filament winding warmed to 60 °C, 2.5 × 1.1572'],
  ];
  for (const [r20, t, rT, source] of ROWS) {
    it(`takes ${r20} Ω at 20 °C to ${rT} Ω at ${t} °C and back (${source})`, () => {
      expect(copperResistanceAt(r20, t)).toBeCloseTo(rT, 9);
      expect(copperResistanceTo20(rT, t)).toBeCloseTo(r20, 9);
    });
  }

  it('puts the zero of the linear law near −234.5 °C, the inferred zero of copper in winding temperature-rise practice (234.5 in IEEE practice, 235 in IEC 60034-1 [MEM])', () => {
    const zeroC = 20 - 1 / COPPER_ALPHA_20;
    expect(zeroC).toBeCloseTo(-234.45, 2);
    // ratio form R2/R1 = (234.5 + T2)/(234.5 + T1) agrees within 0.01 % between 0 and 100 °C
    const ratio = copperResistanceAt(100, 75) / copperResistanceAt(100, 25);
    expect(Math.abs(ratio / ((234.5 + 75) / (234.5 + 25)) - 1)).toBeLessThan(1e-4);
  });

  it('refuses temperatures outside the linear law and invalid resistances; accepts their twins', () => {
    expect(() => copperResistanceAt(300, -300)).toThrowError(RangeError, /outside the range/);
    expect(() => copperResistanceTo20(300, Number.NaN)).toThrowError(RangeError, /temperature/);
    expect(() => copperResistanceAt(-1, 30)).toThrowError(RangeError, /zero or more/);
    expect(copperResistanceAt(300, -40)).toBeCloseTo(300 * (1 - 0.00393 * 60), 9);
    expect(copperResistanceAt(0, 30)).toBe(0);
  });
});
