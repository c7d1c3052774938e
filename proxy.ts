import { NextResponse, type NextRequest } from "next/server";
import { env } from "@/lib/env";
import { clientAddress, isLoopback } from "@/lib/http/client-address";
import { contentSecurityPolicy, FIXED_SECURITY_HEADERS } from "@/lib/http/security-headers";

/**
 * next-auth 4's session cookie names (the `__Secure-` one on https; a large token is split into
 * `.0`, `.1`… chunks). Presence is all this checks: the page guards still verify the session and
 * the role on every request.
 */
const SESSION_COOKIES = ["next-auth.session-token", "__Secure-next-auth.session-token"];

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Bearer-token API callers (the CLI, pipelines) send no Origin, and next-auth checks its own CSRF
 * token; everything else that changes state (server actions, the upload routes) must come from
 * the app's own pages.
 */
const ORIGIN_EXEMPT_PREFIXES = ["/api/v1/", "/api/auth/"];

/**
 * Runs before every request: security headers on every kind of response, the Origin check for
 * state-changing requests, the development inbox kept to loopback, and signed-out visits to
 * workspace pages sent to sign-in. Only redirects and refusals; the guards stay the boundary.
 */
export function proxy(request: NextRequest) {
  const refusal = refuseForeignWrite(request) ?? refuseRemoteInbox(request);
  if (refusal) return withSecurityHeaders(refusal, newNonce());

  const nonce = newNonce();
  const policy = policyFor(nonce);
  const redirect = redirectSignedOutVisit(request);
  if (redirect) return withSecurityHeaders(redirect, nonce, policy);

  // Next reads the nonce from the request's policy and puts it on the scripts it renders.
  const requestHeaders = new Headers(request.headers);
  requestHeaders.set("content-security-policy", policy);
  const response = NextResponse.next({ request: { headers: requestHeaders } });
  return withSecurityHeaders(response, nonce, policy);
}

function newNonce(): string {
  return Buffer.from(crypto.getRandomValues(new Uint8Array(16))).toString("base64");
}

function policyFor(nonce: string): string {
  const endpoint = env().S3_ENDPOINT;
  return contentSecurityPolicy({
    nonce,
    storageOrigin: endpoint ? new URL(endpoint).origin : undefined,
    development: process.env.NODE_ENV === "development",
  });
}

function withSecurityHeaders(response: NextResponse, nonce: string, policy = policyFor(nonce)) {
  response.headers.set("Content-Security-Policy", policy);
  for (const [name, value] of Object.entries(FIXED_SECURITY_HEADERS)) {
    response.headers.set(name, value);
  }
  return response;
}

/**
 * 403 for a state-changing request whose Origin is not the app (its configured public URL or the
 * host the request was sent to), and for one with no Origin: every browser sends one on a POST.
 */
function refuseForeignWrite(request: NextRequest): NextResponse | undefined {
  if (SAFE_METHODS.has(request.method)) return undefined;
  const { pathname } = request.nextUrl;
  if (ORIGIN_EXEMPT_PREFIXES.some((prefix) => pathname.startsWith(prefix))) return undefined;
  const host = request.headers.get("host");
  const allowed = [new URL(env().NEXTAUTH_URL).origin];
  if (host) allowed.push(`${request.nextUrl.protocol}//${host}`);
  const origin = request.headers.get("origin");
  if (origin && allowed.includes(origin)) return undefined;
  return new NextResponse("This request must come from Partita's own pages.", {
    status: 403,
    headers: { "Content-Type": "text/plain; charset=utf-8" },
  });
}

/**
 * The development inbox shows every sign-in link, so it answers only a caller on this machine, and
 * not at all when the app listens on a non-loopback address (where a proxy could relay strangers).
 */
function refuseRemoteInbox(request: NextRequest): NextResponse | undefined {
  const { pathname } = request.nextUrl;
  if (pathname !== "/dev" && !pathname.startsWith("/dev/")) return undefined;
  const config = env();
  const caller = clientAddress(request.headers, config.TRUSTED_PROXY_HOPS);
  if (isLoopback(config.PARTITA_LISTEN_HOST) && isLoopback(caller)) return undefined;
  return new NextResponse("Not found", { status: 404 });
}

function redirectSignedOutVisit(request: NextRequest): NextResponse | undefined {
  const { pathname, search } = request.nextUrl;
  if (!pathname.startsWith("/w/")) return undefined;
  const signedIn = request.cookies
    .getAll()
    .some(({ name }) =>
      SESSION_COOKIES.some((base) => name === base || name.startsWith(`${base}.`)),
    );
  if (signedIn) return undefined;
  const signIn = new URL("/sign-in", request.url);
  signIn.searchParams.set("callbackUrl", `${pathname}${search}`);
  return NextResponse.redirect(signIn);
}
