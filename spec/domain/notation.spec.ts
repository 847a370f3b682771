import { formatCode, formatOhms, parseResistance, type ParseResult, type ParseSuccess } from '../../api/domain/notation';
import type { ReadingState } from '../../api/domain/words';

function accepted(result: ParseResult): ParseSuccess {
  if (!result.ok) throw new Error(`expected to parse, got refusal: ${result.message}`);
  return result;
}

// The accepted grammar, one row per form. Sources: IEC 60062:2016 clause 4 letter code (the letter
// stands where the decimal point would; R ×1, K ×10³, M ×10⁶) and clause 5 tolerance letters, as
// quoted in check-values.md §1 [STD][SEC]; "meg" for megohm in pre-1950 service data
// (check-values.md §5) [SEC]; SI prefixes and the ohm symbol (SI Brochure, 9th ed., 2019).
const GRAMMAR: ReadonlyArray<{ text: string; ohms: number; tol: number | null; display: string; code: string; source: string }> = [
  { text: '4k7', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'IEC 60062 cl. 4; lower-case k common on schematics (check-values §1)' },
  { text: '4K7', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'IEC 60062 cl. 4 example 4K7 = 4.7 kΩ' },
  { text: '4.7k', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'SI prefix k' },
  { text: '4,7 kΩ', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'decimal comma (SI Brochure 5.4.4), unambiguous with one digit after it' },
  { text: '4.7 kohm', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'unit name spelt out' },
  { text: '4.7 k ohms', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'unit name spelt out, plural' },
  { text: '4.7 kilohms', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'unit name spelt out' },
  { text: '470R', ohms: 470, tol: null, display: '470 Ω', code: '470R', source: 'IEC 60062 cl. 4 example 470R = 470 Ω' },
  { text: 'R47', ohms: 0.47, tol: null, display: '0.47 Ω', code: 'R47', source: 'IEC 60062 cl. 4 example R47 = 0.47 Ω' },
  { text: '4R7', ohms: 4.7, tol: null, display: '4.7 Ω', code: '4R7', source: 'IEC 60062 cl. 4 example 4R7 = 4.7 Ω' },
  { text: '0R22', ohms: 0.22, tol: null, display: '0.22 Ω', code: 'R22', source: 'IEC 60062 cl. 4 rule, leading zero written out' },
  { text: '4r7', ohms: 4.7, tol: null, display: '4.7 Ω', code: '4R7', source: 'IEC 60062 cl. 4 rule, lower-case r (common practice)' },
  { text: '1M2', ohms: 1_200_000, tol: null, display: '1.2 MΩ', code: '1M2', source: 'IEC 60062 cl. 4 rule' },
  { text: '2M2', ohms: 2_200_000, tol: null, display: '2.2 MΩ', code: '2M2', source: 'IEC 60062 cl. 4 example 2M2 = 2.2 MΩ' },
  { text: '1M0', ohms: 1_000_000, tol: null, display: '1 MΩ', code: '1M0', source: 'IEC 60062 cl. 4 example 1M0 = 1 MΩ' },
  { text: 'K47', ohms: 470, tol: null, display: '470 Ω', code: '470R', source: 'IEC 60062 cl. 4 rule applied with K in front [CALC]' },
  { text: '2.2 MΩ', ohms: 2_200_000, tol: null, display: '2.2 MΩ', code: '2M2', source: 'SI prefix M with the unit' },
  { text: '2.2 M\u2126', ohms: 2_200_000, tol: null, display: '2.2 MΩ', code: '2M2', source: 'U+2126 ohm sign, canonically the Greek omega (Unicode)' },
  { text: '470 ohm', ohms: 470, tol: null, display: '470 Ω', code: '470R', source: 'unit name spelt out' },
  { text: '470 Ohms', ohms: 470, tol: null, display: '470 Ω', code: '470R', source: 'unit name spelt out, any case' },
  { text: '470Ω', ohms: 470, tol: null, display: '470 Ω', code: '470R', source: 'SI symbol' },
  { text: '470', ohms: 470, tol: null, display: '470 Ω', code: '470R', source: 'a bare number is ohms (meter display)' },
  { text: '104.2', ohms: 104.2, tol: null, display: '104.2 Ω', code: '104R2', source: 'meter display; IEC 60062 cl. 4 rule for the code' },
  { text: '.47', ohms: 0.47, tol: null, display: '0.47 Ω', code: 'R47', source: 'leading point' },
  { text: '1e3', ohms: 1000, tol: null, display: '1 kΩ', code: '1K0', source: 'e-notation' },
  { text: '2 meg', ohms: 2_000_000, tol: null, display: '2 MΩ', code: '2M0', source: '"meg" for megohm, pre-1950 service data (check-values §5)' },
  { text: '2 Meg', ohms: 2_000_000, tol: null, display: '2 MΩ', code: '2M0', source: '"meg", any case (check-values §5)' },
  { text: '1 megohm', ohms: 1_000_000, tol: null, display: '1 MΩ', code: '1M0', source: 'unit name spelt out' },
  { text: '½ meg', ohms: 500_000, tol: null, display: '500 kΩ', code: '500K', source: 'vulgar fraction with "meg" (check-values §5)' },
  { text: '1/2 meg', ohms: 500_000, tol: null, display: '500 kΩ', code: '500K', source: 'fraction written with a slash' },
  { text: '1½ meg', ohms: 1_500_000, tol: null, display: '1.5 MΩ', code: '1M5', source: 'whole number and a vulgar fraction' },
  { text: '¼ MΩ', ohms: 250_000, tol: null, display: '250 kΩ', code: '250K', source: 'vulgar fraction with a unit' },
  { text: '47K', ohms: 47_000, tol: null, display: '47 kΩ', code: '47K', source: 'DESIGN §3.1: a multiplier letter completes the value' },
  { text: '220K', ohms: 220_000, tol: null, display: '220 kΩ', code: '220K', source: 'integer mantissa: no 220000.00000000003' },
  { text: '0.22M', ohms: 220_000, tol: null, display: '220 kΩ', code: '220K', source: 'integer mantissa: 0.22 × 10⁶ exactly 220000' },
  { text: '4K7J', ohms: 4700, tol: 5, display: '4.7 kΩ ±5 %', code: '4K7J', source: 'IEC 60062 cl. 5: J ±5 % (check-values §1 example 4K7J)' },
  { text: '47KK', ohms: 47_000, tol: 10, display: '47 kΩ ±10 %', code: '47KK', source: 'IEC 60062 cl. 5: K ±10 % after a complete value' },
  { text: '1M0M', ohms: 1_000_000, tol: 20, display: '1 MΩ ±20 %', code: '1M0M', source: 'IEC 60062 cl. 5: M ±20 %' },
  { text: '33KG', ohms: 33_000, tol: 2, display: '33 kΩ ±2 %', code: '33KG', source: 'IEC 60062 cl. 5: G ±2 % after a complete value (DESIGN §3.1)' },
  { text: '100RF', ohms: 100, tol: 1, display: '100 Ω ±1 %', code: '100RF', source: 'IEC 60062 cl. 5: F ±1 %' },
  { text: '470 Ω K', ohms: 470, tol: 10, display: '470 Ω ±10 %', code: '470RK', source: 'IEC 60062 cl. 5 after a value completed by its unit' },
  { text: '4.7k ±10%', ohms: 4700, tol: 10, display: '4.7 kΩ ±10 %', code: '4K7K', source: 'tolerance written as a percentage' },
  { text: '470 +/-5 %', ohms: 470, tol: 5, display: '470 Ω ±5 %', code: '470RJ', source: 'tolerance written as a percentage' },
  { text: '68K 3%', ohms: 68_000, tol: 3, display: '68 kΩ ±3 %', code: '68K', source: 'a tolerance with no IEC 60062 letter keeps no letter in the code' },
  { text: '4K7 Ω', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'letter code followed by the unit' },
  { text: '2M2 ohm', ohms: 2_200_000, tol: null, display: '2.2 MΩ', code: '2M2', source: 'letter code followed by the unit' },
  { text: '1E6', ohms: 1_000_000, tol: null, display: '1 MΩ', code: '1M0', source: 'e-notation, upper-case E' },
  { text: '  4k7  ', ohms: 4700, tol: null, display: '4.7 kΩ', code: '4K7', source: 'surrounding spaces ignored' },
  { text: '0', ohms: 0, tol: null, display: '0 Ω', code: '0R', source: 'a zero reading is a value; the verdict decides' },
];

describe('parseResistance: the accepted grammar', () => {
  for (const row of GRAMMAR) {
    it(`reads '${row.text}' as ${row.display} (${row.source})`, () => {
      const r = accepted(parseResistance(row.text));
      expect(r.state).toBe('value');
      expect(r.ohms).toBe(row.ohms);
      expect(r.tolerancePct).toBe(row.tol);
      expect(r.display).toBe(row.display);
      expect(r.code).toBe(row.code);
      expect(r.warnings).toEqual([]);
    });
  }
});

describe('parseResistance: reading states', () => {
  // DESIGN §2 "reading state"; OL is the over-range display of digital meters (check-values §5, meter manuals [SEC]).
  const STATES: ReadonlyArray<[string, ReadingState, string]> = [
    ['OL', 'over-range', 'OL'],
    ['ol', 'over-range', 'OL'],
    ['O.L.', 'over-range', 'OL'],
    ['open', 'open', 'open'],
    ['Open', 'open', 'open'],
    ['∞', 'open', 'open'],
    ['∞ Ω', 'open', 'open'],
    ['inf', 'open', 'open'],
    ['short', 'short', 'short'],
    ['climbing', 'climbing', 'climbing'],
    ['unstable', 'unstable', 'unstable'],
    ['no access', 'no-access', 'no access'],
  ];
  for (const [text, state, display] of STATES) {
    it(`reads '${text}' as the state ${state}, with no ohms`, () => {
      const r = accepted(parseResistance(text));
      expect(r.state).toBe(state);
      expect(r.ohms).toBeNull();
      expect(r.display).toBe(display);
      expect(r.code).toBe(state);
    });
  }
});

describe('parseResistance: refusals, each beside a twin that parses', () => {
  // [refused text, what the message must say, accepted twin, its ohms]
  const REFUSED: ReadonlyArray<[string, RegExp, string, number]> = [
    ['', /empty/, '0', 0],
    ['   ', /empty/, '470', 470],
    ['-470', /cannot be negative/, '470', 470],
    ['4kk7', /two multiplier letters/, '4k7', 4700], // IEC 60062 cl. 4: one letter per code
    ['4KK7', /two multiplier letters/, '4K7', 4700],
    ['4m7', /milli/, '4M7', 4_700_000], // SI: m is milli; IEC 60062 uses upper-case M (check-values §1)
    ['2.2m', /milli/, '2.2M', 2_200_000],
    ['2.2 mΩ', /milli/, '2.2 MΩ', 2_200_000],
    ['1,500', /thousands separator.*decimal comma/, '1,5 kΩ', 1500], // check-values §2: 1,500 ambiguous
    ['1,500,000', /thousands separator/, '1500000', 1_500_000],
    ['1.500.000', /more than one decimal point/, '1.5M', 1_500_000],
    ['4.7uF', /not a unit of resistance/, '4.7k', 4700], // µF is capacitance
    ['4.7 µF', /not a unit of resistance/, '4.7 kΩ', 4700],
    ['10 mfd', /mfd/, '10 meg', 10_000_000], // mfd = µF in old service data (check-values §5)
    ['250 mmfd', /not a unit of resistance/, '250 ohm', 250], // mmfd = pF (check-values §5)
    ['250V', /not a unit of resistance/, '250R', 250],
    ['4.7 kV', /not a unit of resistance/, '4.7 kΩ', 4700],
    ['47J', /only a complete value/, '47KJ', 47_000], // DESIGN §3.1: tolerance only after a complete value
    ['47F', /farad/, '47RF', 47],
    ['4k7j', /upper case/, '4k7J', 4700],
    ['4K7X', /not a tolerance letter/, '4K7K', 4700],
    ['½', /fraction needs a multiplier/, '½ meg', 500_000],
    ['4K7J ±5%', /two tolerances/, '4K7 ±5%', 4700],
    ['4.7 µΩ', /micro/, '4.7 Ω', 4.7],
    ['hello', /not a resistance/, 'open', NaN],
    ['1e3k', /e-notation and a multiplier/, '1e3', 1000],
    ['4.7 kΩ?', /not part of a resistance value/, '4.7 kΩ', 4700],
  ];
  for (const [text, reason, twin, twinOhms] of REFUSED) {
    it(`refuses '${text}' (${reason.source}) but reads '${twin}'`, () => {
      const r = parseResistance(text);
      expect(r.ok).toBeFalse();
      if (!r.ok) {
        expect(r.input).toBe(text);
        expect(r.message).toMatch(reason);
        if (text.trim() !== '') expect(r.message).toContain(`'${text}'`);
      }
      const t = accepted(parseResistance(twin));
      if (Number.isNaN(twinOhms)) expect(t.state).not.toBe('value');
      else expect(t.ohms).toBe(twinOhms);
    });
  }
});

describe('parseResistance: small negative readings', () => {
  // DESIGN §3.1: a small negative within lead resistance plus resolution is a short, with a note.
  it('takes −0.2 as a short when leads 0.15 Ω plus resolution 0.1 Ω allow it', () => {
    const r = accepted(parseResistance('-0.2', { leadOhms: 0.15, resolutionOhms: 0.1 }));
    expect(r.state).toBe('short');
    expect(r.ohms).toBeNull();
    expect(r.notes.length).toBe(1);
    expect(r.notes[0]).toContain('short');
  });
  it('takes the minus sign U+2212 the same way', () => {
    expect(accepted(parseResistance('\u22120.1', { leadOhms: 0.1 })).state).toBe('short');
  });
  it('refuses −0.5 beyond the same allowance', () => {
    const r = parseResistance('-0.5', { leadOhms: 0.15, resolutionOhms: 0.1 });
    expect(r.ok).toBeFalse();
    if (!r.ok) expect(r.message).toMatch(/beyond lead resistance plus resolution/);
  });
  it('refuses −0.2 without a meter profile, and reads +0.2 as a value', () => {
    expect(parseResistance('-0.2').ok).toBeFalse();
    expect(accepted(parseResistance('+0.2')).ohms).toBe(0.2);
  });
});

describe('parseResistance: a bare M in old service data', () => {
  // check-values §5: pre-1950 service data sometimes writes M for thousand [SEC].
  it('warns on 500M dated 1938, still reading it as mega', () => {
    const r = accepted(parseResistance('500M', { serviceDataYear: 1938 }));
    expect(r.ohms).toBe(500_000_000);
    expect(r.warnings.length).toBe(1);
    expect(r.warnings[0]).toContain('thousand');
    expect(r.warnings[0]).toContain('500 kΩ');
  });
  it('does not warn on 500M dated 1955', () => {
    expect(accepted(parseResistance('500M', { serviceDataYear: 1955 })).warnings).toEqual([]);
  });
  it('warns on the letter code 1M2 dated 1938, but not on 1M2 Ω', () => {
    expect(accepted(parseResistance('1M2', { serviceDataYear: 1938 })).warnings.length).toBe(1);
    expect(accepted(parseResistance('1M2 Ω', { serviceDataYear: 1938 })).warnings).toEqual([]);
  });
  it('does not warn on "2 meg" or "2.2 MΩ" dated 1938: the unit is explicit', () => {
    expect(accepted(parseResistance('2 meg', { serviceDataYear: 1938 })).warnings).toEqual([]);
    expect(accepted(parseResistance('2.2 MΩ', { serviceDataYear: 1938 })).warnings).toEqual([]);
  });
  it('warns on a value in gigaohms (a G that was meant as a tolerance letter)', () => {
    const r = accepted(parseResistance('33G'));
    expect(r.ohms).toBe(33e9);
    expect(r.warnings.length).toBe(1);
    expect(accepted(parseResistance('33KG')).warnings).toEqual([]);
  });
});

describe('formatOhms and formatCode', () => {
  // IEC 60062 cl. 4 codes (check-values §1) and the technician's written form.
  const ROWS: ReadonlyArray<[number, string, string]> = [
    [0.47, '0.47 Ω', 'R47'], // IEC 60062 example R47
    [4.7, '4.7 Ω', '4R7'], // IEC 60062 example 4R7
    [1, '1 Ω', '1R0'],
    [10, '10 Ω', '10R'],
    [470, '470 Ω', '470R'], // IEC 60062 example 470R
    [1000, '1 kΩ', '1K0'],
    [4700, '4.7 kΩ', '4K7'], // IEC 60062 example 4K7
    [4750, '4.75 kΩ', '4K75'], // E96 value, IEC 60063
    [100_000, '100 kΩ', '100K'],
    [1_000_000, '1 MΩ', '1M0'], // IEC 60062 example 1M0
    [2_200_000, '2.2 MΩ', '2M2'], // IEC 60062 example 2M2
    [220000.00000000003, '220 kΩ', '220K'], // float artefact cleaned (check-values §2)
    [0.1 + 0.2, '0.3 Ω', 'R3'], // 0.30000000000000004 cleaned
    [999_999.9999999999, '1 MΩ', '1M0'], // rounds into the next prefix, not '1000 kΩ'
  ];
  for (const [ohms, display, code] of ROWS) {
    it(`writes ${ohms} Ω as '${display}' and '${code}', and both read back`, () => {
      expect(formatOhms(ohms)).toBe(display);
      expect(formatCode(ohms)).toBe(code);
      expect(accepted(parseResistance(display)).ohms).toBeCloseTo(ohms, 6);
      expect(accepted(parseResistance(code)).ohms).toBeCloseTo(ohms, 6);
    });
  }
  it('refuses to format a negative or non-finite value, and formats zero', () => {
    expect(() => formatOhms(-1)).toThrowError(RangeError);
    expect(() => formatCode(Number.NaN)).toThrowError(RangeError);
    expect(formatOhms(0)).toBe('0 Ω');
  });
});
