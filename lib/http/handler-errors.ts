import { z } from "zod";
import { AccessError } from "@/lib/auth/errors";
import { RuleError } from "@/lib/errors";
import { firstFieldErrors } from "@/lib/validation/field-errors";
import { logSafeMessage } from "@/lib/log-safe";

/** The body of every error a route handler returns. */
export type HandlerErrorBody = {
  error: { code: string; message: string; fieldErrors?: Record<string, string> };
};

const ACCESS_CODES = { 401: "unauthenticated", 403: "forbidden", 404: "not_found" } as const;

function errorResponse(status: number, body: HandlerErrorBody): Response {
  return Response.json(body, { status, headers: { "Cache-Control": "no-store" } });
}

/**
 * Turns anything a route handler threw into a JSON error: AccessError keeps its 401/403/404,
 * RuleError its status, a zod error becomes 422 with the first message per field. Anything else is
 * logged (message only — never the request, which may hold secrets) and answered with a generic
 * 500, so no stack trace or internal detail reaches the caller.
 */
export function respondWithError(error: unknown, context: string): Response {
  if (error instanceof AccessError) {
    return errorResponse(error.status, {
      error: { code: ACCESS_CODES[error.status], message: error.message },
    });
  }
  if (error instanceof RuleError) {
    return errorResponse(error.status, { error: { code: "rule", message: error.message } });
  }
  if (error instanceof z.ZodError) {
    return errorResponse(422, {
      error: {
        code: "invalid",
        message: "Some fields need attention.",
        fieldErrors: firstFieldErrors(error),
      },
    });
  }
  console.error(`[${context}] unexpected failure:`, logSafeMessage(error));
  return errorResponse(500, {
    error: { code: "internal", message: "Something went wrong on our side. Please try again." },
  });
}
