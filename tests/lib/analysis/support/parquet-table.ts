import { parquetWriteBuffer } from "hyparquet-writer";

/**
 * A CSV table (no quoted fields) written as Parquet by hyparquet-writer (used in the tests only;
 * Debian packages no Parquet writer for Python here), `rowGroupSize` rows a row group: a column
 * whose every non-empty field is a number becomes DOUBLE (empty fields null), any other STRING.
 */
export function writeCsvAsParquet(csv: string, rowGroupSize: number): Uint8Array {
  const [header, ...lines] = csv.trim().split("\n");
  const rows = lines.map((line) => line.split(","));
  const columnData = header.split(",").map((name, column) => {
    const fields = rows.map((fields) => fields[column]);
    const numeric = fields.every((field) => field === "" || Number.isFinite(Number(field)));
    return numeric
      ? {
          name,
          data: fields.map((field) => (field === "" ? null : Number(field))),
          type: "DOUBLE" as const,
          nullable: true,
        }
      : { name, data: fields, type: "STRING" as const, nullable: true };
  });
  return new Uint8Array(parquetWriteBuffer({ columnData, rowGroupSize }));
}
