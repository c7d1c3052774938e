import type { AnalysisPartRow } from "@/db/queries/analysis-parts";
import { formatBytes } from "@/lib/uploads/file-rules";

type PartRecord = Pick<
  AnalysisPartRow,
  "partIndex" | "partCount" | "attempts" | "workerLosses" | "rowsSpilledAtLimit"
>;

const TIMES = ["", "", "twice", "three times"];

/**
 * What the report page says of how the analysis ran, where it ran differently from one process
 * with its rows in memory: read in parts by several workers (and every part that was redone —
 * after its worker stopped sending heartbeats, or after it was stopped or failed and its job was
 * retried — or whose rows went to a scratch file past its worker's memory limit), or its rows
 * kept in a scratch file past the memory limit, or read by one worker though meant to be shared
 * (and why). Empty otherwise.
 */
export function describeRun(run: {
  parts: PartRecord[];
  rowsSpilledAtLimit: number | null;
  readWholeBecause: string | null;
}) {
  const notes: string[] = [];
  if (run.readWholeBecause !== null) {
    notes.push(`Read by one worker, not shared among several: ${run.readWholeBecause}.`);
  }
  if (run.rowsSpilledAtLimit !== null) {
    notes.push(
      `The rows did not fit the worker's memory limit (${formatBytes(run.rowsSpilledAtLimit)}): they were kept in a scratch file on its disk and read back for each pass. The figures are those an analysis in memory gives.`,
    );
  }
  if (run.parts.length === 0) return notes;
  notes.push(
    `Read in ${run.parts[0].partCount} parts, each by whichever worker took it; the parts' sums were merged into this summary, which equals a one-process analysis of the same file.`,
  );
  for (const part of run.parts) {
    if (part.rowsSpilledAtLimit !== null) {
      notes.push(
        `The rows of part ${part.partIndex + 1} of ${part.partCount} did not fit its worker's memory limit (${formatBytes(part.rowsSpilledAtLimit)}): they were kept in a scratch file on that worker's disk and read back for each pass. The figures are those an analysis in memory gives.`,
      );
    }
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
