/**
 * New stable keys for stages, sockets, components and test points (`st-…`, `so-…`, `c-…`, `tp-…`):
 * generated once, random and url-safe, kept across versions and copies (templates-design "Keys").
 * `crypto.getRandomValues` works outside a secure context too (a LAN served over http).
 */
export type KeyPrefix = 'st' | 'so' | 'c' | 'tp';

const ALPHABET = 'abcdefghijklmnopqrstuvwxyz0123456789';

export function newKey(prefix: KeyPrefix, taken?: ReadonlySet<string>): string {
  for (;;) {
    const bytes = new Uint8Array(10);
    crypto.getRandomValues(bytes);
    let s = '';
    for (const b of bytes) s += ALPHABET[b % ALPHABET.length];
    const key = `${prefix}-${s}`;
    if (taken === undefined || !taken.has(key)) return key;
  }
}

/** `R12` → { prefix: 'R', number: 12, suffix: '' }; `V3A` → V, 3, A; null when there is no number. */
export function splitDesignation(text: string): { prefix: string; number: number; suffix: string } | null {
  const m = /^([A-Za-z]+)([0-9]+)([A-Za-z]?)$/.exec(text);
  return m === null ? null : { prefix: m[1], number: Number(m[2]), suffix: m[3] };
}

/** The next free designation with the prefix of `like` (`V3` among V1…V5 → `V6`); `like` itself when it has no number. */
export function nextDesignation(like: string, taken: Iterable<string>): string {
  const parts = splitDesignation(like);
  if (parts === null) return like;
  let max = 0;
  for (const t of taken) {
    const p = splitDesignation(t);
    if (p !== null && p.prefix.toUpperCase() === parts.prefix.toUpperCase()) max = Math.max(max, p.number);
  }
  return `${parts.prefix}${max + 1}`;
}
