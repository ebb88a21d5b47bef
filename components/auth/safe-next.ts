/**
 * Where to go after signing in. Only same-site relative paths are followed: `//host` and
 * `/\host` would leave the site, and sending people back to an auth page would loop.
 */
export function safeNextPath(next: string | string[] | undefined): string {
  const value = Array.isArray(next) ? next[0] : next;
  if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return '/';
  if (/^\/(sign-in|forgot-password|set-password)(\/|\?|$)/.test(value)) return '/';
  return value;
}
