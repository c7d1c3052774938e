// The body of a thread reading one part of a CSV (see parallel-read.ts): counts the part's rows,
// waits for where to write them, then reads them with the same rules as a whole-file read.
import { createReadStream } from "node:fs";
import { parentPort, workerData } from "node:worker_threads";
import { readCsvStream } from "./csv-reader";
import { DatasetRowCollector, type RowSink } from "./dataset-rows";
import { AnalysisInputError } from "./errors";
import type { ReadPartData, ReadPartOrder, ReadPartReport } from "./read-part-protocol";

const port = parentPort!;
// Set by parallel-read.ts, the only code that starts this thread.
const part = workerData as ReadPartData;
const post = (report: ReadPartReport, transfer: ArrayBuffer[] = []) =>
  port.postMessage(report, transfer);

const LINE_FEED = 10;
const CARRIAGE_RETURN = 13;
const QUOTE = 34;
/** Progress is posted every this many bytes. */
const PROGRESS_BYTES = 16 * 2 ** 20;

/** Rows as papaparse will see them (lines that are not empty) and whether any quote appears. */
async function countRows(): Promise<{ rows: number; quoted: boolean }> {
  let rows = 0;
  let quoted = false;
  let lineLength = 0;
  let lastByte = -1;
  for await (const chunk of createReadStream(part.path, { start: part.start, end: part.end - 1 })) {
    const bytes = chunk as Buffer;
    if (!quoted && bytes.includes(QUOTE)) quoted = true;
    for (let index = 0; index < bytes.length; index++) {
      const byte = bytes[index];
      if (byte === LINE_FEED) {
        // A line of nothing but a carriage return is empty too.
        if (lineLength > 1 || (lineLength === 1 && lastByte !== CARRIAGE_RETURN)) rows++;
        lineLength = 0;
      } else {
        lineLength++;
        lastByte = byte;
      }
    }
  }
  if (lineLength > 1 || (lineLength === 1 && lastByte !== CARRIAGE_RETURN)) rows++;
  return { rows, quoted };
}

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
  const counted = await countRows();
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
