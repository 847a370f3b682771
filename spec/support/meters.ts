import type { MeterProfile } from '../../api/domain/meter';

/**
 * The worked meter of check-values §3 [CALC]: a 2000-count meter, ranges 200 Ω / 2 k / 20 k /
 * 200 k / 2000 k (full scale = the largest displayable value), resolutions 0.1 / 1 / 10 / 100 /
 * 1000 Ω, ±(0.8 % + 2) and ±(1 % + 2) on 2000 k. Lead resistance 0 so that the worked values
 * hold as printed.
 */
export function workedMeter(extra: { autorange?: boolean; leadOhms?: number } = {}): MeterProfile {
  return {
    kind: 'digital',
    autorange: extra.autorange ?? false,
    leadOhms: extra.leadOhms ?? 0,
    ranges: [
      { fullScaleOhms: 199.9, resolutionOhms: 0.1, pctOfReading: 0.8, counts: 2 },
      { fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 0.8, counts: 2 },
      { fullScaleOhms: 19_990, resolutionOhms: 10, pctOfReading: 0.8, counts: 2 },
      { fullScaleOhms: 199_900, resolutionOhms: 100, pctOfReading: 0.8, counts: 2 },
      { fullScaleOhms: 1_999_000, resolutionOhms: 1000, pctOfReading: 1, counts: 2 },
    ],
  };
}

/** The analogue ohmmeter of check-values §3 [CALC]: centre value 10 kΩ, arc error 3 % of full arc (×1 k range), plus a ×10 and a ×100 range. */
export function analogueMeter(): MeterProfile {
  return {
    kind: 'analogue',
    leadOhms: 0,
    ranges: [
      { centreOhms: 10, arcFraction: 0.03 },
      { centreOhms: 10_000, arcFraction: 0.03 },
      { centreOhms: 1_000_000, arcFraction: 0.03 },
    ],
  };
}
