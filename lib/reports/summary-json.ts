import type { ReportInput } from "@/db/schema/analyses";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";

/**
 * The summary as text, exactly as `npm run analyze` prints it (two-space indent, one final
 * newline), so the report export and the API answer the CLI's bytes for the same analysis.
 */
export function serializeSummary(summary: unknown): string {
  return `${JSON.stringify(summary, null, 2)}\n`;
}

/**
 * A stored report's summary with the inputs it was computed from appended under `inputs`: each
 * file's kind, name, size and SHA-256, and the parameters as given. A downloaded file then says on
 * its own what it describes. Every other key keeps the CLI's order and bytes (the storage key of a
 * file stays on the server).
 */
export function serializeReportSummary(report: {
  summary: object;
  inputs: ReportInput[];
  parameters: AnalysisOptionsInput;
}): string {
  const files = report.inputs.map(({ kind, name, sizeBytes, sha256 }) => ({
    kind,
    name,
    sizeBytes,
    sha256,
  }));
  return serializeSummary({
    ...report.summary,
    inputs: { files, parameters: report.parameters },
  });
}
