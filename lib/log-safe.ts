/**
 * The message of an error as it may go into a log. Drizzle's query errors end with the query's
 * parameters (`Failed query: … params: …`), which hold token hashes, e-mail addresses and other
 * values a log must not keep; they are cut, and any stray SHA-256 hex digest is masked. next-auth
 * hands its logger either an Error or `{ error, … }`; only the error's message is kept.
 */
export function logSafeMessage(error: unknown): string {
  const wrapped = (error as { error?: unknown } | null)?.error;
  const source = error instanceof Error ? error : wrapped instanceof Error ? wrapped : undefined;
  const message = source ? source.message : typeof error === "string" ? error : "unknown error";
  return message
    .replace(/\n?\s*params:[\s\S]*$/, " (parameters withheld)")
    .replace(/\b[0-9a-f]{64}\b/gi, "[hash withheld]");
}
