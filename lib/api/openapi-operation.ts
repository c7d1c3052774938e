import { z } from "zod";
import type { ZodOpenApiOperationObject } from "zod-openapi";
import { API_REQUESTS_PER_MINUTE } from "./rate-limit";
import { apiErrorSchema } from "./schemas";

export const json = (schema: z.ZodType) => ({ content: { "application/json": { schema } } });

const ERROR_DESCRIPTIONS = {
  "401":
    "No token, or a token that is unknown, expired, revoked or whose owner left the workspace.",
  "403": "The token's user does not hold the role this needs in the workspace.",
  "404": "Nothing with that id in the token's workspace.",
  "422": "The input is malformed or breaks a rule; `fieldErrors` says where.",
  "429": `More than ${API_REQUESTS_PER_MINUTE} requests a minute with this token; see Retry-After.`,
} as const;

type ErrorStatus = keyof typeof ERROR_DESCRIPTIONS;

const errorAnswer = (description: string) => ({ description, ...json(apiErrorSchema) });

/**
 * One operation of /api/v1: its success answer, and the error answers (the API's error body)
 * that every token-protected route can give (401, 429) beside those it names. A 409 means
 * something else on each route, so the route words it.
 */
export function operation(
  spec: Omit<ZodOpenApiOperationObject, "responses"> & {
    success: [status: string, description: string, schema?: z.ZodType];
    /** The success's media type when it is not JSON. */
    successMediaType?: "text/csv";
    failures: Exclude<ErrorStatus, "401" | "429">[];
    /** When the route answers 409, what that means there. */
    conflict?: string;
  },
): ZodOpenApiOperationObject {
  const { success, successMediaType, failures, conflict, ...rest } = spec;
  const [status, description, schema] = success;
  const content = successMediaType
    ? { content: { [successMediaType]: { schema: schema ?? z.string() } } }
    : schema && json(schema);
  const errors = (["401", ...failures, "429"] as ErrorStatus[]).map((error) => [
    error,
    errorAnswer(ERROR_DESCRIPTIONS[error]),
  ]);
  return {
    ...rest,
    responses: {
      [status]: { description, ...content },
      ...Object.fromEntries(errors),
      ...(conflict && { "409": errorAnswer(conflict) }),
    },
  };
}
