import { NextResponse, type NextRequest } from "next/server";

/**
 * next-auth 4's session cookie names (the `__Secure-` one on https; a large token is split into
 * `.0`, `.1`… chunks). Presence is all this checks: the page guards still verify the session and
 * the role on every request.
 */
const SESSION_COOKIES = ["next-auth.session-token", "__Secure-next-auth.session-token"];

/**
 * A signed-out visit to a workspace page goes to sign-in with the exact page as callbackUrl. The
 * workspace layout's guard cannot do that (a layout does not know the page's path, so it would
 * send people back to the workspace overview), and links in e-mails must land on their page.
 * Only redirects; never a security boundary.
 */
export function proxy(request: NextRequest) {
  const signedIn = request.cookies
    .getAll()
    .some(({ name }) =>
      SESSION_COOKIES.some((base) => name === base || name.startsWith(`${base}.`)),
    );
  if (signedIn) return NextResponse.next();
  const { pathname, search } = request.nextUrl;
  const signIn = new URL("/sign-in", request.url);
  signIn.searchParams.set("callbackUrl", `${pathname}${search}`);
  return NextResponse.redirect(signIn);
}

export const config = { matcher: ["/w/:path*"] };
