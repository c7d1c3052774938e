/**
 * The Content-Security-Policy of every response. Scripts run only with this request's nonce (Next
 * puts it on its own inline scripts when it finds it in the request's policy); 'strict-dynamic'
 * lets those scripts load the app's chunks. Inline styles stay allowed because React's `style`
 * attributes (charts, progress bars) need them, and they cannot run code. Browser uploads go
 * straight to object storage, hence its origin in connect-src. Nothing may frame a page.
 */
export function contentSecurityPolicy(input: {
  nonce: string;
  storageOrigin?: string;
  development: boolean;
}): string {
  const directives: Record<string, string[]> = {
    "default-src": ["'self'"],
    // Next's development server evaluates modules and talks to its own websocket.
    "script-src": [
      "'self'",
      `'nonce-${input.nonce}'`,
      "'strict-dynamic'",
      ...(input.development ? ["'unsafe-eval'"] : []),
    ],
    "style-src": ["'self'", "'unsafe-inline'"],
    "img-src": ["'self'", "data:", "blob:"],
    "font-src": ["'self'"],
    "connect-src": [
      "'self'",
      ...(input.storageOrigin ? [input.storageOrigin] : ["https://*.amazonaws.com"]),
      ...(input.development ? ["ws:"] : []),
    ],
    "object-src": ["'none'"],
    "base-uri": ["'self'"],
    "form-action": ["'self'"],
    "frame-ancestors": ["'none'"],
  };
  return Object.entries(directives)
    .map(([name, sources]) => `${name} ${sources.join(" ")}`)
    .join("; ");
}

/** The headers every response carries besides the policy. */
export const FIXED_SECURITY_HEADERS: Readonly<Record<string, string>> = {
  // For browsers that predate frame-ancestors.
  "X-Frame-Options": "DENY",
  "X-Content-Type-Options": "nosniff",
  // Paths carry invitation and sign-in tokens: never send them to another site.
  "Referrer-Policy": "same-origin",
};
