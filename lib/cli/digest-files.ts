import { readFileSync, writeFileSync } from "node:fs";
import type { z } from "zod";
import { AnalysisInputError, parseDigest } from "../analysis";

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

export function writeJson(path: string | undefined, document: unknown): void {
  const json = `${JSON.stringify(document, null, 2)}\n`;
  if (path === undefined) process.stdout.write(json);
  else writeFileSync(path, json);
}
