import { Readable } from "node:stream";
import { analyzePartition, type PartitionSummary } from "@/lib/analysis";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";

/** Runs the engine on in-memory CSV text (streamed in small pieces, as a file would be). */
export function analyzeText(
  data: string,
  options: AnalysisOptionsInput,
  partition?: string,
): Promise<PartitionSummary> {
  return analyzePartition({
    data: streamText(data),
    dataName: "data.csv",
    partition: partition === undefined ? undefined : streamText(partition),
    partitionName: "partition.csv",
    options,
  });
}

function streamText(text: string): Readable {
  const pieces: Buffer[] = [];
  const bytes = Buffer.from(text, "utf8");
  // Odd piece size so chunk borders fall inside rows and inside multi-byte characters.
  for (let start = 0; start < bytes.length; start += 997)
    pieces.push(bytes.subarray(start, start + 997));
  return Readable.from(pieces);
}
