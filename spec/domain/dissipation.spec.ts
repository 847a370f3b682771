import {
  DERATING_FACTOR,
  DissipationInputError,
  STANDARD_WATT_STEPS,
  STYLE_VOLTAGE_LIMITS,
  dissipation,
  dissipationInputProblems,
  nextStandardStep,
  styleVoltageLimit,
} from '../../api/domain/dissipation';

const codes = (r: { notes: { code: string }[] }) => r.notes.map((n) => n.code);

describe('dissipation', () => {
  it('100 kΩ with 150 V across it: 0.225 W → ½ W (check-values §5 [CALC]; rating ≥ 2P, common practice, consistent with NAVSEA SD-18)', () => {
    const r = dissipation({ ohms: 100_000, volts: 150 });
    expect(r.watts).toBeCloseTo(0.225, 12);
    expect(r.suggestedWatts).toBe(0.5);
    expect(r.voltageWarning).toBeNull(); // 150 V against the ½ W style's 350 V [MEM]
    expect(codes(r)).toContain('from-volts');
  });

  // [ohms, volts, amps, watts, suggested] — P = V²/R = I²R [CALC]; steps ⅛ … 25 W, common practice
  const cases: [number, number | undefined, number | undefined, number, number][] = [
    [1000, 10, undefined, 0.1, 0.25], // 2P = 0.2 → ¼ W
    [10_000, 35.355339059327378, undefined, 0.125, 0.25], // 2P = ¼ W exactly: the step itself
    [470, undefined, 0.02, 0.188, 0.5],
    [2200, 100, undefined, 4.545454545454546, 10], // 2P = 9.09 → 10 W
    [100, undefined, 0.01, 0.01, 0.125],
  ];
  for (const [ohms, volts, amps, watts, suggested] of cases) {
    it(`${ohms} Ω, ${volts ?? '–'} V, ${amps ?? '–'} A → ${watts} W, suggest ${suggested} W`, () => {
      const r = dissipation({ ohms, volts, amps });
      expect(r.watts).toBeCloseTo(watts, 9);
      expect(r.suggestedWatts).toBe(suggested);
    });
  }

  it('the mains factor scales P with its square: 117 → 125 V on 100 kΩ at 150 V', () => {
    const f = 125 / 117;
    const r = dissipation({ ohms: 100_000, volts: 150, mainsFactor: f });
    expect(r.watts).toBeCloseTo(0.225 * f * f, 12);
    expect(codes(r)).toContain('mains-factor');
    // twin: a factor of 1.3 pushes 2P past ½ W (0.225 × 1.69 × 2 = 0.76 W)
    expect(dissipation({ ohms: 100_000, volts: 150, mainsFactor: 1.3 }).suggestedWatts).toBe(1);
    expect(dissipation({ ohms: 100_000, volts: 150 }).suggestedWatts).toBe(0.5);
  });

  it('never below the original rating: a 2 W original at 0.1 W stays 2 W', () => {
    const r = dissipation({ ohms: 1000, volts: 10, ratedWatts: 2 });
    expect(r.suggestedWatts).toBe(2);
    expect(codes(r)).toContain('kept-original-rating');
    expect(dissipation({ ohms: 1000, volts: 10 }).suggestedWatts).toBe(0.25);
  });

  it('says when the original part runs above half its rating', () => {
    expect(codes(dissipation({ ohms: 100_000, volts: 150, ratedWatts: 0.25 }))).toContain('original-overloaded');
    expect(codes(dissipation({ ohms: 100_000, volts: 150, ratedWatts: 1 }))).not.toContain('original-overloaded');
  });

  it('both voltage and current given: the larger dissipation, said so', () => {
    const r = dissipation({ ohms: 100, volts: 10, amps: 0.2 });
    expect(r.watts).toBeCloseTo(4, 12);
    expect(codes(r)).toContain('volts-and-amps');
  });

  it('above the largest step: a power resistor of at least 2P, rounded up to whole watts', () => {
    const r = dissipation({ ohms: 10, volts: 25 }); // 62.5 W, 2P = 125 W
    expect(r.suggestedWatts).toBe(125);
    expect(codes(r)).toContain('above-standard-steps');
  });

  it('fuse-role parts keep their original rating and type, with a warning', () => {
    const r = dissipation({ ohms: 10, amps: 0.15, ratedWatts: 0.5, role: 'fuse' });
    expect(r.suggestedWatts).toBe(0.5);
    expect(r.notes.find((n) => n.code === 'fuse-role')!.text).toContain('fusible or flameproof');
    // twin: the same part not in a fuse role gets the derated step
    expect(dissipation({ ohms: 10, amps: 0.15, ratedWatts: 0.125 }).suggestedWatts).toBe(0.5);
    expect(dissipation({ ohms: 10, amps: 0.3, ratedWatts: 0.5 }).suggestedWatts).toBe(2);
    expect(dissipation({ ohms: 10, amps: 0.3, ratedWatts: 0.5, role: 'fuse' }).suggestedWatts).toBe(0.5);
  });

  it('mains-side parts: flameproof', () => {
    expect(codes(dissipation({ ohms: 47, volts: 5, role: 'mains-side' }))).toContain('mains-side-flameproof');
    expect(codes(dissipation({ ohms: 47, volts: 5 }))).not.toContain('mains-side-flameproof');
  });

  describe('working voltage E = √(P·R) against the style’s typical limit (¼ W 250 V, ½ W 350 V, 1 W 500 V, 2 W 750 V — from memory)', () => {
    it('1 MΩ with 400 V: 0.16 W → ½ W, but 400 V exceeds the ½ W style’s 350 V', () => {
      const r = dissipation({ ohms: 1e6, volts: 400 });
      expect(r.watts).toBeCloseTo(0.16, 12);
      expect(r.suggestedWatts).toBe(0.5);
      expect(r.voltageWarning).toContain('350 V');
      expect(r.voltageWarning).toContain('from memory');
      expect(r.voltageWarning).toContain('1 W');
    });
    it('1 MΩ with 300 V: 0.09 W → ¼ W, over that style’s 250 V; at 240 V no warning', () => {
      const r = dissipation({ ohms: 1e6, volts: 300 });
      expect(r.suggestedWatts).toBe(0.25);
      expect(r.voltageWarning).toContain('250 V');
      expect(dissipation({ ohms: 1e6, volts: 240 }).voltageWarning).toBeNull();
    });
    it('the part’s own rated voltage wins over the style table', () => {
      expect(dissipation({ ohms: 1e6, volts: 400, ratedVolts: 500 }).voltageWarning).toBeNull();
      expect(dissipation({ ohms: 1e6, volts: 340, ratedVolts: 300 }).voltageWarning).toContain('rated');
    });
    it('no typical limit is known for ⅛ W or above 2 W: said so, no warning', () => {
      const r = dissipation({ ohms: 100, volts: 0.5 });
      expect(r.suggestedWatts).toBe(0.125);
      expect(r.voltageWarning).toBeNull();
      expect(codes(r)).toContain('no-voltage-limit');
    });
    it('the table', () => {
      expect(STYLE_VOLTAGE_LIMITS.map((s) => [s.watts, s.volts])).toEqual([[0.25, 250], [0.5, 350], [1, 500], [2, 750]]);
      expect(styleVoltageLimit(0.5)).toBe(350);
      expect(styleVoltageLimit(3)).toBeNull();
    });
  });

  it('the standard steps and the derating factor (common practice)', () => {
    expect(STANDARD_WATT_STEPS).toEqual([0.125, 0.25, 0.5, 1, 2, 3, 5, 7, 10, 15, 20, 25]);
    expect(DERATING_FACTOR).toBe(2);
    expect(nextStandardStep(0.45)).toBe(0.5);
    expect(nextStandardStep(0.5)).toBe(0.5);
    expect(nextStandardStep(7.1)).toBe(10);
    expect(nextStandardStep(26)).toBeNull();
  });

  it('a winding or heater is not sized by a resistor rating: said so', () => {
    expect(codes(dissipation({ ohms: 300, amps: 0.05, kind: 'winding' }))).toContain('not-a-resistor');
    expect(codes(dissipation({ ohms: 300, amps: 0.05, kind: 'carbon-composition' }))).not.toContain('not-a-resistor');
  });

  describe('validation', () => {
    const bad: [string, object, string][] = [
      ['no voltage or current', { ohms: 100 }, 'volts'],
      ['zero ohms', { ohms: 0, volts: 1 }, 'ohms'],
      ['a negative mains factor', { ohms: 100, volts: 1, mainsFactor: -1 }, 'mainsFactor'],
      ['a zero rating', { ohms: 100, volts: 1, ratedWatts: 0 }, 'ratedWatts'],
      ['an unknown role', { ohms: 100, volts: 1, role: 'decorative' }, 'role'],
    ];
    for (const [what, input, field] of bad) {
      it(`refuses ${what}`, () => {
        expect(dissipationInputProblems(input as never).map((p) => p.field)).toContain(field);
        expect(() => dissipation(input as never)).toThrowError(DissipationInputError);
      });
    }
    it('accepts the worked case', () => {
      expect(dissipationInputProblems({ ohms: 100_000, volts: 150 })).toEqual([]);
    });
  });
});
