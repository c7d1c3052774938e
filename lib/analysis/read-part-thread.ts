// The body of a thread reading one part of a CSV (see parallel-read.ts): counts the part's rows,
// waits for where to write them, then reads them with the same rules as a whole-file read.
import { createReadStream } from "node:fs";
import { parentPort, workerData } from "node:worker_threads";
import { countRows } from "./count-rows";
import { readCsvStream } from "./csv-reader";
import { DatasetRowCollector, type RowSink } from "./dataset-rows";
import { AnalysisInputError } from "./errors";
import type { ReadPartData, ReadPartOrder, ReadPartReport } from "./read-part-protocol";

const port = parentPort!;
// Set by parallel-read.ts, the only code that starts this thread.
const part = workerData as ReadPartData;
const post = (report: ReadPartReport, transfer: ArrayBuffer[] = []) =>
  port.postMessage(report, transfer);

/** Progress is posted every this many bytes. */
const PROGRESS_BYTES = 16 * 2 ** 20;

/** Writes rows into the shared values from the part's first row, never past its share. */
function createSink(values: Float64Array, firstRow: number, rowLimit: number): RowSink {
  const width = part.positions.features.length + 1;
  let next = firstRow;
  return {
    values,
    appendRow() {
      if (next >= firstRow + rowLimit) throw new MiscountError();
      return next++ * width;
    },
  };
}

class MiscountError extends Error {}

async function readPart(order: ReadPartOrder, countedRows: number): Promise<void> {
  const sink = createSink(order.values, order.firstRowIndex, countedRows);
  const rows = new DatasetRowCollector(
    part.header,
    part.fileName,
    part.positions,
    part.idColumn,
    null,
    sink,
    part.decimalMark,
  );
  let reported = 0;
  const read = await readCsvStream(
    createReadStream(part.path, { start: part.start, end: part.end - 1 }),
    part.fileName,
    {
      onHeader() {},
      onRow: (fields, rowIndex) => rows.addRow(fields, rowIndex),
      onProgress(characters) {
        if (characters - reported >= PROGRESS_BYTES) {
          post({ type: "progress", bytes: characters - reported });
          reported = characters;
        }
      },
    },
    {
      header: part.header,
      delimiter: part.delimiter,
      firstRowIndex: order.firstRowIndex,
      startByte: part.start,
    },
  );
  if (read !== countedRows) {
    post({ type: "miscounted" });
    return;
  }
  const labelValues = rows.labelValues.toArray();
  const shardCodes = rows.shardCodes.toArray();
  const label = rows.label.snapshot();
  const features = rows.features.map((feature) => feature.snapshot());
  const codeBuffers = [label, ...features].flatMap((column) =>
    column.codes ? [column.codes.buffer as ArrayBuffer] : [],
  );
  post(
    {
      type: "read",
      rows: read,
      keptRows: rows.keptRows,
      droppedMissingLabel: rows.droppedMissingLabel,
      unassignedCount: rows.unassignedCount,
      unassignedRows: rows.unassignedRows,
      label,
      features,
      labelValues,
      shardCodes,
      shardIds: rows.shardIds,
    },
    [labelValues.buffer as ArrayBuffer, shardCodes.buffer as ArrayBuffer, ...codeBuffers],
  );
}

try {
  const counted = await countRows(
    createReadStream(part.path, { start: part.start, end: part.end - 1 }),
  );
  post({ type: "counted", ...counted });
  if (!counted.quoted) {
    const order = await new Promise<ReadPartOrder>((resolve) => port.once("message", resolve));
    await readPart(order, counted.rows);
  }
} catch (error) {
  if (error instanceof MiscountError) post({ type: "miscounted" });
  else if (error instanceof AnalysisInputError) {
    const { problem, file, row, column, expected } = error;
    post({ type: "input-error", problem, location: { file, row, column, expected } });
  } else {
    post({
      type: "failed",
      detail: error instanceof Error ? (error.stack ?? error.message) : String(error),
    });
  }
}
