/**
 * Where to go after signing in. Only a path on this site is accepted: it must start with one
 * "/" (not "//" nor "/\", which browsers read as another host) and hold no control characters.
 */
export function safeReturnTo(value: string | null | undefined): string | null {
  if (typeof value !== 'string' || value === '') return null;
  if (!value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return null;
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(value)) return null;
  return value;
}

/** The sign-in address that comes back to `path` (path + search) afterwards. */
export function signInPath(path: string): string {
  const back = safeReturnTo(path);
  if (back === null || back === '/' || back.startsWith('/sign-in')) return '/sign-in';
  return `/sign-in?${new URLSearchParams({ returnTo: back }).toString()}`;
}
