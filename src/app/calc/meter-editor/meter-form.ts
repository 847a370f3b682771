import type { MeterProfile } from '@domain/meter';
import { meterProblems, rangeTopOhms } from '@domain/meter';
import { parseResistance } from '@domain/notation';
import { ohmsText } from '../calc-format';
import { parsePlainNumber } from '../calc-format';

/** The meter the user chose, with the range the reading was taken on (absent: inferred from the reading). */
export interface MeterChoice {
  readonly meter: MeterProfile;
  readonly rangeIndex?: number;
}

/** The meter form's raw value: ohms as typed, percentages as typed. */
export interface MeterFormValue {
  use: boolean;
  kind: 'digital' | 'analogue';
  autorange: boolean;
  lead: string;
  digital: { fullScale: string; resolution: string; pct: string; counts: string }[];
  analogue: { centre: string; arcPct: string }[];
  /** −1: inferred from the reading. */
  rangeIndex: number;
}

const ohms = (text: string): number => {
  const p = parseResistance(text);
  return p.ok && p.state === 'value' && p.ohms !== null ? p.ohms : Number.NaN;
};
const num = (text: string): number => parsePlainNumber(text) ?? Number.NaN;

/** The form as a profile, or null when it is switched off or not usable (the fields say why). */
export function meterChoiceOf(v: MeterFormValue): MeterChoice | null {
  if (!v.use) return null;
  const leadOhms = v.lead.trim() === '' ? 0 : ohms(v.lead);
  const meter: MeterProfile =
    v.kind === 'digital'
      ? {
          kind: 'digital',
          autorange: v.autorange,
          leadOhms,
          ranges: v.digital.map((r) => ({ fullScaleOhms: ohms(r.fullScale), resolutionOhms: ohms(r.resolution), pctOfReading: num(r.pct), counts: num(r.counts) })),
        }
      : { kind: 'analogue', leadOhms, ranges: v.analogue.map((r) => ({ centreOhms: ohms(r.centre), arcFraction: num(r.arcPct) / 100 })) };
  if (meterProblems(meter).length > 0) return null;
  const autorange = meter.kind === 'digital' && meter.autorange;
  return v.rangeIndex >= 0 && v.rangeIndex < meter.ranges.length && !autorange ? { meter, rangeIndex: v.rangeIndex } : { meter };
}

/** The form's value for a profile (a preset or a profile being edited). */
export function meterFormValueOf(profile: MeterProfile): Omit<MeterFormValue, 'use' | 'rangeIndex'> {
  const text = (x: number) => String(Number(x.toPrecision(12)));
  return profile.kind === 'digital'
    ? {
        kind: 'digital',
        autorange: profile.autorange ?? false,
        lead: text(profile.leadOhms),
        digital: profile.ranges.map((r) => ({ fullScale: ohmsText(r.fullScaleOhms, 6), resolution: ohmsText(r.resolutionOhms, 6), pct: text(r.pctOfReading), counts: text(r.counts) })),
        analogue: [],
      }
    : {
        kind: 'analogue',
        autorange: false,
        lead: text(profile.leadOhms),
        digital: [],
        analogue: profile.ranges.map((r) => ({ centre: ohmsText(r.centreOhms, 6), arcPct: text(r.arcFraction * 100) })),
      };
}

/** A short name for a range: `range 3, up to 19.99 kΩ` or `range 4, centre 10 kΩ`. */
export function rangeLabel(meter: MeterProfile, index: number): string {
  if (meter.kind === 'digital') return `range ${index + 1}, up to ${ohmsText(rangeTopOhms(meter, index), 6)}`;
  return `range ${index + 1}, centre ${ohmsText(meter.ranges[index].centreOhms, 6)}`;
}
