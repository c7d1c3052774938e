import NextAuth from "next-auth";
import type { NextRequest } from "next/server";
import { authOptions } from "@/lib/auth/options";

// next-auth's own handler is the guard here: it serves sign-in, sign-out and session endpoints.
type RouteContext = { params: Promise<{ nextauth: string[] }> };

function handler(request: NextRequest, context: RouteContext) {
  return NextAuth(request, context, authOptions());
}

export { handler as GET, handler as POST };
