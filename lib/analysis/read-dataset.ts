import {
  completeDataset,
  DatasetRowCollector,
  findHeaderColumn,
  locateColumns,
  type DatasetColumnChoice,
} from "./dataset-rows";
import { RowStore } from "./row-store";
import { readCsvInParallel } from "./parallel-read";
import type { StoredMatrix } from "./stored-matrix";
import { detectLocalTableFormat, isLocalFile, readTable, type TableSource } from "./table-reader";
import type { CsvFormat } from "./text-format";
import type { RawDataset, ReadDatasetOptions } from "./raw-dataset";
import { trimToken } from "./tokens";

export type { DatasetColumnChoice } from "./dataset-rows";
export type { RawDataset, ReadDatasetOptions } from "./raw-dataset";

/**
 * Reads the dataset once (CSV, gzip CSV or Parquet: table-reader.ts), keeping only the columns in
 * use: rows with a missing label are dropped and counted, every other row is assigned to a shard
 * through the partition map (by the id column or by 0-based row index) or the shard column, and the
 * assignment is validated as methods.md §1 requires (unknown ids, ids used twice, unassigned rows).
 */
export async function readDataset(
  source: TableSource,
  fileName: string,
  columns: DatasetColumnChoice,
  options: ReadDatasetOptions & { memory?: undefined },
): Promise<RawDataset>;
export async function readDataset(
  source: TableSource,
  fileName: string,
  columns: DatasetColumnChoice,
  options: ReadDatasetOptions,
): Promise<RawDataset<Float64Array | StoredMatrix>>;
export async function readDataset(
  source: TableSource,
  fileName: string,
  columns: DatasetColumnChoice,
  {
    partition,
    dropUnassignedRows,
    onBytesRead,
    threads = 1,
    format: formatChoice = {},
    keptRowText,
    memory,
    firstRowIndex,
  }: ReadDatasetOptions,
): Promise<RawDataset<Float64Array | StoredMatrix>> {
  // Parts of a file are cut at line feeds, which only UTF-8 (or ASCII) text allows, and take the
  // delimiter and decimal mark found in its first lines.
  const detectedFormat =
    (formatChoice.encoding ?? "utf-8") === "utf-8" &&
    formatChoice.delimiter === undefined &&
    formatChoice.decimalMark === undefined;
  if (threads > 1 && partition === null && isLocalFile(source) && detectedFormat) {
    if ((await detectLocalTableFormat(source.path)) === "csv") {
      const read = await readCsvInParallel(source.path, fileName, columns, threads, {
        dropUnassignedRows,
        onBytesRead,
        memory,
      });
      if (read) return read;
    }
  }
  // Created in the header callback, once the columns are known (the cast keeps TypeScript from
  // narrowing them to null).
  let collector = null as DatasetRowCollector | null;
  let featureValues = null as RowStore | null;
  let format: CsvFormat | null = null;
  let keptRowTextIndices: number[] = [];
  try {
    return await readRows();
  } catch (error) {
    featureValues?.discard();
    throw error;
  }

  async function readRows(): Promise<RawDataset<Float64Array | StoredMatrix>> {
    const totalRows = await readTable(
      source,
      fileName,
      {
        onProgress: onBytesRead,
        onHeader(header, detected) {
          format = detected ?? null;
          const positions = locateColumns(header, fileName, columns);
          featureValues = new RowStore(positions.features.length + 1, { memory });
          collector = new DatasetRowCollector(
            header,
            fileName,
            positions,
            columns.idColumn,
            partition,
            featureValues,
            detected?.decimalMark,
          );
          keptRowTextIndices = (keptRowText?.columns ?? []).map(({ name, role }) =>
            findHeaderColumn(header, fileName, name, role),
          );
        },
        onRow(fields, rowIndex) {
          const rows = collector as DatasetRowCollector;
          const keptBefore = rows.keptRows;
          rows.addRow(fields, rowIndex);
          if (keptRowText && rows.keptRows > keptBefore) {
            keptRowText.onRow(
              keptRowTextIndices.map((index) => trimToken(fields[index])),
              rowIndex,
            );
          }
        },
      },
      formatChoice,
      firstRowIndex,
    );
    const rows = collector as DatasetRowCollector;
    return completeDataset(
      {
        fileName,
        totalRows,
        keptRows: rows.keptRows,
        droppedMissingLabel: rows.droppedMissingLabel,
        label: rows.label,
        labelValues: rows.labelValues.toArray(),
        features: rows.features,
        featureValues: (featureValues as RowStore).finish(),
        featuresNamed: columns.features !== undefined,
        format,
        shardCodes: rows.shardCodes.toArray(),
        shardIds: rows.shardIds,
      },
      { count: rows.unassignedCount, firstRows: rows.unassignedRows },
      columns,
      { partition, dropUnassignedRows },
    );
  }
}
