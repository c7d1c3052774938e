import { quoteValue, showValue } from "./quote-value";

/** Where in the user's input a problem was found; every field is optional but as many as known are set. */
export interface InputProblemLocation {
  /** The file's name as the user knows it (a path for the CLI, the upload's name in the web app). */
  file?: string;
  /** 0-based data row index (header excluded), the same numbering the partition map uses. */
  row?: number;
  column?: string;
  /** The analysis option at fault, by its name in the options (e.g. batchSize, simulate.seeds). */
  option?: string;
  /** What would have been accepted, e.g. "a finite number". */
  expected?: string;
}

/**
 * Bad input: the data, partition map, options or reference weights do not satisfy methods.md §1.
 * The message is written for the person who supplied the input (the CLI prints it and exits 2; the
 * web app shows it), so it names the file, row, column and what was expected. Anything else thrown
 * by the engine is an internal error.
 */
export class AnalysisInputError extends Error {
  /** The problem alone, without its location (which `message` adds). */
  readonly problem: string;
  readonly file?: string;
  readonly row?: number;
  readonly column?: string;
  readonly option?: string;
  readonly expected?: string;

  constructor(problem: string, location: InputProblemLocation = {}) {
    super(describeProblem(problem, location));
    this.name = "AnalysisInputError";
    this.problem = problem;
    this.file = location.file;
    this.row = location.row;
    this.column = location.column;
    this.option = location.option;
    this.expected = location.expected;
  }
}

function describeProblem(
  problem: string,
  { file, row, column, option, expected }: InputProblemLocation,
) {
  const where: string[] = [];
  if (file !== undefined) where.push(showValue(file));
  if (row !== undefined) where.push(`data row ${row} (0-based, header excluded; line ${row + 2})`);
  if (column !== undefined) where.push(`column ${quoteValue(column)}`);
  if (option !== undefined) where.push(`option ${option}`);
  const prefix = where.length > 0 ? `${where.join(", ")}: ` : "";
  const suffix = expected !== undefined ? ` (expected ${expected})` : "";
  return `${prefix}${problem}${suffix}`;
}

/** Lists the first few offenders of a validation so a message stays short but actionable. */
export function listFirst(items: readonly (string | number)[], total: number, limit = 5): string {
  const shown = items
    .slice(0, limit)
    .map((item) => (typeof item === "string" ? quoteValue(item) : item));
  return total > shown.length ? `${shown.join(", ")}, … (${total} in all)` : shown.join(", ");
}
