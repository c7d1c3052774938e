import { respondWithApiError } from "@/lib/api/respond";
import { RuleError } from "@/lib/errors";

/** Unknown /api/v1 paths answer in the API's JSON error shape rather than with an HTML page. */
function answerUnknownPath(): Response {
  return respondWithApiError(
    new RuleError(404, "There is no such API route; see /api/v1/openapi.json."),
    "unknown-route",
  );
}

export const GET = answerUnknownPath;
export const POST = answerUnknownPath;
export const PUT = answerUnknownPath;
export const PATCH = answerUnknownPath;
export const DELETE = answerUnknownPath;
