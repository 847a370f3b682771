import { COLOURS, ColourCodeError, decodeBands, type Colour } from '@domain/colour-code';
import { formatOhms, parseResistance } from '@domain/notation';
import type { Nominal } from '@domain/template-format';

/** What the author typed as a nominal, read: the nominal, how it shows, a tolerance it carried. */
export type NominalEntry =
  | { ok: true; nominal: Nominal; display: string; tolerancePct: number | null; warnings: string[] }
  | { ok: false; message: string };

/** Short colour names as people write them on a parts list (`yel vio yel sil`). */
const COLOUR_ALIASES: Readonly<Record<string, Colour>> = {
  blk: 'black',
  bk: 'black',
  brn: 'brown',
  br: 'brown',
  rd: 'red',
  org: 'orange',
  or: 'orange',
  yel: 'yellow',
  ye: 'yellow',
  grn: 'green',
  gn: 'green',
  blu: 'blue',
  bl: 'blue',
  vio: 'violet',
  vi: 'violet',
  purple: 'violet',
  gry: 'grey',
  gy: 'grey',
  gray: 'grey',
  wht: 'white',
  wh: 'white',
  gld: 'gold',
  au: 'gold',
  sil: 'silver',
  ag: 'silver',
  pnk: 'pink',
};

/** `yellow violet yellow silver`, `yel-vio-yel-sil` → colours; null when the text is not all colour words. */
export function colourWords(text: string): Colour[] | null {
  const words = text.trim().toLowerCase().split(/[\s,/-]+/).filter((w) => w !== '');
  if (words.length < 3 || words.length > 6) return null;
  const out: Colour[] = [];
  for (const w of words) {
    const c = (COLOURS as readonly string[]).includes(w) ? (w as Colour) : COLOUR_ALIASES[w];
    if (c === undefined) return null;
    out.push(c);
  }
  return out;
}

/**
 * Reads a nominal as typed: a value (`470k`, `4K7`, `2.2 MΩ`, `½ meg` — api/domain/notation.ts),
 * colour bands (`yellow violet yellow silver`, IEC 60062 via api/domain/colour-code.ts), or the
 * states `open` / `short`. The text is kept with the value (`{ ohms, text }`).
 */
export function readNominal(text: string, serviceDataYear?: number): NominalEntry {
  const typed = text.trim();
  if (typed === '') return { ok: false, message: 'Enter the nominal: a value (470k, 4K7), colour bands, open or short.' };
  const bands = colourWords(typed);
  if (bands !== null) {
    try {
      const d = decodeBands(bands);
      return { ok: true, nominal: { ohms: d.ohms, text: typed.slice(0, 40) }, display: `${formatOhms(d.ohms)} ±${d.tolerancePct} % (colour bands)`, tolerancePct: d.tolerancePct, warnings: [] };
    } catch (e) {
      return { ok: false, message: e instanceof ColourCodeError ? `'${typed}': ${e.message}` : `'${typed}': not a colour code.` };
    }
  }
  const r = parseResistance(typed, serviceDataYear === undefined ? {} : { serviceDataYear });
  if (!r.ok) return { ok: false, message: r.message };
  if (r.state === 'open' || r.state === 'short') return { ok: true, nominal: { state: r.state }, display: r.state, tolerancePct: null, warnings: r.warnings };
  if (r.state !== 'value' || r.ohms === null) return { ok: false, message: `'${typed}' is a reading state (${r.display}), not a nominal: enter a value, open or short.` };
  if (!(r.ohms > 0)) return { ok: false, message: `'${typed}': a nominal of 0 Ω is written 'short'.` };
  return { ok: true, nominal: { ohms: r.ohms, text: typed.slice(0, 40) }, display: r.display, tolerancePct: r.tolerancePct, warnings: r.warnings };
}

/** The text to show in the nominal field for a stored nominal. */
export function nominalText(n: Nominal): string {
  if ('state' in n) return n.state;
  return n.text ?? formatOhms(n.ohms);
}

/** How a nominal or expected value shows: `470 kΩ`, `open`, `short`. */
export function showValue(v: Nominal | { ohms: number } | { state: 'open' | 'short' } | null): string {
  if (v === null) return '—';
  return 'state' in v ? v.state : formatOhms(v.ohms);
}
