import { RuleError } from "@/lib/errors";

/** A route handler's JSON body; a body that is not JSON is the caller's mistake (422), not a 500. */
export async function readJsonBody(request: Request): Promise<unknown> {
  try {
    return await request.json();
  } catch {
    throw new RuleError(422, "The request body must be JSON.");
  }
}
