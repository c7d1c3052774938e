import { NextRequest } from "next/server";
import { afterEach, describe, expect, it, vi } from "vitest";
import { PEER_ADDRESS_HEADER } from "@/lib/http/client-address";

const APP = process.env.NEXTAUTH_URL ?? "http://127.0.0.1:3000";

/** proxy.ts with the environment given; env() is cached per module graph, hence the reset. */
async function loadProxy(settings: Record<string, string | undefined>) {
  vi.resetModules();
  for (const [name, value] of Object.entries(settings)) vi.stubEnv(name, value);
  return (await import("@/proxy")).proxy;
}

afterEach(() => vi.unstubAllEnvs());

function request(path: string, init: { method?: string; headers?: Record<string, string> } = {}) {
  const url = new URL(path, APP);
  return new NextRequest(url, {
    method: init.method ?? "GET",
    headers: { host: url.host, [PEER_ADDRESS_HEADER]: "127.0.0.1", ...init.headers },
  });
}

// The values are the ones the OWASP Secure Headers Project recommends (common practice).
describe("headers on every kind of response", () => {
  it.each([
    ["a page", "/sign-in"],
    ["an API route", "/api/v1/reports"],
    ["a static file", "/_next/static/chunks/app.js"],
    ["an unknown path (the 404 page)", "/no-such-page"],
    ["a refused action", "/sign-up"],
  ])("%s", async (kind, path) => {
    const proxy = await loadProxy({ PARTITA_LISTEN_HOST: "127.0.0.1" });
    const response = proxy(
      request(path, kind === "a refused action" ? { method: "POST" } : undefined),
    );
    const policy = response.headers.get("content-security-policy") ?? "";
    expect(policy).toMatch(/frame-ancestors 'none'/);
    expect(policy).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]{24}' 'strict-dynamic'/);
    expect(policy).not.toMatch(/script-src[^;]*'unsafe-inline'/);
    expect(response.headers.get("x-frame-options")).toBe("DENY");
    expect(response.headers.get("x-content-type-options")).toBe("nosniff");
    expect(response.headers.get("referrer-policy")).toBe("same-origin");
  });

  it("hands Next the same fresh nonce it announces, one per request", async () => {
    const proxy = await loadProxy({});
    const first = proxy(request("/sign-in"));
    const second = proxy(request("/sign-in"));
    const nonceOf = (policy: string | null) => /'nonce-([^']+)'/.exec(policy ?? "")?.[1];
    const announced = nonceOf(first.headers.get("content-security-policy"));
    // NextResponse.next({ request: { headers } }) passes overridden request headers this way.
    const forwarded = nonceOf(first.headers.get("x-middleware-request-content-security-policy"));
    expect(forwarded).toBe(announced);
    expect(nonceOf(second.headers.get("content-security-policy"))).not.toBe(announced);
  });
});

describe("state-changing requests", () => {
  const action = (origin?: string) =>
    request("/sign-up", {
      method: "POST",
      headers: { "next-action": "7f00aa", ...(origin ? { origin } : {}) },
    });

  it("refuses a server action from another origin with 403", async () => {
    const proxy = await loadProxy({});
    expect(proxy(action("https://evil.example")).status).toBe(403);
    expect(proxy(action("http://127.0.0.1:3000.evil.example")).status).toBe(403);
  });

  it("refuses a server action without Origin with 403", async () => {
    const proxy = await loadProxy({});
    expect(proxy(action()).status).toBe(403);
  });

  it("lets the app's own pages through, and bearer-token API calls without Origin", async () => {
    const proxy = await loadProxy({});
    expect(proxy(action(new URL(APP).origin)).headers.get("x-middleware-next")).toBe("1");
    const api = request("/api/v1/uploads", { method: "POST" });
    expect(proxy(api).headers.get("x-middleware-next")).toBe("1");
  });
});

describe("the development inbox", () => {
  const inbox = (peer: string, extra: Record<string, string> = {}) =>
    request("/dev/inbox", { headers: { [PEER_ADDRESS_HEADER]: peer, ...extra } });

  it("answers a caller on this machine when the app listens on loopback", async () => {
    const proxy = await loadProxy({ PARTITA_LISTEN_HOST: "127.0.0.1" });
    expect(proxy(inbox("127.0.0.1")).headers.get("x-middleware-next")).toBe("1");
    expect(proxy(inbox("::1")).headers.get("x-middleware-next")).toBe("1");
  });

  it("is not found for another machine, even one that claims loopback in X-Forwarded-For", async () => {
    const proxy = await loadProxy({ PARTITA_LISTEN_HOST: "127.0.0.1" });
    expect(proxy(inbox("192.0.2.7")).status).toBe(404);
    expect(proxy(inbox("192.0.2.7", { "x-forwarded-for": "127.0.0.1" })).status).toBe(404);
  });

  it("is not found at all when the app listens on a non-loopback address", async () => {
    const proxy = await loadProxy({ PARTITA_LISTEN_HOST: "0.0.0.0" });
    expect(proxy(inbox("127.0.0.1")).status).toBe(404);
  });

  it("is not found when no server says who is calling (e.g. a bare `next start`)", async () => {
    const proxy = await loadProxy({ PARTITA_LISTEN_HOST: undefined });
    const bare = new NextRequest(new URL("/dev/inbox", APP));
    expect(proxy(bare).status).toBe(404);
  });
});
