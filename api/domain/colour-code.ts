/**
 * Resistor colour code (DESIGN.md §3.2), after IEC 60062 (Ed. 6.0, 2016; the 2004 edition before
 * it) as quoted in check-values.md §1 [STD]: digits black 0 … white 9; multiplier ×10^digit, gold
 * ×0.1, silver ×0.01, pink ×0.001 (2016 edition only); tolerance and temperature-coefficient
 * colours below. 3 bands = 2 digits + multiplier (±20 %); 4 = + tolerance; 5 = 3 digits +
 * multiplier + tolerance; 6 = 5 + temperature coefficient. Band 1 is the one nearest an end.
 *
 * Body–tip–dot marking of older composition parts [SEC: encyclopedia "Resistor", marking
 * section]: body = first digit, tip (one end) = second digit, dot = multiplier; the other end
 * silver ±10 %, gold ±5 %, unpainted ±20 %; a missing tip or dot takes the body colour.
 *
 * Values are built from integer mantissas (digits × 10^exponent through one correctly rounded
 * conversion), so red-red-yellow is 220000, not 220000.00000000003.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { formatOhms } from './notation';

export const COLOURS = [
  'black',
  'brown',
  'red',
  'orange',
  'yellow',
  'green',
  'blue',
  'violet',
  'grey',
  'white',
  'gold',
  'silver',
  'pink',
  'none',
] as const;
export type Colour = (typeof COLOURS)[number];

/** An error a technician can act on; `field` names the input at fault (`bands[0]`, `tip`, `tolerancePct`). */
export class ColourCodeError extends Error {
  constructor(
    message: string,
    readonly field: string,
  ) {
    super(message);
    this.name = 'ColourCodeError';
  }
}

export interface DecodedBands {
  ohms: number;
  tolerancePct: number;
  tempcoPpmPerK: number | null;
}

/** Digit colours, IEC 60062 colour table. */
export const DIGIT_OF: Readonly<Partial<Record<Colour, number>>> = {
  black: 0,
  brown: 1,
  red: 2,
  orange: 3,
  yellow: 4,
  green: 5,
  blue: 6,
  violet: 7,
  grey: 8,
  white: 9,
};

/** Multiplier colours as powers of ten, IEC 60062 colour table (pink: 2016 edition). */
export const MULTIPLIER_EXPONENT_OF: Readonly<Partial<Record<Colour, number>>> = {
  ...DIGIT_OF,
  gold: -1,
  silver: -2,
  pink: -3,
};

/**
 * Grey as a tolerance band. Older charts give ±0.05 %; tables derived from IEC 60062:2016
 * (Ed. 6.0) give ±0.01 % (check-values.md §1). Driftmark follows the 2016 edition, the same
 * edition that brings the pink multiplier; the older value is kept beside it for reference.
 */
export const GREY_TOLERANCE_PCT_IEC_60062_2016 = 0.01;
export const GREY_TOLERANCE_PCT_OLDER_CHARTS = 0.05;
export const GREY_TOLERANCE_PCT = GREY_TOLERANCE_PCT_IEC_60062_2016;

/** Tolerance colours, IEC 60062 colour table; `none` = no band, ±20 %. */
export const TOLERANCE_OF: Readonly<Partial<Record<Colour, number>>> = {
  brown: 1,
  red: 2,
  green: 0.5,
  blue: 0.25,
  violet: 0.1,
  grey: GREY_TOLERANCE_PCT,
  gold: 5,
  silver: 10,
  none: 20,
};

/** Temperature coefficient colours (6th band), ppm/K, IEC 60062 colour table. */
export const TEMPCO_OF: Readonly<Partial<Record<Colour, number>>> = {
  black: 250,
  brown: 100,
  red: 50,
  orange: 15,
  yellow: 25,
  green: 20,
  blue: 10,
  violet: 5,
  grey: 1,
};

/** Body–tip–dot end colours [SEC: encyclopedia "Resistor"]: silver ±10 %, gold ±5 %, unpainted ±20 %. */
export const END_TOLERANCE_OF: Readonly<Partial<Record<Colour, number>>> = { silver: 10, gold: 5, none: 20 };

function checkColour(value: unknown, field: string): Colour {
  if (typeof value === 'string' && (COLOURS as readonly string[]).includes(value)) return value as Colour;
  const hint =
    value === 'gray' ? ' (write grey)' : value === 'purple' ? ' (write violet)' : '';
  throw new ColourCodeError(
    `'${String(value)}' is not a colour of the code${hint}: use ${COLOURS.join(', ')}`,
    field,
  );
}

function digit(colour: Colour, field: string, first: boolean): number {
  const d = DIGIT_OF[colour];
  if (d === undefined) {
    const wrongEnd = colour === 'gold' || colour === 'silver';
    throw new ColourCodeError(
      `${colour} is not a digit colour (digits run black 0 … white 9)` +
        (wrongEnd && first
          ? `: ${colour} belongs at the far end (multiplier or tolerance) — read the part from the other end; band 1 is the one nearest an end`
          : ''),
      field,
    );
  }
  if (first && d === 0) {
    throw new ColourCodeError(
      'black cannot be the first digit (the value would start with 0): read the part from the other end; band 1 is the one nearest an end',
      field,
    );
  }
  return d;
}

function multiplierExponent(colour: Colour, field: string): number {
  const e = MULTIPLIER_EXPONENT_OF[colour];
  if (e === undefined) throw new ColourCodeError(`${colour} is not a multiplier colour (black … white, gold, silver, pink)`, field);
  return e;
}

function tolerance(colour: Colour, field: string, table: Readonly<Partial<Record<Colour, number>>>, what: string): number {
  const t = table[colour];
  if (t === undefined) {
    const known = Object.entries(table)
      .map(([c, p]) => `${c} ±${p} %`)
      .join(', ');
    throw new ColourCodeError(`${colour} is not ${what} (${known})`, field);
  }
  return t;
}

function value(digits: number[], exponent: number): number {
  return Number(`${digits.join('')}e${exponent}`);
}

/** Decode 3, 4, 5 or 6 bands, band 1 first (the one nearest an end). Throws ColourCodeError. */
export function decodeBands(bands: readonly Colour[]): DecodedBands {
  if (!Array.isArray(bands) || ![3, 4, 5, 6].includes(bands.length)) {
    throw new ColourCodeError(
      `a resistor carries 3, 4, 5 or 6 bands, not ${Array.isArray(bands) ? bands.length : 'this'}: count again, including the tolerance band at the far end`,
      'bands',
    );
  }
  const cs = bands.map((b, i) => checkColour(b, `bands[${i}]`));
  const digitCount = cs.length >= 5 ? 3 : 2;
  const digits = cs.slice(0, digitCount).map((c, i) => digit(c, `bands[${i}]`, i === 0));
  const exponent = multiplierExponent(cs[digitCount], `bands[${digitCount}]`);
  const tolIndex = digitCount + 1;
  const tolerancePct = cs.length === 3 ? 20 : tolerance(cs[tolIndex], `bands[${tolIndex}]`, TOLERANCE_OF, 'a tolerance colour');
  const tempcoPpmPerK = cs.length === 6 ? tolerance(cs[5], 'bands[5]', TEMPCO_OF, 'a temperature-coefficient colour') : null;
  return { ohms: value(digits, exponent), tolerancePct, tempcoPpmPerK };
}

/** Decode body–tip–dot marking; a missing tip or dot takes the body colour. Throws ColourCodeError. */
export function decodeBodyTipDot({
  body,
  tip,
  dot,
  end,
}: {
  body: Colour;
  tip: Colour | null;
  dot: Colour | null;
  end: Colour;
}): DecodedBands {
  const b = checkColour(body, 'body');
  const t = tip === null || tip === undefined ? b : checkColour(tip, 'tip');
  const d = dot === null || dot === undefined ? b : checkColour(dot, 'dot');
  const e = checkColour(end, 'end');
  const digits = [digit(b, 'body', true), digit(t, tip == null ? 'body' : 'tip', false)];
  const exponent = multiplierExponent(d, dot == null ? 'body' : 'dot');
  const tolerancePct = tolerance(e, 'end', END_TOLERANCE_OF, 'an end colour');
  return { ohms: value(digits, exponent), tolerancePct, tempcoPpmPerK: null };
}

/**
 * Encode a value as 4 bands (2 digits) or 5 bands (3 digits), multiplier from pink ×0.001 to white
 * ×10⁹, and a tolerance band (`none` for ±20 %). Throws ColourCodeError when the value needs more
 * significant digits than the bands carry, lies outside the multipliers, or the tolerance has no colour.
 */
export function encodeBands(ohms: number, bandCount: 4 | 5, tolerancePct: number): Colour[] {
  if (bandCount !== 4 && bandCount !== 5) {
    throw new ColourCodeError(`encode to 4 or 5 bands, not ${String(bandCount)}`, 'bandCount');
  }
  if (typeof ohms !== 'number' || !Number.isFinite(ohms) || ohms <= 0) {
    throw new ColourCodeError(`a colour code needs a value above zero, not ${String(ohms)}`, 'ohms');
  }
  const digitCount = bandCount === 4 ? 2 : 3;
  // Significant digits of the value, cleaned of binary artefacts (12 figures).
  const [mantissaText, expText] = ohms.toExponential(11).split('e');
  const significant = mantissaText.replace('.', '').replace(/0+$/, '') || '0';
  if (significant.length > digitCount) {
    throw new ColourCodeError(
      `${formatOhms(ohms)} has ${significant.length} significant digits; ${bandCount} bands carry ${digitCount}` +
        (bandCount === 4 && significant.length === 3 ? ': use 5 bands' : ''),
      'ohms',
    );
  }
  const padded = significant.padEnd(digitCount, '0');
  const exponent = Number(expText) - (digitCount - 1);
  const multiplier = (Object.entries(MULTIPLIER_EXPONENT_OF) as [Colour, number][]).find(([, e]) => e === exponent);
  if (!multiplier) {
    throw new ColourCodeError(
      `no multiplier colour for ×10^${exponent}: ${bandCount} bands reach from ${bandCount === 4 ? '0.01 Ω' : '0.1 Ω'} (pink ×0.001) to the white multiplier ×10⁹`,
      'ohms',
    );
  }
  const tol = (Object.entries(TOLERANCE_OF) as [Colour, number][]).find(([, p]) => p === tolerancePct);
  if (!tol) {
    const known = Object.values(TOLERANCE_OF).map((p) => `±${p} %`).join(', ');
    throw new ColourCodeError(`no colour for a tolerance of ±${tolerancePct} % (${known})`, 'tolerancePct');
  }
  const digitColours = [...padded].map((ch) => COLOURS[Number(ch)]);
  return [...digitColours, multiplier[0], tol[0]];
}
