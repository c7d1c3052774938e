import { afterEach, describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { AccessError } from "@/lib/auth/errors";
import { RuleError } from "@/lib/errors";
import { respondWithError, type HandlerErrorBody } from "@/lib/http/handler-errors";

async function read(response: Response): Promise<{ status: number; body: HandlerErrorBody }> {
  return { status: response.status, body: (await response.json()) as HandlerErrorBody };
}

afterEach(() => vi.restoreAllMocks());

describe("respondWithError", () => {
  it("keeps the status and message of access and rule errors", async () => {
    for (const status of [401, 403, 404] as const) {
      const { status: actual, body } = await read(
        respondWithError(new AccessError(status, `access ${status}`), "test"),
      );
      expect(actual).toBe(status);
      expect(body.error.message).toBe(`access ${status}`);
    }
    const rule = await read(respondWithError(new RuleError(409, "already done"), "test"));
    expect(rule).toEqual({
      status: 409,
      body: { error: { code: "rule", message: "already done" } },
    });
  });

  it("answers a zod error with 422 and the first message per field", async () => {
    const parsed = z.object({ title: z.string().min(3, "Too short.") }).safeParse({ title: "a" });
    const { status, body } = await read(respondWithError(parsed.error, "test"));
    expect(status).toBe(422);
    expect(body.error.fieldErrors).toEqual({ title: "Too short." });
  });

  it("hides anything else behind a generic 500 and logs only the message", async () => {
    const log = vi.spyOn(console, "error").mockImplementation(() => undefined);
    const { status, body } = await read(
      respondWithError(new Error("connection refused at 10.0.0.3"), "exports"),
    );
    expect(status).toBe(500);
    expect(JSON.stringify(body)).not.toContain("10.0.0.3");
    expect(log).toHaveBeenCalledWith(
      "[exports] unexpected failure:",
      "connection refused at 10.0.0.3",
    );
  });
});
