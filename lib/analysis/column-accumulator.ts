import { ChunkedInt32 } from "./chunked-arrays";
import { AnalysisInputError } from "./errors";
import { quoteValue } from "./quote-value";
import type { DecimalMark } from "./text-format";
import { isMissingToken, parseNumberToken, parseSimpleDecimal, trimToken } from "./tokens";

/** Most distinct values a non-numeric feature may have and still be one-hot encoded (methods.md §1). */
export const MAX_ONE_HOT_LEVELS = 32;
/** Share of non-missing values that must be numbers for a column to be numeric with bad values (§1). */
export const MIN_NUMERIC_SHARE = 0.95;
/** Values that are not numbers kept per column for messages. */
const LISTED_NON_NUMBERS = 5;
/** "Infinity" is a word, not a number too large (that is written in digits, e.g. "1e999"). */
const SPELLED_INFINITY = /^[+-]?infinity$/i;

/**
 * What an accumulator knows at the end of one part of a file read on its own thread: plain data,
 * so it can be posted between threads (structured clone; `codes` can be transferred).
 */
export interface ColumnSnapshot {
  missingCount: number;
  numberCount: number;
  nonNumberCount: number;
  firstNonNumbers: { row: number; token: string }[];
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
  private readonly pointCode: number;
  missingCount = 0;
  /** Non-missing values that parse as finite numbers. */
  numberCount = 0;
  /** Non-missing values that do not (methods.md §1: "Inf", "Infinity", "abc", "0x1F", …). */
  nonNumberCount = 0;
  /** The first few values that are not numbers, with their rows, for messages. */
  readonly firstNonNumbers: { row: number; token: string }[] = [];

  constructor(
    name: string,
    private readonly fileName: string,
    /** Distinct values kept before the dictionary is dropped; Infinity keeps all (the label). */
    private readonly levelLimit: number,
    private readonly decimalMark: DecimalMark = ".",
  ) {
    this.name = name;
    this.pointCode = decimalMark.charCodeAt(0);
  }

  /** True when every non-missing value is a finite number (also when there is none). */
  get numeric(): boolean {
    return this.nonNumberCount === 0;
  }

  /**
   * True for methods.md §1's numeric column with bad values: some values are not numbers, but at
   * least MIN_NUMERIC_SHARE of the non-missing ones are.
   */
  get hasBadNumbers(): boolean {
    return (
      this.nonNumberCount > 0 &&
      this.numberCount >= MIN_NUMERIC_SHARE * (this.numberCount + this.nonNumberCount)
    );
  }

  /** The first value that is not a number, for messages; null when there is none. */
  get firstNonNumeric(): { row: number; token: string } | null {
    return this.firstNonNumbers[0] ?? null;
  }

  /** Counts the bad values of a numeric column with bad values as missing (the user's choice). */
  countBadNumbersAsMissing(): number {
    const count = this.nonNumberCount;
    this.missingCount += count;
    this.nonNumberCount = 0;
    return count;
  }

  /** Takes one raw field of a kept row; returns its number, NaN when missing or not a number. */
  add(field: string, rowIndex: number): number {
    // Most fields of a numeric column are plain decimals: take them without trimming or checking
    // for missing-value tokens (a plain decimal is neither padded nor missing).
    const simple = parseSimpleDecimal(field, this.pointCode);
    if (simple === simple) {
      this.numberCount++;
      if (this.codes !== null) this.addLevel(field);
      return simple;
    }
    const token = trimToken(field);
    if (isMissingToken(token)) {
      this.missingCount++;
      this.codes?.push(-1);
      return Number.NaN;
    }
    let value = parseNumberToken(token, this.decimalMark);
    if ((value === Infinity || value === -Infinity) && !SPELLED_INFINITY.test(token)) {
      throw new AnalysisInputError(`the value ${quoteValue(token)} is too large`, {
        file: this.fileName,
        row: rowIndex,
        column: this.name,
        expected: "a finite number (|x| < 1.8e308) or a missing-value token",
      });
    }
    if (value - value === 0) {
      this.numberCount++;
    } else {
      // NaN, or ±Infinity spelled out: not a finite number.
      value = Number.NaN;
      this.nonNumberCount++;
      if (this.firstNonNumbers.length < LISTED_NON_NUMBERS) {
        this.firstNonNumbers.push({ row: rowIndex, token });
      }
    }
    if (this.codes !== null) this.addLevel(token);
    return value;
  }

  /** The column's state, for merging with the other parts of the file (see `merge`). */
  snapshot(): ColumnSnapshot {
    return {
      missingCount: this.missingCount,
      numberCount: this.numberCount,
      nonNumberCount: this.nonNumberCount,
      firstNonNumbers: this.firstNonNumbers,
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
    for (const part of parts) {
      merged.missingCount += part.missingCount;
      merged.numberCount += part.numberCount;
      merged.nonNumberCount += part.nonNumberCount;
      for (const example of part.firstNonNumbers) {
        if (merged.firstNonNumbers.length < LISTED_NON_NUMBERS)
          merged.firstNonNumbers.push(example);
      }
    }
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
