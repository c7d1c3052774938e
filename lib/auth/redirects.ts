/**
 * Where to send someone after signing in, decided by parsing the URL the way the browser will:
 * a value that resolves to another origin (`/\evil.example`, `/<tab>/evil.example`, a look-alike
 * host) or that cannot be parsed at all becomes the fallback, so sign-in can never be used as an
 * open redirect. The result is always a path on `origin` that cannot be read as `//host`.
 */
export function sameOriginPath(value: string | undefined, origin: string, fallback = "/"): string {
  if (!value) return fallback;
  let target: URL;
  try {
    target = new URL(value, origin);
  } catch {
    return fallback;
  }
  if (target.origin !== new URL(origin).origin) return fallback;
  // `//evil.example` as a path of our own origin would still be read as a host by the browser.
  const path = `/${target.pathname.replace(/^\/+/, "")}`;
  return `${path}${target.search}${target.hash}`;
}
