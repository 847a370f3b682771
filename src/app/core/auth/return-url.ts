/** A `returnUrl` query parameter, kept only when it is a path of this app (no open redirect). */
export function safeReturnUrl(value: string | null | undefined, fallback = '/home'): string {
  if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return fallback;
  if (value.startsWith('/sign-in') || value.startsWith('/api/')) return fallback;
  return value;
}
