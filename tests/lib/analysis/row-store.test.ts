// Rows appended one at a time (row-store.ts) and, past the memory limit's share, kept in a scratch
// file (stored-matrix.ts). The check is the round trip: every value read back, in memory or block by
// block from the file, is the value written (row-major, as NumPy's C order lays out a matrix), and
// the blocks are whole Gram tasks of 16 384 rows (memory-limit.ts).
import { mkdtempSync, readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { RowStore } from "@/lib/analysis/row-store";
import {
  forEachStoredBlock,
  isStoredMatrix,
  readStoredRows,
  type StoredMatrix,
} from "@/lib/analysis/stored-matrix";

const WIDTH = 3;

/** The value written at row r, column k: distinct for every cell. */
const cell = (row: number, k: number) => row * WIDTH + k + 0.25;

function fill(store: RowStore, rows: number): void {
  for (let row = 0; row < rows; row++) {
    const offset = store.appendRow();
    for (let k = 0; k < WIDTH; k++) store.values[offset + k] = cell(row, k);
  }
}

function storeOver(rows: number, limitBytes: number) {
  const scratchDirectory = mkdtempSync(path.join(tmpdir(), "row-store-test-"));
  const paths: string[] = [];
  const store = new RowStore(WIDTH, {
    memory: { limitBytes, scratchDirectory, onScratchFile: (file) => paths.push(file) },
  });
  fill(store, rows);
  return { store, paths, scratchDirectory };
}

describe("RowStore in memory", () => {
  it("gives back every row in place, in a SharedArrayBuffer", () => {
    for (const rows of [0, 1, 65_536, 65_537, 80_000]) {
      const store = new RowStore(WIDTH);
      fill(store, rows);
      expect(store.rows).toBe(rows);
      const values = store.finish();
      expect(isStoredMatrix(values)).toBe(false);
      const array = values as Float64Array;
      expect(array.buffer).toBeInstanceOf(SharedArrayBuffer);
      expect({
        rows,
        length: array.length,
        same: array.every((v, i) => v === cell(Math.floor(i / WIDTH), i % WIDTH)),
      }).toEqual({
        rows,
        length: rows * WIDTH,
        same: true,
      });
    }
  });

  it("grows in place up to its growable maximum, then moves to plain buffers keeping every row", () => {
    const small = new RowStore(WIDTH);
    fill(small, 10);
    const inPlace = small.finish() as Float64Array;
    // Growable (reserved up to 4 GiB): the rows are never copied while it grows.
    expect((inPlace.buffer as SharedArrayBuffer).growable).toBe(true);
    expect((inPlace.buffer as SharedArrayBuffer).maxByteLength).toBe(2 ** 32);

    // A maximum of 2¹⁷ rows of 3 numbers: the third growth no longer fits it.
    const store = new RowStore(WIDTH, { maxGrowableBytes: WIDTH * 8 * 2 ** 17 });
    const rows = 300_001;
    fill(store, rows);
    const values = store.finish() as Float64Array;
    expect((values.buffer as SharedArrayBuffer).growable).toBe(false);
    expect(values.length).toBe(rows * WIDTH);
    expect(values.every((v, i) => v === cell(Math.floor(i / WIDTH), i % WIDTH))).toBe(true);
  });

  it("stays in memory while the rows fit the limit's share", () => {
    // 40% of 8 MiB (3.2 MiB) holds the 2¹⁷ rows of 3 numbers (3 MiB) the store grows to for these.
    const { store, paths } = storeOver(100_000, 8 * 2 ** 20);
    expect(isStoredMatrix(store.finish())).toBe(false);
    expect(paths).toEqual([]);
  });
});

describe("RowStore past the memory limit", () => {
  // 40% of 1 MiB is 419 430 bytes: 17 476 rows of 3 numbers; the first growth (65 536 rows) exceeds it.
  const LIMIT = 2 ** 20;

  it("moves the rows to a scratch file, announced, and reads them back block by block", () => {
    for (const rows of [1, 16_384, 16_385, 43_690, 50_000, 87_381]) {
      const { store, paths, scratchDirectory } = storeOver(rows, LIMIT);
      const matrix = store.finish();
      expect(isStoredMatrix(matrix)).toBe(true);
      const stored = matrix as StoredMatrix;
      expect(paths).toHaveLength(1);
      expect(path.dirname(paths[0])).toBe(scratchDirectory);
      // The file is unlinked the moment it is opened: nothing is left in the folder.
      expect(readdirSync(scratchDirectory)).toEqual([]);
      expect({ rows: stored.rows, cols: stored.cols }).toEqual({ rows, cols: WIDTH });
      // 1 MiB blocks of 3 numbers: 43 690 rows, cut to 2 whole tasks of 16 384.
      expect(stored.blockRows).toBe(32_768);

      const seen: number[] = [];
      const starts: [number, number][] = [];
      forEachStoredBlock(stored, (values, firstRow, rowCount) => {
        starts.push([firstRow, rowCount]);
        expect(values.length).toBe(rowCount * WIDTH);
        for (let i = 0; i < values.length; i++) {
          if (values[i] !== cell(firstRow + Math.floor(i / WIDTH), i % WIDTH))
            seen.push(firstRow * WIDTH + i);
        }
      });
      expect({ rows, wrong: seen.slice(0, 5) }).toEqual({ rows, wrong: [] });
      const expectedStarts: [number, number][] = [];
      for (let first = 0; first < rows; first += 32_768)
        expectedStarts.push([first, Math.min(32_768, rows - first)]);
      expect(starts).toEqual(expectedStarts);

      // Any range of rows, read into the start of a larger buffer.
      const from = Math.floor(rows / 3);
      const to = Math.min(rows, from + 5);
      const part = readStoredRows(stored, from, to, new Float64Array(100));
      expect(Array.from(part)).toEqual(
        Array.from({ length: (to - from) * WIDTH }, (_, i) =>
          cell(from + Math.floor(i / WIDTH), i % WIDTH),
        ),
      );
      stored.file.close();
    }
  });

  it("writes the rows it held in memory to the file when it moves there", () => {
    // 40% of 4 MiB holds the first 65 536 rows (1.5 MiB), not the 131 072 of the next growth.
    const scratchDirectory = mkdtempSync(path.join(tmpdir(), "row-store-test-"));
    const store = new RowStore(WIDTH, { memory: { limitBytes: 4 * LIMIT, scratchDirectory } });
    const rows = 70_000;
    fill(store, rows);
    const stored = store.finish() as StoredMatrix;
    expect(isStoredMatrix(stored)).toBe(true);
    const all = readStoredRows(stored, 0, rows, new Float64Array(rows * WIDTH));
    expect(all.every((v, i) => v === cell(Math.floor(i / WIDTH), i % WIDTH))).toBe(true);
    // Blocks of whole tasks end exactly at the last row when the rows fill them: 2 × 32 768.
    const blocks: number[] = [];
    forEachStoredBlock({ ...stored, rows: 65_536 }, (_, firstRow) => blocks.push(firstRow));
    expect(blocks).toEqual([0, 32_768]);
    stored.file.close();
  });

  it("gives the file back when the rows are discarded (no one asked to hear of the file)", () => {
    const scratchDirectory = mkdtempSync(path.join(tmpdir(), "row-store-test-"));
    const store = new RowStore(WIDTH, { memory: { limitBytes: LIMIT, scratchDirectory } });
    fill(store, 20_000);
    const matrix = store.finish() as StoredMatrix;
    store.discard();
    expect(() => readStoredRows(matrix, 0, 1, new Float64Array(WIDTH))).toThrow(/closed/);
  });

  it("has nothing to give back when the rows stayed in memory", () => {
    const store = new RowStore(WIDTH, {
      memory: { limitBytes: 8 * LIMIT, scratchDirectory: "/nonexistent" },
    });
    fill(store, 10);
    expect(() => store.discard()).not.toThrow();
    expect(isStoredMatrix(store.finish())).toBe(false);
  });
});
