import type { VerdictResult } from '@domain/verdict';
import { ohmsText } from '../calc-format';

/** Geometry of the band drawn to scale (SVG user units). */
export interface BandBarModel {
  readonly width: number;
  readonly band: { x: number; w: number; lowLabel: string; highLabel: string; lowX: number; highX: number };
  readonly nearZones: readonly { x: number; w: number }[];
  readonly guardZones: readonly { x: number; w: number }[];
  readonly acceptanceX: readonly number[];
  readonly nominalX: number;
  readonly reading: { x: number; label: string; bar: { x1: number; x2: number } | null; labelAnchor: 'start' | 'middle' | 'end' } | null;
  readonly description: string;
}

export const BAR_WIDTH = 600;
const MARGIN = 36;

/**
 * Lays the band out to scale: the band's limits, the near-limit zones, the guard band (between
 * the acceptance and rejection limits, under `guarded`), the nominal, and the reading with its ±U.
 * Null where there is nothing to scale (an expected `open` or `short`, or a band without an upper limit).
 */
export function bandBarModel(result: VerdictResult): BandBarModel | null {
  const e = result.explanation;
  const expected = e.expected;
  const band = result.band;
  if (typeof expected !== 'number' || band.highOhms === null) return null;
  const y = e.correctedOhms;
  const U = result.uncertaintyOhms;
  const guard = e.guard;
  const values = [band.lowOhms, band.highOhms, expected];
  if (y !== null) values.push(y, y - (U ?? 0), y + (U ?? 0));
  if (guard) for (const v of [guard.rejectionLowOhms, guard.rejectionHighOhms, guard.acceptanceLowOhms, guard.acceptanceHighOhms]) if (v !== null) values.push(v);
  let lo = Math.min(...values);
  let hi = Math.max(...values);
  const pad = (hi - lo) * 0.08 || expected * 0.05;
  lo = Math.max(0, lo - pad);
  hi = hi + pad;
  const x = (v: number) => MARGIN + ((v - lo) / (hi - lo)) * (BAR_WIDTH - 2 * MARGIN);
  const span = (a: number, b: number) => ({ x: x(Math.min(a, b)), w: Math.abs(x(b) - x(a)) });

  const nearZones: { x: number; w: number }[] = [];
  if (e.nearLimit) {
    nearZones.push(span(band.lowOhms, e.nearLimit.lowOhms), span(e.nearLimit.highOhms, band.highOhms));
  }
  const guardZones: { x: number; w: number }[] = [];
  const acceptanceX: number[] = [];
  if (guard && !guard.acceptanceZoneEmpty) {
    if (guard.rejectionLowOhms !== null && guard.acceptanceLowOhms !== null) {
      guardZones.push(span(guard.rejectionLowOhms, guard.acceptanceLowOhms));
      acceptanceX.push(x(guard.acceptanceLowOhms));
    }
    if (guard.rejectionHighOhms !== null && guard.acceptanceHighOhms !== null) {
      guardZones.push(span(guard.acceptanceHighOhms, guard.rejectionHighOhms));
      acceptanceX.push(x(guard.acceptanceHighOhms));
    }
  } else if (guard) {
    guardZones.push(span(band.lowOhms, band.highOhms));
  }

  let reading: BandBarModel['reading'] = null;
  if (y !== null) {
    const rx = x(y);
    reading = {
      x: rx,
      label: U === null ? ohmsText(y) : `${ohmsText(y)} ± ${ohmsText(U, 3)}`,
      bar: U === null ? null : { x1: x(Math.max(0, y - U)), x2: x(y + U) },
      labelAnchor: rx < BAR_WIDTH * 0.2 ? 'start' : rx > BAR_WIDTH * 0.8 ? 'end' : 'middle',
    };
  }

  const words: string[] = [`Band ${ohmsText(band.lowOhms)} to ${ohmsText(band.highOhms)} around the nominal ${ohmsText(expected)}.`];
  if (e.nearLimit) words.push(`Near-limit zones below ${ohmsText(e.nearLimit.lowOhms)} and above ${ohmsText(e.nearLimit.highOhms)}.`);
  if (guard && guard.acceptanceZoneEmpty) words.push('Guard band: the acceptance zone is empty, this meter cannot decide this band.');
  else if (guard && guard.acceptanceLowOhms !== null) {
    words.push(
      `Guard band: accepted from ${ohmsText(guard.acceptanceLowOhms)}${guard.acceptanceHighOhms !== null ? ` to ${ohmsText(guard.acceptanceHighOhms)}` : ' up'}` +
        `, rejected below ${ohmsText(guard.rejectionLowOhms ?? 0)}${guard.rejectionHighOhms !== null ? ` or above ${ohmsText(guard.rejectionHighOhms)}` : ''}.`,
    );
  }
  if (y !== null) {
    const where = y < band.lowOhms ? 'below the band' : y > band.highOhms ? 'above the band' : 'inside the band';
    words.push(U === null ? `Reading ${ohmsText(y)}, ${where}; no uncertainty known.` : `Reading ${ohmsText(y)} with U = ± ${ohmsText(U, 3)} (k = 2), ${where}.`);
  } else {
    words.push(`Reading: ${e.readingState}, judged by its state.`);
  }

  return {
    width: BAR_WIDTH,
    band: { ...span(band.lowOhms, band.highOhms), lowLabel: ohmsText(band.lowOhms), highLabel: ohmsText(band.highOhms), lowX: x(band.lowOhms), highX: x(band.highOhms) },
    nearZones,
    guardZones,
    acceptanceX,
    nominalX: x(expected),
    reading,
    description: words.join(' '),
  };
}
