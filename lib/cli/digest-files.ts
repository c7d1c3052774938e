import { readFileSync, writeFileSync } from "node:fs";
import type { z } from "zod";
import { AnalysisInputError } from "../analysis";

/**
 * Reads a digest document (JSON) and checks it against its schema: a malformed file is an
 * AnalysisInputError naming the file, the client and shard where known, and the field.
 */
export function readDigestFile<Schema extends z.ZodType>(
  path: string,
  schema: Schema,
  what: string,
): z.output<Schema> {
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(path, "utf8"));
  } catch (error) {
    throw new AnalysisInputError(`cannot read the ${what}: ${(error as Error).message}`, {
      file: path,
      expected: `a ${what} (JSON) written by npm run digest`,
    });
  }
  return parseDigest(parsed, schema, what, path);
}

/** Checks a parsed digest document; the error names client, shard and field where it can. */
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

export function writeJson(path: string | undefined, document: unknown): void {
  const json = `${JSON.stringify(document, null, 2)}\n`;
  if (path === undefined) process.stdout.write(json);
  else writeFileSync(path, json);
}
