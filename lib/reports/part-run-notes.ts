import type { AnalysisPartRow } from "@/db/queries/analysis-parts";

type PartRecord = Pick<AnalysisPartRow, "partIndex" | "partCount" | "attempts" | "workerLosses">;

const TIMES = ["", "", "twice", "three times"];

/**
 * What the report page says of an analysis shared by several workers: that it was read in parts
 * whose digests were merged, and every part that was redone — after its worker stopped sending
 * heartbeats, or after it was stopped or failed and its job was retried. Empty for one process.
 */
export function describePartRun(parts: PartRecord[]): string[] {
  if (parts.length === 0) return [];
  const notes = [
    `Read in ${parts[0].partCount} parts, each by whichever worker took it; the parts' sums were merged into this summary, which equals a one-process analysis of the same file.`,
  ];
  for (const part of parts) {
    const redone = part.attempts - 1;
    if (redone < 1) continue;
    const times = redone < TIMES.length ? TIMES[redone] : `${redone} times`;
    const why =
      part.workerLosses > 0 ? "after its worker stopped" : "after its worker was stopped or failed";
    notes.push(
      `Part ${part.partIndex + 1} of ${part.partCount} was redone${times ? ` ${times}` : ""} ${why}.`,
    );
  }
  return notes;
}
