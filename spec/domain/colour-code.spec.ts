import {
  type Colour,
  ColourCodeError,
  decodeBands,
  decodeBodyTipDot,
  encodeBands,
  GREY_TOLERANCE_PCT,
  GREY_TOLERANCE_PCT_IEC_60062_2016,
  GREY_TOLERANCE_PCT_OLDER_CHARTS,
} from '../../api/domain/colour-code';

function thrown(fn: () => unknown): ColourCodeError {
  try {
    fn();
  } catch (e) {
    if (e instanceof ColourCodeError) return e;
    throw e;
  }
  throw new Error('expected a ColourCodeError');
}

describe('decodeBands', () => {
  // [bands, ohms, tolerance %, tempco ppm/K, source]
  const ROWS: ReadonlyArray<[Colour[], number, number, number | null, string]> = [
    [['yellow', 'violet', 'red', 'gold'], 4700, 5, null, 'IEC 60062:2016 colour table, check-values §1 row 1'],
    [['brown', 'black', 'yellow', 'silver'], 100_000, 10, null, 'IEC 60062:2016, check-values §1 row 2'],
    [['red', 'red', 'gold', 'silver'], 2.2, 10, null, 'IEC 60062:2016, gold multiplier ×0.1, check-values §1 row 3'],
    [['yellow', 'violet', 'silver', 'gold'], 0.47, 5, null, 'IEC 60062:2016, silver multiplier ×0.01, check-values §1 row 4'],
    [['brown', 'green', 'black'], 15, 20, null, 'IEC 60062:2016, 3 bands ±20 %, check-values §1 row 5'],
    [['brown', 'black', 'black', 'brown', 'brown'], 1000, 1, null, 'IEC 60062:2016, 5 bands, check-values §1 row 6'],
    [['red', 'red', 'yellow'], 220_000, 20, null, 'IEC 60062:2016 rules; exactly 220000 (check-values §2 artefact)'],
    [['orange', 'orange', 'orange', 'gold'], 33_000, 5, null, 'IEC 60062:2016 colour table'],
    [['brown', 'black', 'green'], 1_000_000, 20, null, 'IEC 60062:2016 colour table'],
    [['red', 'violet', 'orange', 'none'], 27_000, 20, null, 'IEC 60062:2016: no tolerance band ±20 %'],
    [['green', 'blue', 'black', 'black', 'green'], 560, 0.5, null, 'IEC 60062:2016: green ±0.5 %'],
    [['blue', 'grey', 'black', 'red', 'blue'], 68_000, 0.25, null, 'IEC 60062:2016: blue ±0.25 %'],
    [['violet', 'green', 'black', 'brown', 'violet'], 7500, 0.1, null, 'IEC 60062:2016: violet ±0.1 %'],
    [['white', 'brown', 'black', 'black', 'red'], 910, 2, null, 'IEC 60062:2016: red ±2 %'],
    [['yellow', 'violet', 'black', 'pink', 'gold'], 0.47, 5, null, 'IEC 60062:2016: pink multiplier ×0.001 (2016 edition only)'],
    [['brown', 'black', 'white', 'gold'], 10e9, 5, null, 'IEC 60062:2016: white multiplier ×10⁹'],
    [['brown', 'black', 'black', 'brown', 'brown', 'brown'], 1000, 1, 100, 'IEC 60062:2016: 6th band brown 100 ppm/K'],
    [['red', 'red', 'black', 'brown', 'brown', 'black'], 2200, 1, 250, 'IEC 60062:2016: black 250 ppm/K'],
    [['red', 'red', 'black', 'brown', 'brown', 'red'], 2200, 1, 50, 'IEC 60062:2016: red 50 ppm/K'],
    [['red', 'red', 'black', 'brown', 'brown', 'orange'], 2200, 1, 15, 'IEC 60062:2016: orange 15 ppm/K'],
    [['red', 'red', 'black', 'brown', 'brown', 'yellow'], 2200, 1, 25, 'IEC 60062:2016: yellow 25 ppm/K'],
    [['red', 'red', 'black', 'brown', 'brown', 'green'], 2200, 1, 20, 'IEC 60062:2016: green 20 ppm/K'],
    [['red', 'red', 'black', 'brown', 'brown', 'blue'], 2200, 1, 10, 'IEC 60062:2016: blue 10 ppm/K'],
    [['red', 'red', 'black', 'brown', 'brown', 'violet'], 2200, 1, 5, 'IEC 60062:2016: violet 5 ppm/K'],
    [['red', 'red', 'black', 'brown', 'brown', 'grey'], 2200, 1, 1, 'IEC 60062:2016: grey 1 ppm/K'],
  ];
  for (const [bands, ohms, tol, tempco, source] of ROWS) {
    it(`reads ${bands.join('-')} as ${ohms} Ω ±${tol} % (${source})`, () => {
      expect(decodeBands(bands)).toEqual({ ohms, tolerancePct: tol, tempcoPpmPerK: tempco });
    });
  }

  it('reads a grey tolerance band as the named constant, the IEC 60062:2016 value', () => {
    // check-values §1: ±0.05 % in older charts, ±0.01 % in tables derived from the 2016 edition.
    expect(GREY_TOLERANCE_PCT_IEC_60062_2016).toBe(0.01);
    expect(GREY_TOLERANCE_PCT_OLDER_CHARTS).toBe(0.05);
    expect(GREY_TOLERANCE_PCT).toBe(0.01);
    expect(decodeBands(['brown', 'black', 'black', 'red', 'grey']).tolerancePct).toBe(0.01);
  });

  // [refused bands, field, message, accepted twin]
  const REFUSED: ReadonlyArray<[unknown[], string, RegExp, Colour[]]> = [
    [['yellow', 'violet', 'gray', 'gold'], 'bands[2]', /write grey/, ['yellow', 'violet', 'grey', 'gold']],
    [['yellow', 'purple', 'red', 'gold'], 'bands[1]', /write violet/, ['yellow', 'violet', 'red', 'gold']],
    [['gold', 'red', 'violet', 'yellow'], 'bands[0]', /other end/, ['yellow', 'violet', 'red', 'gold']],
    [['silver', 'yellow', 'black', 'brown'], 'bands[0]', /other end/, ['brown', 'black', 'yellow', 'silver']],
    [['black', 'brown', 'red', 'gold'], 'bands[0]', /black cannot be the first digit/, ['brown', 'black', 'red', 'gold']],
    [['red', 'pink', 'red', 'gold'], 'bands[1]', /not a digit colour/, ['red', 'red', 'red', 'gold']],
    [['red', 'red'], 'bands', /3, 4, 5 or 6 bands, not 2/, ['red', 'red', 'red']],
    [['red', 'red', 'red', 'red', 'red', 'red', 'red'], 'bands', /not 7/, ['red', 'red', 'red', 'red', 'red', 'red']],
    [['red', 'red', 'none', 'gold'], 'bands[2]', /not a multiplier colour/, ['red', 'red', 'black', 'gold']],
    [['yellow', 'violet', 'red', 'orange'], 'bands[3]', /not a tolerance colour/, ['yellow', 'violet', 'red', 'red']],
    [['brown', 'black', 'black', 'brown', 'brown', 'gold'], 'bands[5]', /temperature-coefficient/, ['brown', 'black', 'black', 'brown', 'brown', 'brown']],
  ];
  for (const [bands, field, message, twin] of REFUSED) {
    it(`refuses ${bands.join('-')} at ${field}, and reads ${twin.join('-')}`, () => {
      const e = thrown(() => decodeBands(bands as Colour[]));
      expect(e.field).toBe(field);
      expect(e.message).toMatch(message);
      expect(decodeBands(twin).ohms).toBeGreaterThan(0);
    });
  }
});

describe('decodeBodyTipDot', () => {
  // Body–tip–dot marking [SEC: encyclopedia "Resistor", marking section], check-values §1.
  const ROWS: ReadonlyArray<[Colour, Colour | null, Colour | null, Colour, number, number, string]> = [
    ['brown', 'black', 'yellow', 'silver', 100_000, 10, 'check-values §1 example'],
    ['red', null, 'orange', 'gold', 22_000, 5, 'missing tip takes the body colour'],
    ['yellow', 'violet', null, 'none', 470_000, 20, 'missing dot takes the body colour; unpainted end ±20 %'],
    ['brown', null, null, 'silver', 110, 10, 'tip and dot both body colour'],
    ['red', 'red', 'gold', 'gold', 2.2, 5, 'gold dot ×0.1'],
  ];
  for (const [body, tip, dot, end, ohms, tol, source] of ROWS) {
    it(`reads body ${body}, tip ${tip ?? '(body)'}, dot ${dot ?? '(body)'}, end ${end} as ${ohms} Ω ±${tol} % (${source})`, () => {
      expect(decodeBodyTipDot({ body, tip, dot, end })).toEqual({ ohms, tolerancePct: tol, tempcoPpmPerK: null });
    });
  }
  const REFUSED: ReadonlyArray<[{ body: Colour; tip: Colour | null; dot: Colour | null; end: Colour }, string, RegExp]> = [
    [{ body: 'brown', tip: 'black', dot: 'yellow', end: 'red' }, 'end', /red is not an end colour \(silver ±10 %, gold ±5 %, none ±20 %\)/],
    [{ body: 'gold', tip: 'black', dot: 'yellow', end: 'silver' }, 'body', /not a digit colour/],
    [{ body: 'brown', tip: 'silver', dot: 'yellow', end: 'silver' }, 'tip', /not a digit colour/],
    [{ body: 'brown', tip: 'black', dot: 'none', end: 'silver' }, 'dot', /not a multiplier colour/],
    [{ body: 'brown', tip: 'black', dot: 'yellow', end: 'beige' as Colour }, 'end', /not a colour of the code/],
  ];
  for (const [input, field, message] of REFUSED) {
    it(`refuses ${JSON.stringify(input)} at ${field} (twins below)`, () => {
      const e = thrown(() => decodeBodyTipDot(input));
      expect(e.field).toBe(field);
      expect(e.message).toMatch(message);
    });
  }
  it('reads the refused parts once corrected (positive twins)', () => {
    expect(decodeBodyTipDot({ body: 'brown', tip: 'black', dot: 'yellow', end: 'silver' }).ohms).toBe(100_000);
    expect(decodeBodyTipDot({ body: 'brown', tip: 'black', dot: 'yellow', end: 'gold' }).tolerancePct).toBe(5);
  });
});

describe('encodeBands', () => {
  // [ohms, band count, tolerance, bands, source]
  const ROWS: ReadonlyArray<[number, 4 | 5, number, Colour[], string]> = [
    [4700, 4, 5, ['yellow', 'violet', 'red', 'gold'], 'check-values §1 row 1'],
    [100_000, 4, 10, ['brown', 'black', 'yellow', 'silver'], 'check-values §1 row 2'],
    [2.2, 4, 10, ['red', 'red', 'gold', 'silver'], 'check-values §1 row 3'],
    [0.47, 4, 5, ['yellow', 'violet', 'silver', 'gold'], 'check-values §1 row 4'],
    [15, 4, 20, ['brown', 'green', 'black', 'none'], 'check-values §1 row 5, ±20 % as no band'],
    [1000, 5, 1, ['brown', 'black', 'black', 'brown', 'brown'], 'check-values §1 row 6'],
    [4750, 5, 1, ['yellow', 'violet', 'green', 'brown', 'brown'], 'IEC 60062:2016 rules, an E96 value'],
    [220000.00000000003, 4, 10, ['red', 'red', 'yellow', 'silver'], 'float artefact ignored (check-values §2)'],
    [0.47, 5, 5, ['yellow', 'violet', 'black', 'pink', 'gold'], 'IEC 60062:2016 pink ×0.001'],
    [1e10, 4, 5, ['brown', 'black', 'white', 'gold'], 'IEC 60062:2016 white ×10⁹'],
    [10, 4, 2, ['brown', 'black', 'black', 'red'], 'IEC 60062:2016 black ×1, red ±2 %'],
  ];
  for (const [ohms, count, tol, bands, source] of ROWS) {
    it(`writes ${ohms} Ω ±${tol} % on ${count} bands as ${bands.join('-')} (${source})`, () => {
      expect(encodeBands(ohms, count, tol)).toEqual(bands);
      expect(decodeBands(bands)).toEqual({ ohms: Number(ohms.toPrecision(12)), tolerancePct: tol, tempcoPpmPerK: null });
    });
  }

  it('round-trips E12 mantissas across 0.1 Ω … 10 MΩ on 4 bands [CALC]', () => {
    const e12 = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82]; // IEC 60063 E12
    for (let exp = -2; exp <= 5; exp++) {
      for (const m of e12) {
        const ohms = Number(`${m}e${exp}`);
        expect(decodeBands(encodeBands(ohms, 4, 10)).ohms).toBe(ohms);
      }
    }
  });

  // [ohms, count, tolerance, field, message, accepted twin]
  const REFUSED: ReadonlyArray<[number, number, number, string, RegExp, [number, 4 | 5, number]]> = [
    [4750, 4, 1, 'ohms', /4.75 kΩ has 3 significant digits; 4 bands carry 2: use 5 bands/, [4750, 5, 1]],
    [4753, 5, 1, 'ohms', /4 significant digits/, [4750, 5, 1]],
    [4700, 4, 3, 'tolerancePct', /no colour for a tolerance of ±3 %/, [4700, 4, 2]],
    [0.005, 4, 5, 'ohms', /no multiplier colour/, [0.01, 4, 5]],
    [1e12, 4, 5, 'ohms', /no multiplier colour/, [1e10, 4, 5]],
    [0, 4, 5, 'ohms', /above zero/, [1, 4, 5]],
    [Number.NaN, 4, 5, 'ohms', /above zero/, [1, 4, 5]],
    [4700, 6, 5, 'bandCount', /4 or 5 bands/, [4700, 5, 5]],
  ];
  for (const [ohms, count, tol, field, message, twin] of REFUSED) {
    it(`refuses ${ohms} Ω ±${tol} % on ${count} bands at ${field}, and encodes ${twin.join(', ')}`, () => {
      const e = thrown(() => encodeBands(ohms, count as 4 | 5, tol));
      expect(e.field).toBe(field);
      expect(e.message).toMatch(message);
      expect(encodeBands(...twin).length).toBe(twin[1]);
    });
  }
});
