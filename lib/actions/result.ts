import { z } from "zod";
import { AccessError } from "@/lib/auth/errors";
import { RuleError } from "@/lib/errors";
import { firstFieldErrors } from "@/lib/validation/field-errors";
import { logSafeMessage } from "@/lib/log-safe";

/** What every form action returns: success, or errors on the fields plus what the user typed. */
export type ActionResult<TData = undefined> =
  | { ok: true; data: TData }
  | {
      ok: false;
      status: 400 | 401 | 403 | 404 | 409 | 410 | 422 | 429 | 500;
      message: string;
      fieldErrors: Record<string, string>;
    };

export function succeed(): ActionResult;
export function succeed<TData>(data: TData): ActionResult<TData>;
export function succeed<TData>(data?: TData): ActionResult<TData | undefined> {
  return { ok: true, data };
}

/**
 * Turns anything an action threw into a result the form can show. Known errors carry a message
 * written for the user; anything else is logged on the server and replaced by a generic sentence,
 * so no stack trace or internal detail ever reaches the browser.
 */
export function failWith(error: unknown, context: string): ActionResult<never> {
  if (error instanceof z.ZodError) {
    return {
      ok: false,
      status: 422,
      message: "Some fields need attention.",
      fieldErrors: firstFieldErrors(error),
    };
  }
  if (error instanceof AccessError || error instanceof RuleError) {
    const fieldErrors: Record<string, string> =
      error instanceof RuleError && error.field ? { [error.field]: error.message } : {};
    return { ok: false, status: error.status, message: error.message, fieldErrors };
  }
  console.error(`[${context}] unexpected failure:`, logSafeMessage(error));
  return {
    ok: false,
    status: 500,
    message: "Something went wrong on our side. Your input is kept; please try again.",
    fieldErrors: {},
  };
}
