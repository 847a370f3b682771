/**
 * Resistance notation (DESIGN.md §3.1): parse what people type at the bench or read in service
 * data, and format a value back the way a technician writes it.
 *
 * Sources: the letter-and-digit code of IEC 60062 clause 4 (the letter stands where the decimal
 * point would: R ×1, K ×10³, M ×10⁶, G ×10⁹) and its tolerance letters (clause 5: F ±1 %, G ±2 %,
 * J ±5 %, K ±10 %, M ±20 %); SI prefixes (lower-case m is milli, never mega); pre-1950 service
 * data writing "meg" for megohm and sometimes M for thousand (check-values.md §5) [SEC].
 *
 * Accepted grammar (the table of cases lives in spec/domain/notation.spec.ts):
 *   state     OL | O.L. | over-range → over-range; open | ∞ | inf | infinity → open; short → short;
 *             climbing | unstable | no-access (the other reading states, by their API words)
 *   code      [digits] LETTER digits [tolerance]       4K7 4k7 R47 4R7 0R22 1M2 2M2 1M0M 4K7J
 *   decimal   number [prefix] [unit] [tolerance]       4.7k 4,7 kΩ 4.7 kohm 470R 470 ohm 1e3 47K 47KK
 *   fraction  ½ ¼ ¾ (after an optional whole number) or a/b, then a prefix or unit: ½ meg, 1/2 meg
 *   prefix    k K (kilo) · M (mega) · G (giga) · R r (×1) · meg megs megohm(s) (mega) · kilohm(s)
 *   unit      Ω (Greek omega or the ohm sign) · ohm · ohms, any case
 *   tolerance an upper-case letter F G J K M, only after a complete value (one carrying a
 *             multiplier letter or a unit), or ±N % (also "+/-N %" or "N %") after any value
 * Refused, each with a message naming the input and the reason: empty text; a negative value
 * (unless within leadOhms + resolutionOhms: then a `short` with a note); two multiplier letters
 * (4kk7); lower-case m (milli or mega?); a comma followed by exactly three digits (1,500:
 * thousands separator or decimal comma?); units that are not resistance (µF, mfd, V, A, H, W...);
 * a tolerance letter after an incomplete value (47J); lower-case tolerance letters.
 *
 * Values are scaled with integer mantissas (the decimal digits and a power of ten are handed to
 * the correctly rounded string-to-number conversion once), so 2M2 is 2200000 and 220K is 220000,
 * never 220000.00000000003.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import type { ReadingState } from './words';

export interface ParseOptions {
  /** Year of the service data the value comes from: before BARE_M_WARNING_BEFORE_YEAR a bare M draws a warning. */
  serviceDataYear?: number;
  /** Lead resistance of the meter profile (Ω); with resolutionOhms, the allowance for a small negative reading. */
  leadOhms?: number;
  /** Resolution of the range used (Ω). */
  resolutionOhms?: number;
}

export interface ParseSuccess {
  ok: true;
  state: ReadingState;
  /** Ohms for state `value`; null for the other states. */
  ohms: number | null;
  /** Tolerance in % when one was written (letter or ±N %), else null. */
  tolerancePct: number | null;
  /** How a technician writes it: `4.7 kΩ`, `470 Ω`, `2.2 MΩ ±10 %`; for a state, its screen word (`OL`, `open`, `short`). */
  display: string;
  /** IEC 60062 letter code (`4K7`, `470R`, `R47`, `1M0`), with the tolerance letter if any (`4K7J`); for a state, its API word. */
  code: string;
  warnings: string[];
  notes: string[];
}

export interface ParseFailure {
  ok: false;
  input: string;
  message: string;
}

export type ParseResult = ParseSuccess | ParseFailure;

/** IEC 60062 clause 5 tolerance letters (the subset used on resistors of the valve era and after). */
export const TOLERANCE_LETTERS: Readonly<Record<'F' | 'G' | 'J' | 'K' | 'M', number>> = {
  F: 1,
  G: 2,
  J: 5,
  K: 10,
  M: 20,
};
type ToleranceLetter = keyof typeof TOLERANCE_LETTERS;

/** IEC 60062 clause 4 multiplier letters, as powers of ten. */
export const MULTIPLIER_LETTERS: Readonly<Record<'R' | 'K' | 'M' | 'G', number>> = { R: 0, K: 3, M: 6, G: 9 };

/** Service data dated before this year may write a bare M for thousand (check-values.md §5) [SEC]. */
export const BARE_M_WARNING_BEFORE_YEAR = 1950;

const STATE_WORDS: ReadonlyArray<[RegExp, ReadingState]> = [
  [/^(ol|o\.l\.?|over-?range)$/i, 'over-range'],
  [/^(open|∞ ?Ω?|inf|infinity|open circuit)$/i, 'open'],
  [/^(short|shorted|short circuit)$/i, 'short'],
  [/^climbing$/i, 'climbing'],
  [/^unstable$/i, 'unstable'],
  [/^(no-access|no access)$/i, 'no-access'],
];

const STATE_DISPLAY: Readonly<Record<ReadingState, string>> = {
  value: 'value',
  open: 'open',
  'over-range': 'OL',
  short: 'short',
  climbing: 'climbing',
  unstable: 'unstable',
  'no-access': 'no access',
};

/** A parsed magnitude: digits × 10^exp / den, kept exact until the single conversion to a number. */
interface Magnitude {
  digits: string;
  exp: number;
  den: number;
}

interface Head {
  magnitude: Magnitude;
  complete: boolean;
  bareM: boolean;
  rest: string;
}

class Refusal {
  constructor(readonly message: string) {}
}

const MILLI_MEGA =
  'lower-case m is milli (a thousandth) in SI but is often written for mega: write M or meg for megohms (2M2, 2.2 MΩ, 2 meg), or the value in ohms for fractions of an ohm';

/** Units of other quantities (a bare F is left to the tolerance rule, which explains it). */
const NOT_RESISTANCE = /^([µμunpm]?(F|H|V|A|W|Hz)|[kKM](V|A|W|Hz))(?![a-zA-Z])/;

const FRACTION_GLYPHS: Readonly<Record<string, [number, number]>> = { '½': [1, 2], '¼': [1, 4], '¾': [3, 4] };

function normalise(text: string): string {
  return text
    .replace(/[\u00a0\u2009\u202f\u2007]/g, ' ')
    .replace(/\u2126/g, 'Ω') // ohm sign → Greek capital omega
    .replace(/\u2212/g, '-') // minus sign → hyphen-minus
    .replace(/\s+/g, ' ')
    .trim();
}

/** Parse a resistance as typed at the bench or printed in service data. Never throws. */
export function parseResistance(text: string, options: ParseOptions = {}): ParseResult {
  const input = text;
  const fail = (message: string): ParseFailure => ({ ok: false, input, message: `'${input}': ${message}` });
  const s0 = normalise(text ?? '');
  if (s0 === '') return { ok: false, input, message: 'empty: type a value (4k7, 470R, 2.2 MΩ) or a state (OL, open, short)' };

  for (const [re, state] of STATE_WORDS) {
    if (re.test(s0)) return stateResult(state, [], []);
  }

  let s = s0;
  let negative = false;
  if (s.startsWith('-')) {
    negative = true;
    s = s.slice(1).trimStart();
  } else if (s.startsWith('+')) {
    s = s.slice(1).trimStart();
  }

  let head: Head;
  let tol: { pct: number; letter: ToleranceLetter | null } | null;
  try {
    head = parseHead(s);
    tol = parseTolerance(head);
  } catch (e) {
    if (e instanceof Refusal) return fail(e.message);
    throw e;
  }

  const ohms = toNumber(head.magnitude);
  const warnings: string[] = [];
  const notes: string[] = [];

  if (negative && ohms !== 0) {
    const allowance = (options.leadOhms ?? 0) + (options.resolutionOhms ?? 0);
    if (allowance > 0 && ohms <= allowance) {
      notes.push(
        `read −${formatOhms(ohms)}: within lead resistance plus resolution (${formatOhms(allowance)}), taken as a short`,
      );
      return stateResult('short', warnings, notes);
    }
    return fail(
      allowance > 0
        ? `a negative reading beyond lead resistance plus resolution (${formatOhms(allowance)}) is not a resistance: zero the meter and read again`
        : 'a resistance cannot be negative; a small negative reading counts as a short only when the meter profile gives its lead resistance and resolution',
    );
  }

  if (head.bareM && options.serviceDataYear !== undefined && options.serviceDataYear < BARE_M_WARNING_BEFORE_YEAR) {
    warnings.push(
      `service data dated ${options.serviceDataYear}: before about ${BARE_M_WARNING_BEFORE_YEAR} a bare M may mean thousand, not mega — read here as ${formatOhms(ohms)}; it may be ${formatOhms(ohms / 1000)}`,
    );
  }
  if (ohms >= 1e9) {
    warnings.push(`${formatOhms(ohms)} is beyond what an ohmmeter reads: check the multiplier letter (G is giga; as a tolerance letter it follows a complete value, as in 33KG)`);
  }

  const code = formatCode(ohms) + (tol?.letter ?? '');
  const display = formatOhms(ohms) + (tol ? ` ±${formatPlain(tol.pct)} %` : '');
  return { ok: true, state: 'value', ohms, tolerancePct: tol?.pct ?? null, display, code, warnings, notes };
}

function stateResult(state: ReadingState, warnings: string[], notes: string[]): ParseSuccess {
  return { ok: true, state, ohms: null, tolerancePct: null, display: STATE_DISPLAY[state], code: state, warnings, notes };
}

function parseHead(s: string): Head {
  // Two multiplier letters in a row before more digits: 4kk7, 4KK7.
  if (/^\d*[RrKkMmG]{2,}\d/.test(s)) {
    throw new Refusal('two multiplier letters: the code has one letter where the decimal point stands (4k7 is 4.7 kΩ)');
  }

  // IEC 60062 letter code: the letter stands where the decimal point would (4K7, R47, 1M2).
  const code = /^(\d*)([RrKkMmG])(\d+)/.exec(s);
  if (code) {
    const [whole, intPart, letter, fracPart] = code;
    if (letter === 'm') throw new Refusal(MILLI_MEGA);
    const exp = MULTIPLIER_LETTERS[letter.toUpperCase() as 'R' | 'K' | 'M' | 'G'];
    // A unit may follow the code (4K7 Ω); it also settles a bare M.
    const unit = /^ ?(Ω|ohms?\b)/i.exec(s.slice(whole.length));
    return {
      magnitude: { digits: (intPart || '0') + fracPart, exp: exp - fracPart.length, den: 1 },
      complete: true,
      bareM: letter === 'M' && !unit,
      rest: s.slice(whole.length + (unit ? unit[0].length : 0)),
    };
  }

  const number = parseNumber(s);
  let rest = s.slice(number.length).replace(/^ /, '');
  if (number.hasExponent && /^([RrKkMG]|meg)/i.test(rest)) {
    throw new Refusal('e-notation and a multiplier together: write one of them (1e3 or 1k)');
  }
  const magnitude = number.magnitude;
  let complete = false;
  let bareM = false;

  const take = (re: RegExp): RegExpExecArray | null => {
    const m = re.exec(rest);
    if (m) rest = rest.slice(m[0].length);
    return m;
  };
  const takeUnit = (): boolean => take(/^ ?(Ω|ohms?\b)/i) !== null;

  if (take(/^(megohms?|meg(ohms?|s)?)(?![a-z])/i)) {
    magnitude.exp += 6;
    complete = true;
  } else if (take(/^kil(o-?)?ohms?(?![a-z])/i)) {
    magnitude.exp += 3;
    complete = true;
  } else if (/^(mmfd|mfd|[µμu]{1,2}fd)(?![a-z])/i.test(rest) || (NOT_RESISTANCE.test(rest) && rest !== 'F')) {
    const unit = /^\S+/.exec(rest)?.[0] ?? rest;
    throw new Refusal(
      `'${unit}' is not a unit of resistance (mfd and µF are capacitance, V volts, A amperes, H henries, W watts): type ohms (470, 470R, 4k7, 2.2 MΩ)`,
    );
  } else if (/^[µμunp] ?(Ω|ohm)/i.test(rest)) {
    throw new Refusal('micro-, nano- and pico-ohms are outside what a bench ohmmeter reads: type the value in ohms, kΩ or MΩ');
  } else if (/^m/.test(rest)) {
    throw new Refusal(MILLI_MEGA);
  } else {
    const letter = take(/^[RrKkMG]/);
    if (letter) {
      magnitude.exp += MULTIPLIER_LETTERS[letter[0].toUpperCase() as 'R' | 'K' | 'M' | 'G'];
      complete = true;
      const unit = letter[0] !== 'R' && letter[0] !== 'r' && takeUnit();
      bareM = letter[0] === 'M' && !unit;
    } else if (takeUnit()) {
      complete = true;
    }
  }
  if (number.isFraction && !complete) {
    throw new Refusal('a fraction needs a multiplier or a unit after it (½ meg, ¼ MΩ, 1/2 meg)');
  }
  return { magnitude, complete, bareM, rest };
}

function parseNumber(s: string): { length: number; magnitude: Magnitude; isFraction: boolean; hasExponent?: boolean } {
  const glyph = /^(\d*) ?([½¼¾])/.exec(s);
  if (glyph) {
    const [num, den] = FRACTION_GLYPHS[glyph[2]];
    const whole = glyph[1] === '' ? 0 : Number(glyph[1]);
    return { length: glyph[0].length, magnitude: { digits: String(whole * den + num), exp: 0, den }, isFraction: true };
  }
  const ratio = /^(\d+)\/(\d+)/.exec(s);
  if (ratio) {
    const den = Number(ratio[2]);
    if (den === 0) throw new Refusal('a fraction with a zero denominator');
    return { length: ratio[0].length, magnitude: { digits: ratio[1], exp: 0, den }, isFraction: true };
  }
  const dec = /^(\d*)(?:([.,])(\d+))?(?:[eE]([+-]?\d+))?/.exec(s);
  if (!dec || (dec[1] === '' && dec[3] === undefined)) {
    throw new Refusal('not a resistance: type a value (4k7, 470R, 2.2 MΩ, 2 meg) or a state (OL, open, short)');
  }
  const [whole, intPart, sep, fracPart = '', expPart] = dec;
  if (sep === ',' && fracPart.length === 3) {
    throw new Refusal(
      `a comma followed by three digits may be a thousands separator (${intPart}${fracPart} Ω) or a decimal comma (${intPart}.${fracPart} Ω): write it without the comma, with a point, or with a letter (${intPart}k${fracPart.replace(/0+$/, '')})`,
    );
  }
  if (/^[.,]\d/.test(s.slice(whole.length))) {
    throw new Refusal('more than one decimal point or separator: write the digits without separators, or use a multiplier (1.5M, 1M5)');
  }
  return {
    length: whole.length,
    magnitude: { digits: (intPart || '0') + fracPart, exp: Number(expPart ?? 0) - fracPart.length, den: 1 },
    isFraction: false,
    hasExponent: expPart !== undefined,
  };
}

function parseTolerance(head: Head): { pct: number; letter: ToleranceLetter | null } | null {
  let rest = head.rest.replace(/^ /, '');
  if (rest === '') return null;
  let result: { pct: number; letter: ToleranceLetter | null } | null = null;

  const letter = /^([A-Za-z])(?=$| ?[±+0-9])/.exec(rest);
  if (letter) {
    const l = letter[1];
    if (l in TOLERANCE_LETTERS) {
      if (!head.complete) {
        throw new Refusal(
          `a tolerance letter (${l}) may follow only a complete value, one with a multiplier letter or a unit (47R${l}, 47K${l}, 470 Ω ${l})${l === 'F' ? '; F alone is also the farad, a unit of capacitance' : ''}`,
        );
      }
      result = { pct: TOLERANCE_LETTERS[l as ToleranceLetter], letter: l as ToleranceLetter };
    } else if (l.toUpperCase() in TOLERANCE_LETTERS) {
      throw new Refusal(`tolerance letters are upper case (F ±1 %, G ±2 %, J ±5 %, K ±10 %, M ±20 %): write ${l.toUpperCase()}`);
    } else {
      throw new Refusal(`'${l}' is not a tolerance letter (F ±1 %, G ±2 %, J ±5 %, K ±10 %, M ±20 %)`);
    }
    rest = rest.slice(1).replace(/^ /, '');
  }
  if (rest === '') return result;

  const pct = /^(?:±|\+\/-|\+-)? ?(\d+(?:[.,]\d+)?) ?%$/.exec(rest);
  if (pct) {
    if (result) throw new Refusal('two tolerances: give either a tolerance letter or ±N %');
    const value = Number(pct[1].replace(',', '.'));
    if (!(value > 0 && value < 100)) throw new Refusal('a tolerance must be above 0 % and below 100 %');
    return { pct: value, letter: letterFor(value) };
  }
  throw new Refusal(`'${rest}' is not part of a resistance value (a multiplier k, M, meg, a unit Ω or ohm, or a tolerance letter F G J K M)`);
}

function letterFor(pct: number): ToleranceLetter | null {
  for (const [l, p] of Object.entries(TOLERANCE_LETTERS)) if (p === pct) return l as ToleranceLetter;
  return null;
}

function toNumber(m: Magnitude): number {
  return Number(`${m.digits}e${m.exp}`) / m.den;
}

/** A number as plain decimal text, cleaned of binary artefacts (12 significant figures), never in e-notation. */
function formatPlain(n: number): string {
  const clean = Number(n.toPrecision(12));
  let text = String(clean);
  if (/e/.test(text)) text = clean.toFixed(20).replace(/0+$/, '').replace(/\.$/, '');
  return text;
}

/**
 * Formatting a value costs a few string conversions, and a survey formats the same nominals and
 * thresholds over and over (every verdict's explanation names its band): a small cache of the
 * scaled text, emptied when full, keeps a whole-survey recompute cheap.
 */
const SCALED = new Map<number, { text: string; exp: 0 | 3 | 6 | 9 }>();
const SCALED_MAX = 4096;

function scaleForDisplay(ohms: number): { text: string; exp: 0 | 3 | 6 | 9 } {
  const known = SCALED.get(ohms);
  if (known) return known;
  if (!Number.isFinite(ohms) || ohms < 0) throw new RangeError(`cannot format ${ohms} as a resistance`);
  const clean = Number(ohms.toPrecision(12));
  const exp = clean >= 1e9 ? 9 : clean >= 1e6 ? 6 : clean >= 1e3 ? 3 : 0;
  const scaled: { text: string; exp: 0 | 3 | 6 | 9 } = { text: formatPlain(clean / 10 ** exp), exp };
  if (SCALED.size >= SCALED_MAX) SCALED.clear();
  SCALED.set(ohms, scaled);
  return scaled;
}

const PREFIX: Readonly<Record<0 | 3 | 6 | 9, string>> = { 0: '', 3: 'k', 6: 'M', 9: 'G' };
const CODE_LETTER: Readonly<Record<0 | 3 | 6 | 9, string>> = { 0: 'R', 3: 'K', 6: 'M', 9: 'G' };

/** How a technician writes a value: `4.7 kΩ`, `470 Ω`, `2.2 MΩ`, `0.47 Ω` (point as decimal mark, a space before the unit). */
export function formatOhms(ohms: number): string {
  const { text, exp } = scaleForDisplay(ohms);
  return `${text} ${PREFIX[exp]}Ω`;
}

/**
 * The IEC 60062 clause 4 letter code: the letter (R, K, M, G) replaces the decimal point; a
 * leading zero is dropped (R47, not 0R47); a single whole digit takes a trailing 0 (1M0, 1K0,
 * 4R0), so the letter never ends a one-digit code; 470R, 47K, 100K keep their digits.
 */
export function formatCode(ohms: number): string {
  const { text, exp } = scaleForDisplay(ohms);
  const letter = CODE_LETTER[exp];
  if (ohms === 0) return '0R';
  const [intPart, fracPart] = text.split('.');
  if (fracPart !== undefined) return `${intPart === '0' ? '' : intPart}${letter}${fracPart}`;
  return intPart.length === 1 ? `${intPart}${letter}0` : `${intPart}${letter}`;
}
