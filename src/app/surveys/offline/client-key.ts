/**
 * A reading's client key (DESIGN.md §2 "reading"): 22 characters of [A-Za-z0-9_-] (132 random
 * bits) from `crypto.getRandomValues`, which also works outside a secure context (a shop LAN
 * served over plain http, where `crypto.randomUUID` is missing). A replayed write carries the
 * same key, so the API recognises it as the same write.
 */
const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_';

export function newClientKey(length = 22): string {
  const bytes = new Uint8Array(length);
  crypto.getRandomValues(bytes);
  let key = '';
  // 64 symbols: the low six bits of each byte pick one, evenly.
  for (const b of bytes) key += ALPHABET[b & 63];
  return key;
}
