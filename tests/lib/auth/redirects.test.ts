import { describe, expect, it } from "vitest";
import { authOptions } from "@/lib/auth/options";
import { sameOriginPath } from "@/lib/auth/redirects";

const ORIGIN = "http://127.0.0.1:3000";

/** How a browser resolves the path it is sent to: the WHATWG URL parser, as in Chromium. */
const resolvedOrigin = (path: string) => new URL(path, ORIGIN).origin;

describe("sameOriginPath", () => {
  it("keeps paths of the app, with their query and fragment", () => {
    expect(sameOriginPath("/w/abc/reports?page=2#top", ORIGIN)).toBe("/w/abc/reports?page=2#top");
    expect(sameOriginPath(`${ORIGIN}/w/abc`, ORIGIN)).toBe("/w/abc");
  });

  // The three payloads that sent the browser off-site or crashed sign-in, as the server receives
  // them after the query string is decoded.
  it.each([
    ["/\\evil.example/x"],
    ["/\t/evil.example/x"],
    ["https://127.0.0.1:3000.evil.example/"],
    ["//evil.example/x"],
    ["https://evil.example/"],
    ["javascript:alert(1)"],
  ])("turns %j into a same-origin fallback", (payload) => {
    const path = sameOriginPath(payload, ORIGIN);
    expect(path).toBe("/");
    expect(resolvedOrigin(path)).toBe(ORIGIN);
  });

  it("never returns a path the browser reads as another host", () => {
    const path = sameOriginPath(`${ORIGIN}//evil.example/x`, ORIGIN);
    expect(resolvedOrigin(path)).toBe(ORIGIN);
    expect(path).toBe("/evil.example/x");
  });

  it("uses the given fallback for nothing at all", () => {
    expect(sameOriginPath(undefined, ORIGIN, "/w")).toBe("/w");
    expect(sameOriginPath("", ORIGIN, "/w")).toBe("/w");
  });
});

describe("next-auth's redirect after sign-in and sign-out", () => {
  it.each([
    ["/\\evil.example/x"],
    ["/\t/evil.example/x"],
    ["https://127.0.0.1:3000.evil.example/"],
  ])("sends %j to the app's own origin without failing", async (payload) => {
    const redirect = authOptions().callbacks!.redirect!;
    const target = await redirect({ url: payload, baseUrl: ORIGIN });
    expect(new URL(target).origin).toBe(ORIGIN);
  });
});
