import type { DataFilePreview } from "@/db/schema/analyses";

type PreviewColumn = DataFilePreview["columns"][number];

/** A first guess at a dataset's roles, for the form to fill in; the user can change each one. */
export interface ColumnGuess {
  labelColumn: string;
  idColumn: string;
  /** "" when no column looks like a shard: the layout then comes from a partition map. */
  shardColumn: string;
}

// Names that data teams commonly give these columns (common practice, no source), compared
// case-insensitively after dropping spaces, dashes and underscores.
const LABEL_NAMES = ["label", "target", "class", "y", "outcome", "category", "species", "response"];
const ID_NAMES = ["id", "rowid", "row", "index", "uuid", "key", "recordid", "sampleid"];
const SHARD_NAMES = ["shard", "client", "clientid", "partition", "silo", "worker", "node", "site"];

const normalize = (name: string) => name.toLowerCase().replace(/[\s_-]/g, "");

function findByName(columns: PreviewColumn[], names: string[], taken: Set<string>) {
  return columns.find(
    (column) => !taken.has(column.name) && names.includes(normalize(column.name)),
  );
}

/**
 * Guesses the label, id and shard columns from names first, then from types: an id is a column
 * whose every value read is distinct (and numeric or ending in "id"), a label without a telling
 * name is the last column with few distinct values. Returns "" for any role it cannot guess.
 */
export function guessColumns(preview: DataFilePreview): ColumnGuess {
  const { columns, rows } = preview;
  const taken = new Set<string>();
  const claim = (column: PreviewColumn | undefined) => {
    if (column) taken.add(column.name);
    return column?.name ?? "";
  };
  const idColumn = claim(
    findByName(columns, ID_NAMES, taken) ??
      columns.find(
        (column) =>
          rows.length > 1 &&
          column.distinct === rows.length &&
          (column.type === "numeric" ? isCounting(preview, column.name) : /id$/i.test(column.name)),
      ),
  );
  const shardColumn = claim(findByName(columns, SHARD_NAMES, taken));
  const labelColumn = claim(
    findByName(columns, LABEL_NAMES, taken) ??
      [...columns]
        .reverse()
        .find(
          (column) =>
            !taken.has(column.name) &&
            column.type !== "empty" &&
            column.distinct <= Math.max(2, Math.min(20, rows.length / 2)),
        ),
  );
  return { labelColumn, idColumn, shardColumn };
}

/** Whole numbers going up by one, as a row number column does. */
function isCounting(preview: DataFilePreview, name: string): boolean {
  const index = preview.columns.findIndex((column) => column.name === name);
  const values = preview.rows.map((row) => Number(row[index]));
  return values.every(
    (value, at) => Number.isInteger(value) && (at === 0 || value === values[at - 1] + 1),
  );
}
