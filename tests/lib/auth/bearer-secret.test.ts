// The bearer check both API guards share (personal API tokens and federated client keys): each
// refusal in the guard's own words, and one kind of secret never taken for the other.
import { execFileSync } from "node:child_process";
import { describe, expect, it, vi } from "vitest";
import { ApiError } from "@/lib/api/errors";
import { API_TOKENS } from "@/lib/auth/api-token-secret";
import { findBearerGrant, hashBearerSecret, type BearerRefusals } from "@/lib/auth/bearer-secret";
import { CLIENT_KEYS } from "@/lib/auth/client-key-secret";

const NOW = new Date("2026-03-01T12:00:00Z");
const refuse: BearerRefusals = {
  missing: () => new ApiError(401, "missing", "missing"),
  unknown: () => new ApiError(401, "unknown", "unknown"),
  revoked: () => new ApiError(401, "revoked", "revoked"),
  expired: (at) => new ApiError(401, `expired ${at.toISOString()}`, "expired"),
};

function bearer(secret: string | null): Request {
  const headers: Record<string, string> = secret ? { authorization: `Bearer ${secret}` } : {};
  return new Request("http://partita.test/api/v1/workspace", { headers });
}

async function refusalOf(promise: Promise<unknown>): Promise<string> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof ApiError) return error.code;
    throw error;
  }
  return "let in";
}

describe("bearer secrets", () => {
  it("are the prefix and 43 URL-safe characters, and stored as their SHA-256", () => {
    const { secret, hash } = CLIENT_KEYS.create();
    expect(secret).toMatch(/^prck_[A-Za-z0-9_-]{43}$/);
    // Outside reference: coreutils' sha256sum over the same bytes.
    const sha256sum = execFileSync("sha256sum", { input: secret }).toString().split(" ")[0];
    expect(hash).toBe(sha256sum);
    expect(hashBearerSecret(secret)).toBe(sha256sum);
  });

  it("are refused in each guard's words: missing, not this kind, unknown, revoked, expired", async () => {
    const { secret, hash } = API_TOKENS.create();
    const grants = new Map<string, { revokedAt: Date | null; expiresAt: Date }>();
    const find = vi.fn(async (key: string) => grants.get(key));
    const check = (request: Request) =>
      refusalOf(findBearerGrant(request, API_TOKENS, find, refuse, NOW));

    expect(await check(bearer(null))).toBe("missing");
    expect(
      await check(new Request("http://partita.test/", { headers: { authorization: secret } })),
    ).toBe("missing");
    expect(await check(bearer(CLIENT_KEYS.create().secret))).toBe("unknown");
    expect(find).not.toHaveBeenCalled();
    expect(await check(bearer(secret))).toBe("unknown");

    grants.set(hash, { revokedAt: null, expiresAt: new Date("2026-03-02T00:00:00Z") });
    expect(await check(bearer(secret))).toBe("let in");
    grants.set(hash, {
      revokedAt: new Date("2026-02-01T00:00:00Z"),
      expiresAt: new Date("2026-03-02T00:00:00Z"),
    });
    expect(await check(bearer(secret))).toBe("revoked");
    // Expired at the instant it expires, not a moment later.
    grants.set(hash, { revokedAt: null, expiresAt: NOW });
    expect(await check(bearer(secret))).toBe(`expired ${NOW.toISOString()}`);
  });
});
