import { open } from "node:fs/promises";
import { Worker } from "node:worker_threads";
import Papa from "papaparse";
import { ColumnAccumulator, MAX_ONE_HOT_LEVELS } from "./column-accumulator";
import { detectDecimalMark, readHeader } from "./csv-reader";
import {
  completeDataset,
  locateColumns,
  LISTED_OFFENDERS,
  type DatasetColumnChoice,
} from "./dataset-rows";
import { AnalysisInputError } from "./errors";
import { measureRowBudget } from "./memory-limit";
import type { RawDataset, ReadDatasetOptions } from "./raw-dataset";
import type { ReadPartData, ReadPartOrder, ReadPartReport } from "./read-part-protocol";
import { DELIMITERS, type CsvFormat, type DecimalMark, type Delimiter } from "./text-format";

/** Bytes of the file's beginning that must hold the header line (and show its delimiter). */
const HEAD_BYTES = 64 * 1024;
/** Bytes read at a nominal cut to find the next line end. */
const CUT_WINDOW = 64 * 1024;
const QUOTE = 34;
const LINE_FEED = 10;

/**
 * Reads a local CSV whose rows carry their shard (a shard column) on several threads: the file is
 * cut into parts at line ends, each part's rows are counted, then read by its own thread with the
 * same rules as a whole-file read, straight into one shared array at the part's row offset; the
 * parts' columns are then merged in file order, so the dataset is the one a single read gives,
 * value for value. Resolves null when the file cannot be cut safely — quoted fields (which may hold
 * line breaks), a header past the first 64 KB, rows that do not split as counted — and the caller
 * reads it on one thread instead; so also when the values would outgrow the memory limit (the
 * single read moves them to a scratch file).
 */
export async function readCsvInParallel(
  path: string,
  fileName: string,
  columns: DatasetColumnChoice,
  threads: number,
  {
    dropUnassignedRows,
    onBytesRead,
    memory,
  }: Pick<ReadDatasetOptions, "dropUnassignedRows" | "onBytesRead" | "memory">,
): Promise<RawDataset | null> {
  const layout = await cutIntoParts(path, fileName, threads);
  if (layout === null) return null;
  const { header, delimiter, decimalMark, parts } = layout;
  const positions = locateColumns(header, fileName, columns);
  const width = positions.features.length + 1;
  const workers = parts.map(
    ({ start, end }) =>
      new Worker(new URL("./read-part-thread-entry.mjs", import.meta.url), {
        workerData: {
          path,
          start,
          end,
          fileName,
          header,
          delimiter,
          decimalMark,
          positions,
          idColumn: columns.idColumn,
        } satisfies ReadPartData,
      }),
  );
  let bytesRead = layout.headerBytes;
  try {
    const counted = await Promise.all(
      workers.map((worker) => nextReport(worker, (bytes) => onBytesRead?.((bytesRead += bytes)))),
    );
    if (counted.some((report) => report.type !== "counted" || report.quoted)) {
      throwFirstInputError(counted);
      return null;
    }
    const rowCounts = counted.map((report) => (report.type === "counted" ? report.rows : 0));
    const totalRows = rowCounts.reduce((sum, rows) => sum + rows, 0);
    // The parts write into one array in memory; values beyond the memory limit are read on one
    // thread into a scratch file instead.
    if (memory && totalRows * width * Float64Array.BYTES_PER_ELEMENT > measureRowBudget(memory)) {
      return null;
    }
    const values = new Float64Array(new SharedArrayBuffer(totalRows * width * 8));
    let firstRowIndex = 0;
    const reads = workers.map((worker, index) => {
      const read = nextReport(worker, (bytes) => onBytesRead?.((bytesRead += bytes)));
      worker.postMessage({ values, firstRowIndex } satisfies ReadPartOrder);
      firstRowIndex += rowCounts[index];
      return read;
    });
    const reports = await Promise.all(reads);
    throwFirstInputError(reports);
    if (reports.some((report) => report.type !== "read")) return null;
    return joinParts(reports as Extract<ReadPartReport, { type: "read" }>[], rowCounts, values, {
      format: { encoding: "utf-8", delimiter, decimalMark },
      fileName,
      header,
      positions,
      columns,
      dropUnassignedRows,
    });
  } finally {
    await Promise.all(workers.map((worker) => worker.terminate()));
  }
}

export interface PartLayout {
  header: string[];
  delimiter: Delimiter;
  decimalMark: DecimalMark;
  headerBytes: number;
  parts: { start: number; end: number }[];
}

/** Random access to a file's bytes: a local file, or an object in storage read by ranges. */
export interface ByteSource {
  size: number;
  /** Up to `length` bytes from `position` (fewer only at the end). */
  read(position: number, length: number): Promise<Uint8Array>;
}

/**
 * The header, the delimiter, and up to `count` parts of whole lines covering the data rows; null
 * when the file cannot be cut safely (see `readCsvInParallel`).
 */
export async function cutIntoParts(
  path: string,
  fileName: string,
  count: number,
): Promise<PartLayout | null> {
  const file = await open(path);
  try {
    const { size } = await file.stat();
    return await cutSourceIntoParts(
      { size, read: (position, length) => readAt(file, position, length) },
      fileName,
      count,
    );
  } finally {
    await file.close();
  }
}

/** `cutIntoParts` over any byte source: reads the head and a window at each nominal cut. */
export async function cutSourceIntoParts(
  source: ByteSource,
  fileName: string,
  count: number,
): Promise<PartLayout | null> {
  const { size } = source;
  const head = await source.read(0, Math.min(size, HEAD_BYTES));
  const headerEnd = head.indexOf(LINE_FEED);
  if (headerEnd < 0 || head.includes(QUOTE)) return null;
  const text = new TextDecoder("utf-8").decode(head.subarray(0, head.lastIndexOf(LINE_FEED)));
  const parsed = Papa.parse<string[]>(text, {
    header: false,
    skipEmptyLines: true,
    preview: 20,
    delimitersToGuess: [...DELIMITERS],
  });
  if (parsed.data.length === 0) return null;
  const header = readHeader(parsed.data[0], fileName);
  const dataStart = headerEnd + 1;
  const cuts = [dataStart];
  for (let part = 1; part < count; part++) {
    const nominal = dataStart + Math.floor(((size - dataStart) * part) / count);
    if (nominal <= cuts[cuts.length - 1]) continue;
    const window = await source.read(nominal, Math.min(CUT_WINDOW, size - nominal));
    const lineEnd = window.indexOf(LINE_FEED);
    if (lineEnd < 0) break;
    const cut = nominal + lineEnd + 1;
    if (cut < size && cut > cuts[cuts.length - 1]) cuts.push(cut);
  }
  cuts.push(size);
  const parts = cuts.slice(1).map((end, index) => ({ start: cuts[index], end }));
  const delimiter = parsed.meta.delimiter as Delimiter;
  return {
    header,
    delimiter,
    decimalMark: detectDecimalMark(delimiter, parsed.data.slice(1)),
    headerBytes: dataStart,
    parts,
  };
}

async function readAt(
  file: Awaited<ReturnType<typeof open>>,
  position: number,
  length: number,
): Promise<Buffer> {
  const buffer = Buffer.alloc(length);
  const { bytesRead } = await file.read(buffer, 0, length, position);
  return buffer.subarray(0, bytesRead);
}

/** The thread's next report other than progress; a thread that stops unexpectedly rejects. */
function nextReport(worker: Worker, onProgress: (bytes: number) => void): Promise<ReadPartReport> {
  return new Promise((resolve, reject) => {
    const onMessage = (report: ReadPartReport) => {
      if (report.type === "progress") {
        onProgress(report.bytes);
        return;
      }
      worker.off("message", onMessage);
      worker.off("error", reject);
      if (report.type === "failed") reject(new Error(`a reading thread failed: ${report.detail}`));
      else resolve(report);
    };
    worker.on("message", onMessage);
    worker.once("error", reject);
  });
}

/** The first part's input error, in file order: the one a single read would have met first. */
function throwFirstInputError(reports: ReadPartReport[]): void {
  const first = reports.find((report) => report.type === "input-error");
  if (first?.type === "input-error") throw new AnalysisInputError(first.problem, first.location);
}

/** The parts' rows joined in file order: the same dataset a single read of the file gives. */
function joinParts(
  reports: Extract<ReadPartReport, { type: "read" }>[],
  rowCounts: number[],
  values: Float64Array,
  context: {
    fileName: string;
    header: string[];
    positions: ReturnType<typeof locateColumns>;
    columns: DatasetColumnChoice;
    dropUnassignedRows: boolean;
    format: CsvFormat;
  },
): RawDataset {
  const { fileName, header, positions, columns, dropUnassignedRows, format } = context;
  const width = positions.features.length + 1;
  // Each part wrote its kept rows from its first row index; close the gaps dropped rows left.
  let keptRows = 0;
  let partStart = 0;
  reports.forEach((report, index) => {
    if (keptRows !== partStart) {
      values.copyWithin(keptRows * width, partStart * width, (partStart + report.keptRows) * width);
    }
    keptRows += report.keptRows;
    partStart += rowCounts[index];
  });
  // Shards in first-appearance order over the whole file, as a single read numbers them.
  const shardIds: string[] = [];
  const shardCodeOfId = new Map<string, number>();
  const shardCodes = new Int32Array(keptRows);
  const labelValues = new Float64Array(keptRows);
  let row = 0;
  for (const report of reports) {
    const globalCode = report.shardIds.map((id) => {
      let code = shardCodeOfId.get(id);
      if (code === undefined) {
        code = shardIds.length;
        shardIds.push(id);
        shardCodeOfId.set(id, code);
      }
      return code;
    });
    for (let index = 0; index < report.keptRows; index++) {
      shardCodes[row + index] = globalCode[report.shardCodes[index]];
    }
    labelValues.set(report.labelValues, row);
    row += report.keptRows;
  }
  const unassignedRows = reports.flatMap((report) => report.unassignedRows);
  return completeDataset(
    {
      fileName,
      totalRows: reports.reduce((sum, report) => sum + report.rows, 0),
      keptRows,
      droppedMissingLabel: reports.reduce((sum, report) => sum + report.droppedMissingLabel, 0),
      label: ColumnAccumulator.merge(
        header[positions.label],
        fileName,
        Infinity,
        reports.map((report) => report.label),
      ),
      labelValues,
      features: positions.features.map((column, k) =>
        ColumnAccumulator.merge(
          header[column],
          fileName,
          MAX_ONE_HOT_LEVELS,
          reports.map((report) => report.features[k]),
        ),
      ),
      featureValues: new Float64Array(values.buffer, 0, keptRows * width),
      featuresNamed: columns.features !== undefined,
      format,
      shardCodes,
      shardIds,
    },
    {
      count: reports.reduce((sum, report) => sum + report.unassignedCount, 0),
      firstRows: unassignedRows.slice(0, LISTED_OFFENDERS),
    },
    columns,
    { partition: null, dropUnassignedRows },
  );
}
