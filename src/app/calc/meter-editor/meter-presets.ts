import type { MeterProfile } from '@domain/meter';

export interface MeterPreset {
  readonly id: 'digital-2000' | 'analogue-20k';
  readonly label: string;
  readonly profile: MeterProfile;
}

/**
 * Two ready profiles to start from (the user edits them to match their own meter).
 * - A typical 2000-count handheld with manual ranges: the ranges, resolutions and ±(0.8 % + 2),
 *   ±(1 % + 2) on 2000 k, of check-values.md §3 (the worked meter, from handheld meter manuals);
 *   full scale is the largest displayable value (1999 counts). Lead resistance 0.2 Ω: test leads
 *   add about 0.1–0.2 Ω (check-values.md §3).
 * - A 20 kΩ/V-style analogue multimeter, R×1 … R×10k: centre values 10 Ω … 100 kΩ and an arc
 *   error of 3 % of full arc (check-values.md §3 uses Rc = 10 kΩ, 3 %); the other centre values
 *   are typical of the class, from memory, not from any one instrument.
 */
export const METER_PRESETS: readonly MeterPreset[] = [
  {
    id: 'digital-2000',
    label: '2000-count handheld (digital, manual ranges)',
    profile: {
      kind: 'digital',
      autorange: false,
      leadOhms: 0.2,
      ranges: [
        { fullScaleOhms: 199.9, resolutionOhms: 0.1, pctOfReading: 0.8, counts: 2 },
        { fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 0.8, counts: 2 },
        { fullScaleOhms: 19990, resolutionOhms: 10, pctOfReading: 0.8, counts: 2 },
        { fullScaleOhms: 199900, resolutionOhms: 100, pctOfReading: 0.8, counts: 2 },
        { fullScaleOhms: 1999000, resolutionOhms: 1000, pctOfReading: 1, counts: 2 },
      ],
    },
  },
  {
    id: 'analogue-20k',
    label: '20 kΩ/V-style analogue (R×1 … R×10k)',
    profile: {
      kind: 'analogue',
      leadOhms: 0.3,
      ranges: [
        { centreOhms: 10, arcFraction: 0.03 },
        { centreOhms: 100, arcFraction: 0.03 },
        { centreOhms: 1000, arcFraction: 0.03 },
        { centreOhms: 10000, arcFraction: 0.03 },
        { centreOhms: 100000, arcFraction: 0.03 },
      ],
    },
  },
];
