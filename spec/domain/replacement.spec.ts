import { replacementValue, type ReplacementInput } from '../../api/domain/replacement';
import type { ComponentKind } from '../../api/domain/words';

const band = (nominal: number, lowPct: number, highPct: number) => ({
  lowOhms: (nominal * (100 + lowPct)) / 100,
  highOhms: (nominal * (100 + highPct)) / 100,
});

describe('replacementValue', () => {
  // Nearest values from the IEC 60063 tables (check-values §2 table and the |ln(x/v)| rule), deviation [CALC].
  // [input, ohms, deviation %, in band, pick, source]
  const ROWS: ReadonlyArray<[ReplacementInput, number, number, boolean, string, string]> = [
    [{ nominalOhms: 50_000, band: band(50_000, -10, 10), kind: 'carbon-composition' }, 51_000, 2, true, 'nearest', 'check-values §2: 50 kΩ → 51 k in E24 (the default series)'],
    [{ nominalOhms: 50_000, band: band(50_000, -10, 10), series: 'E12', kind: 'carbon-composition' }, 47_000, -6, true, 'nearest', 'check-values §2: 50 kΩ → 47 k in E12'],
    [{ nominalOhms: 35_000, band: band(35_000, -5, 5), kind: 'carbon-film' }, 36_000, (1000 * 100) / 35_000, true, 'nearest', 'check-values §2: 35 kΩ → 36 k in E24'],
    [{ nominalOhms: 2000, band: band(2000, -1, 1), kind: 'metal-film' }, 2000, 0, true, 'nearest', 'check-values §2: 2 000 Ω is E24'],
    [{ nominalOhms: 50_000, band: band(50_000, -5, 5), series: 'E6', kind: 'carbon-composition' }, 47_000, -6, false, 'nearest', 'E6 has 47 k and 68 k only: both outside ±5 %'],
    [{ nominalOhms: 4750, band: band(4750, -1, 1), kind: 'metal-film' }, 4700, (-50 * 100) / 4750, false, 'nearest', 'E24 4.7 k is −1.05 %: outside a ±1 % critical band'],
    [{ nominalOhms: 4750, band: band(4750, -1, 1), series: 'E96', kind: 'metal-film' }, 4750, 0, true, 'nearest', 'E96 carries 4.75 (IEC 60063)'],
    [{ nominalOhms: 4750, band: band(4750, -1, 10), kind: 'carbon-film' }, 5100, (350 * 100) / 4750, true, 'in-band-neighbour', 'asymmetric band: 4.7 k out, 5.1 k in'],
    [{ nominalOhms: 0.47, band: band(0.47, -5, 5), kind: 'wirewound' }, 0.47, 0, true, 'nearest', 'E24 first decade, a 0.47 Ω wirewound part'],
  ];
  for (const [input, ohms, dev, inBand, pick, source] of ROWS) {
    it(`replaces ${input.nominalOhms} Ω (${input.series ?? 'E24'}) with ${ohms} Ω (${source})`, () => {
      const r = replacementValue(input);
      expect(r).not.toBeNull();
      expect(r!.ohms).toBe(ohms);
      expect(r!.deviationPct).toBeCloseTo(dev, 10);
      expect(r!.inBand).toBe(inBand);
      expect(r!.series).toBe(input.series ?? 'E24');
      expect(r!.pick).toBe(pick);
    });
  }

  // DESIGN §3.7: no suggestion for windings, heaters, lamps, pots; nor for the other non-resistor kinds.
  const NONE: readonly ComponentKind[] = ['winding', 'heater', 'lamp', 'pot', 'ballast', 'thermistor', 'fuse', 'capacitor', 'rectifier'];
  for (const kind of NONE) {
    it(`gives no value for a ${kind}, and one for a carbon-composition part of the same nominal`, () => {
      const input = { nominalOhms: 300, band: band(300, -20, 20), kind };
      expect(replacementValue(input)).toBeNull();
      expect(replacementValue({ ...input, kind: 'carbon-composition' })!.ohms).toBe(300);
    });
  }

  it('refuses a nominal of zero or a band without the nominal, and accepts their corrected twins', () => {
    expect(() => replacementValue({ nominalOhms: 0, band: { lowOhms: 0, highOhms: 1 }, kind: 'carbon-film' })).toThrowError(RangeError, /above zero/);
    expect(() => replacementValue({ nominalOhms: 1000, band: { lowOhms: 1100, highOhms: 1200 }, kind: 'carbon-film' })).toThrowError(RangeError, /does not contain/);
    expect(replacementValue({ nominalOhms: 1000, band: { lowOhms: 900, highOhms: 1100 }, kind: 'carbon-film' })!.ohms).toBe(1000);
  });
});
