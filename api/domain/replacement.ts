/**
 * Replacement value (DESIGN.md §3.7): the value to order from the series the user stocks
 * (default E24, the ±5 % series of IEC 60063), its deviation from the nominal, and whether it
 * sits inside the part's band (the caller passes the band that applies: the tighter one for
 * critical or matched positions).
 *
 * The pick is the nearest series value (preferred-values.ts: least |ln(x/v)|, the higher on a
 * tie). When that one falls outside the band but its neighbour on the other side of the nominal
 * falls inside (an asymmetric band), the neighbour is taken and `pick` says so.
 *
 * No suggestion (null) for windings, heaters, lamps and pots (DESIGN.md §3.7), nor for the other
 * kinds that are not fixed resistors (ballast, thermistor, fuse, capacitor, rectifier): an
 * E-series value means nothing for them.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { preferred, type SeriesName } from './preferred-values';
import type { ComponentKind } from './words';

/** Kinds that get an E-series replacement value: fixed resistors. */
export const REPLACEABLE_BY_VALUE_KINDS: readonly ComponentKind[] = [
  'carbon-composition',
  'carbon-film',
  'metal-film',
  'wirewound',
];

export interface ReplacementInput {
  nominalOhms: number;
  band: { lowOhms: number; highOhms: number };
  series?: SeriesName;
  kind: ComponentKind;
}

export interface Replacement {
  ohms: number;
  /** (ohms − nominal) / nominal × 100. */
  deviationPct: number;
  inBand: boolean;
  series: SeriesName;
  /** `nearest`, or `in-band-neighbour` when the nearest value lies outside the band and its neighbour inside. */
  pick: 'nearest' | 'in-band-neighbour';
}

export function replacementValue({ nominalOhms, band, series = 'E24', kind }: ReplacementInput): Replacement | null {
  if (!REPLACEABLE_BY_VALUE_KINDS.includes(kind)) return null;
  if (!Number.isFinite(nominalOhms) || nominalOhms <= 0) {
    throw new RangeError(`a replacement value needs a nominal above zero, not ${String(nominalOhms)}`);
  }
  if (!(band.lowOhms <= nominalOhms && nominalOhms <= band.highOhms)) {
    throw new RangeError(`the band ${band.lowOhms}…${band.highOhms} Ω does not contain the nominal ${nominalOhms} Ω`);
  }
  const { nearest, below, above } = preferred(nominalOhms, series);
  const inside = (v: number): boolean => band.lowOhms <= v && v <= band.highOhms;
  let ohms = nearest;
  let pick: Replacement['pick'] = 'nearest';
  if (!inside(nearest)) {
    const other = nearest === below ? above : below;
    if (inside(other)) {
      ohms = other;
      pick = 'in-band-neighbour';
    }
  }
  return { ohms, deviationPct: ((ohms - nominalOhms) * 100) / nominalOhms, inBand: inside(ohms), series, pick };
}
