/**
 * The parts of encoding (encode-design.ts) that read the values block by block, so that values
 * kept in a scratch file (beyond the memory limit) are encoded exactly as values in memory are,
 * and a design that does not fit in memory is written to a scratch file of its own.
 */
import type { RowBlockVisitor } from "../math/moments";
import { CHUNK_LENGTH } from "./chunked-arrays";
import type { ColumnAccumulator } from "./column-accumulator";
import { chooseBlockRows, type MemorySettings } from "./memory-limit";
import { ScratchFile } from "./scratch-file";
import { forEachStoredBlock, isStoredMatrix, type StoredMatrix } from "./stored-matrix";

/** Rows of values in memory copied at a time when they are kept unchanged (see ValueBlocks). */
const KEPT_VALUES_BLOCK_ROWS = 1 << 14;

/** A missing value's replacement in one column of the values read (methods.md §1: the mean). */
export interface ColumnFill {
  /** The column's slot in each row of the values read. */
  index: number;
  value: number;
}

/**
 * The values read (keptRows rows of `stride` numbers, NaN where missing), in memory or in a
 * scratch file, visited block by block in row order. Fills set with `fillMissing` are in every
 * block visited afterwards: written into values in memory, applied to each block read from a file.
 */
export class ValueBlocks {
  private fills: ColumnFill[] = [];

  constructor(
    readonly values: Float64Array | StoredMatrix,
    readonly rows: number,
    readonly stride: number,
    /**
     * Leave values in memory unchanged: fills are applied to a copy of each block of them instead
     * (values a client keeps for another encoding). Off, they are written into the values.
     */
    private readonly options: { keepValues?: boolean } = {},
  ) {}

  /** Visits the rows in order; `firstRow` is the block's first row. */
  forEach(visit: (values: Float64Array, firstRow: number, rowCount: number) => void): void {
    const values = this.values;
    if (!isStoredMatrix(values) && this.options.keepValues && this.fills.length > 0) {
      const copy = new Float64Array(Math.min(this.rows, KEPT_VALUES_BLOCK_ROWS) * this.stride);
      for (let first = 0; first < this.rows; first += KEPT_VALUES_BLOCK_ROWS) {
        const rowCount = Math.min(KEPT_VALUES_BLOCK_ROWS, this.rows - first);
        const block = copy.subarray(0, rowCount * this.stride);
        block.set(values.subarray(first * this.stride, (first + rowCount) * this.stride));
        applyFills(block, rowCount, this.stride, this.fills);
        visit(block, first, rowCount);
      }
      return;
    }
    if (!isStoredMatrix(values)) {
      visit(values, 0, this.rows);
      return;
    }
    forEachStoredBlock(values, (block, firstRow, rowCount) => {
      applyFills(block, rowCount, this.stride, this.fills);
      visit(block, firstRow, rowCount);
    });
  }

  /** The same visits in the form the moment computations take. */
  readonly visitor: RowBlockVisitor = (visit) =>
    this.forEach((values, _firstRow, rowCount) => visit(values, rowCount));

  fillMissing(fills: ColumnFill[]): void {
    this.fills = fills;
    if (!isStoredMatrix(this.values) && !this.options.keepValues) {
      applyFills(this.values, this.rows, this.stride, fills);
    }
  }

  /** Gives back a scratch file's space. */
  close(): void {
    if (isStoredMatrix(this.values)) this.values.file.close();
  }
}

function applyFills(values: Float64Array, rows: number, stride: number, fills: ColumnFill[]) {
  for (const { index, value } of fills) {
    for (let row = 0; row < rows; row++) {
      if (values[row * stride + index] !== values[row * stride + index]) {
        values[row * stride + index] = value;
      }
    }
  }
}

/**
 * One standardized column of the design, as encode-design.ts (or a federated client's encoding)
 * plans it. A level's code is −1 when the source never saw the level (a client's rows): no row
 * matches it.
 */
export type StandardizedColumn =
  | { kind: "numeric"; sourceIndex: number; mean: number; std: number }
  | { kind: "level"; source: ColumnAccumulator; code: number; mean: number; std: number };

/**
 * Writes the design (standardized columns, then the bias 1) to a new scratch file, each kept row at
 * its shard-ordered position, computing every value as the in-memory encoding does. Rows arrive in
 * file order and are gathered per shard in small buffers (their share of one block), each appended
 * to its shard's stretch of the file when full.
 */
export function writeDesignToFile(
  blocks: ValueBlocks,
  columns: StandardizedColumn[],
  shardOfRow: (row: number) => number,
  shardOffsets: Int32Array,
  memory: MemorySettings,
): StoredMatrix {
  const width = columns.length + 1;
  const rows = blocks.rows;
  const stride = blocks.stride;
  const blockRows = chooseBlockRows(memory, width);
  const shardCount = shardOffsets.length - 1;
  const bufferRows = Math.max(1, Math.floor(blockRows / shardCount));
  const pending = new Float64Array(shardCount * bufferRows * width);
  const pendingRows = new Int32Array(shardCount);
  const nextRow = shardOffsets.slice(0, shardCount);
  const inverseStds = columns.map((column) => 1 / column.std);
  const codes = columns.map((column) =>
    column.kind === "level" && column.code >= 0 ? column.source.codeViews() : [],
  );
  const file = new ScratchFile(memory.scratchDirectory);
  memory.onScratchFile?.(file.path);
  const flush = (shard: number) => {
    const start = shard * bufferRows * width;
    file.write(
      pending.subarray(start, start + pendingRows[shard] * width),
      nextRow[shard] * width * Float64Array.BYTES_PER_ELEMENT,
    );
    nextRow[shard] += pendingRows[shard];
    pendingRows[shard] = 0;
  };
  try {
    blocks.forEach((values, firstRow, rowCount) => {
      for (let k = 0; k < rowCount; k++) {
        const row = firstRow + k;
        const shard = shardOfRow(row);
        const out = (shard * bufferRows + pendingRows[shard]) * width;
        for (let j = 0; j < columns.length; j++) {
          const column = columns[j];
          if (column.kind === "numeric") {
            pending[out + j] =
              (values[k * stride + column.sourceIndex] - column.mean) * inverseStds[j];
          } else {
            const matches =
              column.code >= 0 &&
              codes[j][Math.floor(row / CHUNK_LENGTH)][row % CHUNK_LENGTH] === column.code;
            pending[out + j] = matches
              ? (1 - column.mean) * inverseStds[j]
              : -column.mean * inverseStds[j];
          }
        }
        pending[out + width - 1] = 1;
        if (++pendingRows[shard] === bufferRows) flush(shard);
      }
    });
    for (let shard = 0; shard < shardCount; shard++) if (pendingRows[shard] > 0) flush(shard);
  } catch (error) {
    file.close();
    throw error;
  }
  return { rows, cols: width, file, blockRows };
}
