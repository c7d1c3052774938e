import { ChunkedInt32 } from "./chunked-arrays";
import { AnalysisInputError } from "./errors";
import { isMissingToken, parseNumberToken, parseSimpleDecimal, trimToken } from "./tokens";

/** Most distinct values a non-numeric feature may have and still be one-hot encoded (methods.md §1). */
export const MAX_ONE_HOT_LEVELS = 32;

/**
 * What an accumulator knows at the end of one part of a file read on its own thread: plain data,
 * so it can be posted between threads (structured clone; `codes` can be transferred).
 */
export interface ColumnSnapshot {
  numeric: boolean;
  missingCount: number;
  firstNonNumeric: { row: number; token: string } | null;
  /** Distinct tokens in first-appearance order, null once the dictionary was dropped. */
  levels: string[] | null;
  /** Per-row codes into `levels` (-1 missing), null once the dictionary was dropped. */
  codes: Int32Array | null;
}

/**
 * Follows one column of the dataset while it streams by, without keeping its strings: `add` turns
 * each field into its numeric value (NaN when missing or not a number) for the caller to store, and
 * while the column has few distinct values the accumulator keeps a code per row into a dictionary
 * of its distinct tokens. Whether the column is numeric or categorical is only known at the end, and
 * both views are kept until then; a dictionary that outgrows its limit is dropped (such a column can
 * only end up numeric or too varied to encode).
 */
export class ColumnAccumulator {
  readonly name: string;
  private codes: ChunkedInt32 | null = new ChunkedInt32();
  private readonly levelCodes = new Map<string, number>();
  private levelsDropped = false;
  numeric = true;
  missingCount = 0;
  /** The first token that is not a number, for messages. */
  firstNonNumeric: { row: number; token: string } | null = null;

  constructor(
    name: string,
    private readonly fileName: string,
    /** Distinct values kept before the dictionary is dropped; Infinity keeps all (the label). */
    private readonly levelLimit: number,
  ) {
    this.name = name;
  }

  /** Takes one raw field of a kept row; returns its number, NaN when missing or not a number. */
  add(field: string, rowIndex: number): number {
    if (this.numeric) {
      // Most fields of a numeric column are plain decimals: take them without trimming or checking
      // for missing-value tokens (a plain decimal is neither padded nor missing).
      const value = parseSimpleDecimal(field);
      if (value === value) {
        if (this.codes !== null) this.addLevel(field);
        return value;
      }
    }
    const token = trimToken(field);
    if (isMissingToken(token)) {
      this.missingCount++;
      this.codes?.push(-1);
      return Number.NaN;
    }
    let value = Number.NaN;
    if (this.numeric) {
      value = parseNumberToken(token);
      if (value === Infinity || value === -Infinity) {
        throw new AnalysisInputError(`the value "${token}" is too large`, {
          file: this.fileName,
          row: rowIndex,
          column: this.name,
          expected: "a finite number (|x| < 1.8e308) or a missing-value token",
        });
      }
      if (value !== value) {
        this.numeric = false;
        this.firstNonNumeric = { row: rowIndex, token };
      }
    }
    if (this.codes !== null) this.addLevel(token);
    return value;
  }

  /** The column's state, for merging with the other parts of the file (see `merge`). */
  snapshot(): ColumnSnapshot {
    return {
      numeric: this.numeric,
      missingCount: this.missingCount,
      firstNonNumeric: this.firstNonNumeric,
      levels: this.codes === null ? null : this.levels,
      codes: this.codes === null ? null : this.codes.toArray(),
    };
  }

  /**
   * The accumulator the whole file would have given, from those of its consecutive parts in file
   * order: levels keep their first appearance because the parts' levels are taken in order.
   */
  static merge(
    name: string,
    fileName: string,
    levelLimit: number,
    parts: ColumnSnapshot[],
  ): ColumnAccumulator {
    const merged = new ColumnAccumulator(name, fileName, levelLimit);
    merged.numeric = parts.every((part) => part.numeric);
    merged.missingCount = parts.reduce((sum, part) => sum + part.missingCount, 0);
    merged.firstNonNumeric = parts.find((part) => part.firstNonNumeric)?.firstNonNumeric ?? null;
    for (const part of parts) {
      if (part.levels === null || part.codes === null) {
        merged.dropLevels();
        return merged;
      }
      const globalCode = part.levels.map((level) => {
        let code = merged.levelCodes.get(level);
        if (code === undefined) {
          code = merged.levelCodes.size;
          merged.levelCodes.set(level, code);
        }
        return code;
      });
      if (merged.levelCodes.size > levelLimit) {
        merged.dropLevels();
        return merged;
      }
      const codes = merged.codes as ChunkedInt32;
      for (const code of part.codes) codes.push(code < 0 ? code : globalCode[code]);
    }
    return merged;
  }

  /** True when the column can be one-hot encoded or used as class labels. */
  get hasLevels(): boolean {
    return this.codes !== null;
  }

  /** The distinct non-missing tokens in first-appearance order (their codes are their indices). */
  get levels(): string[] {
    return [...this.levelCodes.keys()];
  }

  /** Per-row codes into `levels`, -1 for missing. Only valid when `hasLevels`. */
  takeCodes(): Int32Array {
    return this.requireCodes().toArray();
  }

  /** The per-row codes as consecutive arrays of CHUNK_LENGTH (views, not copies). */
  codeViews(): Int32Array[] {
    return this.requireCodes().views();
  }

  get distinctCount(): number {
    return this.levelsDropped ? Infinity : this.levelCodes.size;
  }

  release(): void {
    this.codes?.release();
  }

  private requireCodes(): ChunkedInt32 {
    if (this.codes === null) throw new Error(`column ${this.name} has no level codes`);
    return this.codes;
  }

  private addLevel(token: string): void {
    const codes = this.codes as ChunkedInt32;
    let code = this.levelCodes.get(token);
    if (code === undefined) {
      code = this.levelCodes.size;
      if (code >= this.levelLimit) {
        this.dropLevels();
        return;
      }
      this.levelCodes.set(token, code);
    }
    codes.push(code);
  }

  private dropLevels(): void {
    this.codes?.release();
    this.codes = null;
    this.levelCodes.clear();
    this.levelsDropped = true;
  }
}
