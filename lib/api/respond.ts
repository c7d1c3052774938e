import { RuleError } from "@/lib/errors";
import { respondWithError, type HandlerErrorBody } from "@/lib/http/handler-errors";
import { ApiError } from "./errors";

/** Stable codes for the product's rule errors, by status, so API clients can branch on them. */
const RULE_CODES: Record<RuleError["status"], string> = {
  404: "not_found",
  409: "conflict",
  410: "gone",
  422: "invalid",
  429: "rate_limited",
};

const NO_STORE = { "Cache-Control": "no-store" };

/** A JSON answer of the API that is never cached (it is per token and often changes). */
export function respondWithJson(body: unknown, status = 200): Response {
  return Response.json(body, { status, headers: NO_STORE });
}

function respondWithApiErrorBody(
  status: number,
  body: HandlerErrorBody,
  headers: Record<string, string> = {},
): Response {
  return Response.json(body, { status, headers: { ...NO_STORE, ...headers } });
}

/**
 * The API's error answers, always `{ error: { code, message, fieldErrors? } }`: its own ApiErrors
 * (token problems, rate limit with Retry-After), the product's RuleErrors with a code per status,
 * and everything else (AccessError, zod, unexpected) through the shared handler mapping.
 */
export function respondWithApiError(error: unknown, context: string): Response {
  if (error instanceof ApiError) {
    const headers: Record<string, string> = {};
    if (error.status === 401) headers["WWW-Authenticate"] = 'Bearer realm="partita"';
    if (error.retryAfterSeconds !== undefined) {
      headers["Retry-After"] = String(error.retryAfterSeconds);
    }
    return respondWithApiErrorBody(
      error.status,
      { error: { code: error.code, message: error.message } },
      headers,
    );
  }
  if (error instanceof RuleError) {
    return respondWithApiErrorBody(error.status, {
      error: {
        code: RULE_CODES[error.status],
        message: error.message,
        ...(error.field ? { fieldErrors: { [error.field]: error.message } } : {}),
      },
    });
  }
  return respondWithError(error, `api ${context}`);
}

/** Runs a handler's body and turns whatever it throws into the API's JSON error. */
export async function answerApiRequest(
  context: string,
  handle: () => Promise<Response>,
): Promise<Response> {
  try {
    return await handle();
  } catch (error) {
    return respondWithApiError(error, context);
  }
}
