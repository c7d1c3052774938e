import type { DataFilePreview } from "@/db/schema/analyses";
import { AnalysisInputError, quoteValue } from "@/lib/analysis/browser";
import { referenceWeightsSchema } from "@/lib/validation/analysis-options";
import {
  describeColumns,
  PREVIEW_ROWS,
  readCsvHead,
  summarizeCsvHead,
  type CsvPreviewSource,
} from "./csv-preview";

/** Reference weights are read whole; a model over thousands of features stays far below this. */
export const WEIGHTS_MAX_BYTES = 8 * 1024 * 1024;

/**
 * The preview of a dataset: at least two columns, since one is the label and another a feature
 * (one column often means the delimiter was not a comma, semicolon, tab or bar).
 */
export function inspectDataset(source: CsvPreviewSource): DataFilePreview {
  const head = readCsvHead(source);
  checkDatasetHeader(head.header, source.fileName);
  return summarizeCsvHead(head);
}

export function checkDatasetHeader(header: string[], fileName: string): void {
  if (header.length < 2) {
    throw new AnalysisInputError(`the header has one column only (${quoteValue(header[0])})`, {
      file: fileName,
      expected:
        "a label column and at least one feature column, separated by commas, semicolons or tabs",
    });
  }
}

/** The preview of a partition map, whose header must name `row_id` and `shard` (methods.md §1). */
export function inspectLayout(source: CsvPreviewSource): DataFilePreview {
  const head = readCsvHead(source);
  checkLayoutHeader(head.header, source.fileName);
  return summarizeCsvHead(head);
}

export function checkLayoutHeader(header: string[], fileName: string): void {
  const names = header.map((column) => column.toLowerCase());
  // The engine matches these names case-insensitively and ignores other columns; so does this check.
  if (!names.includes("row_id") || !names.includes("shard")) {
    throw new AnalysisInputError(`the header is ${quoteValue(header.join(","))}`, {
      file: fileName,
      expected:
        "a partition map with the header row_id,shard (row_id: the dataset's id or 0-based row number)",
    });
  }
}

/**
 * The preview of a reference weights file: valid JSON of referenceWeightsSchema's shape with one
 * row per class (one for regression), each with a weight per feature plus the bias last. Shown as
 * a table with a row per class.
 */
export function inspectWeights(text: string, fileName: string): DataFilePreview {
  let json: unknown;
  try {
    json = JSON.parse(text.replace(/^\uFEFF/, ""));
  } catch (error) {
    throw new AnalysisInputError(
      `this is not valid JSON (${error instanceof Error ? error.message : "parse error"})`,
      { file: fileName, expected: 'a JSON object {"classes", "features", "weights"}' },
    );
  }
  const parsed = referenceWeightsSchema.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const where = issue.path.length > 0 ? `"${issue.path.join(".")}": ` : "";
    throw new AnalysisInputError(`${where}${issue.message}`, {
      file: fileName,
      expected:
        '{"classes": [..] or null, "features": [..], "weights": [[..], ..]} with finite numbers',
    });
  }
  const { classes, features, weights } = parsed.data;
  const expectedRows = classes === null ? 1 : classes.length;
  if (weights.length !== expectedRows) {
    throw new AnalysisInputError(`"weights" has ${weights.length} rows`, {
      file: fileName,
      expected: `${expectedRows} (${classes === null ? "one row for regression" : "one row per class"})`,
    });
  }
  const badRow = weights.findIndex((row) => row.length !== features.length + 1);
  if (badRow >= 0) {
    throw new AnalysisInputError(`"weights" row ${badRow} has ${weights[badRow].length} numbers`, {
      file: fileName,
      expected: `${features.length + 1}: one per feature plus the bias last`,
    });
  }
  const header = ["class", ...features, "bias"];
  const rows = weights.map((row, index) => [classes?.[index] ?? "(target)", ...row.map(String)]);
  return {
    columns: describeColumns(header, rows),
    rows: rows.slice(0, PREVIEW_ROWS),
    truncated: rows.length > PREVIEW_ROWS,
  };
}
