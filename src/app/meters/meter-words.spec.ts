import { rangesText } from './meter-words';

describe('rangesText', () => {
  it('sums up digital and analogue ranges', () => {
    expect(
      rangesText({ kind: 'digital', autorange: true, leadOhms: 0.2, ranges: [{ fullScaleOhms: 199.9, resolutionOhms: 0.1, pctOfReading: 0.8, counts: 2 }, { fullScaleOhms: 1999000, resolutionOhms: 1000, pctOfReading: 1, counts: 2 }] }),
    ).toBe('2 ranges, 199.9 Ω … 1.999 MΩ, ±(0.8 % + 2), autorange');
    expect(rangesText({ kind: 'analogue', leadOhms: 0, ranges: [{ centreOhms: 10, arcFraction: 0.03 }] })).toBe('1 range, centre 10 Ω … 10 Ω, 3 % of arc');
  });
});
