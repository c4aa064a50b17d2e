const A_YEAR_S = 365 * 24 * 3600;

/**
 * Keeps `value` under `name` in a cookie for a year, for the page server to read when it draws
 * this browser's next page (a choice of the browser's, never a secret: script can read it).
 */
export function rememberInCookie(name: string, value: string): void {
  if (typeof document === 'undefined') return;
  const secure = globalThis.location?.protocol === 'https:' ? '; secure' : '';
  document.cookie = `${name}=${encodeURIComponent(value)}; path=/; max-age=${A_YEAR_S}; samesite=lax${secure}`;
}
