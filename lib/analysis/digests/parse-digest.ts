import type { z } from "zod";
import { AnalysisInputError } from "../errors";

/**
 * Checks a digest document as it arrived (a file, or a request to the server): a malformed one is
 * an AnalysisInputError that names the client and shard where it can, and the field, so the
 * person who sent it knows what to fix.
 */
export function parseDigest<Schema extends z.ZodType>(
  document: unknown,
  schema: Schema,
  what: string,
  file?: string,
): z.output<Schema> {
  const result = schema.safeParse(document);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const record = (document ?? {}) as { client?: unknown; shards?: { id?: unknown }[] };
  const where: string[] = [];
  if (typeof record.client === "string") where.push(`client "${record.client}"`);
  if (issue.path[0] === "shards" && typeof issue.path[1] === "number") {
    const id = record.shards?.[issue.path[1]]?.id;
    where.push(typeof id === "string" ? `shard "${id}"` : `shard #${issue.path[1] + 1}`);
  }
  const field = issue.path.join(".");
  const number = issue.code === "invalid_type" && issue.expected === "number";
  throw new AnalysisInputError(
    `${where.length > 0 ? `${where.join(", ")}: ` : ""}the ${what} is malformed at ${field || "(top)"}: ${issue.message}`,
    {
      file,
      expected: number ? "finite numbers only" : `a ${what} written by npm run digest`,
    },
  );
}
