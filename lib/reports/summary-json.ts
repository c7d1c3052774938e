/**
 * The summary as text, exactly as `npm run analyze` prints it (two-space indent, one final
 * newline), so the report export and the API answer the CLI's bytes for the same analysis.
 */
export function serializeSummary(summary: unknown): string {
  return `${JSON.stringify(summary, null, 2)}\n`;
}
