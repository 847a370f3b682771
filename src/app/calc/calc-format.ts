import { formatOhms } from '@domain/notation';

/**
 * Ohms as a technician writes them (`4.7 kΩ`), rounded to `digits` significant figures so that a
 * computed value (178 959.157 Ω) reads as a reading would (`179 kΩ`).
 */
export function ohmsText(ohms: number, digits = 4): string {
  if (!Number.isFinite(ohms)) return '∞';
  if (ohms === 0) return '0 Ω';
  return formatOhms(Number(ohms.toPrecision(digits)));
}

/** A signed percentage with a real minus sign: `+4.20 %`, `−7.5 %`. */
export function pctText(pct: number, decimals = 2): string {
  const fixed = Math.abs(pct).toFixed(decimals);
  const sign = pct > 0 ? '+' : pct < 0 && Number(fixed) !== 0 ? '−' : '';
  return `${sign}${fixed} %`;
}

/** A plain number with a real minus sign and at most `decimals` decimals (trailing zeros dropped). */
export function numberText(x: number, decimals = 3): string {
  const text = String(Number(x.toFixed(decimals)));
  return text.startsWith('-') ? `−${text.slice(1)}` : text;
}

/** Reads a percentage or a plain number as typed (`10`, `10 %`, `±10 %`, `2,5`); null when it is not one. */
export function parsePlainNumber(text: string): number | null {
  const cleaned = text.trim().replace(/^±|^\+\/-/, '').replace(/%$/, '').trim().replace(',', '.').replace('\u2212', '-');
  if (cleaned === '' || !/^-?\d*\.?\d+(e-?\d+)?$/i.test(cleaned)) return null;
  const x = Number(cleaned);
  return Number.isFinite(x) ? x : null;
}
