import { afterEach, describe, expect, it, vi } from "vitest";
import { failWith } from "@/lib/actions/result";
import { hashLinkToken } from "@/lib/auth/tokens";
import { logSafeMessage } from "@/lib/log-safe";

afterEach(() => vi.restoreAllMocks());

// The shape of drizzle-orm 0.45's DrizzleQueryError message: the SQL, then its parameters.
const tokenHash = hashLinkToken("a-secret-link-token");
const queryError = new Error(
  `Failed query: select "id" from "invitations" where "token_hash" = $1\nparams: ${tokenHash}`,
);

describe("log-safe error messages", () => {
  it("keep the failed query but not its parameters", () => {
    const message = logSafeMessage(queryError);
    expect(message).toContain("Failed query: select");
    expect(message).not.toContain(tokenHash);
  });

  it("mask a hash wherever it appears, also inside next-auth's { error } metadata", () => {
    const wrapped = { error: new Error(`verification token ${tokenHash} not found`) };
    expect(logSafeMessage(wrapped)).toBe("verification token [hash withheld] not found");
  });

  it("are what a failing action writes to the log", () => {
    const log = vi.spyOn(console, "error").mockImplementation(() => undefined);
    failWith(queryError, "accept-invitation");
    const written = log.mock.calls.flat().join(" ");
    expect(written).toContain("accept-invitation");
    expect(written).not.toContain(tokenHash);
  });
});
