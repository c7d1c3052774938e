import { MAX_ONE_HOT_LEVELS, MIN_NUMERIC_SHARE } from "../column-accumulator";
import type { Task } from "../design";
import {
  sendsLabelLevels,
  type EvaluationSums,
  type GradientDigest,
  type PointSums,
  type SchemaDigest,
  type ShardGradientDigest,
  type ShardSchemaDigest,
} from "./digest-format";
import { parseNumberToken } from "../tokens";
import { poolMoments } from "./merge-schemas";

/**
 * Digests of the parts of one dataset (byte ranges of one file, say) combined into the digest the
 * whole dataset would give as one client. Unlike federated clients, parts may each hold rows of the
 * same shard: every quantity of methods.md §9 is a count, a sum, a minimum or a maximum (or, for the
 * second moments, merges by Chan's update), so a shard's digests from several parts add up to its
 * digest. `client` names the whole; `task` is the analysis's when it fixes one (a numeric label's
 * counts per value are kept as one client would send them).
 */
export function combineSchemaDigests(
  client: string,
  parts: SchemaDigest[],
  task: Task | undefined,
): SchemaDigest {
  const [first] = parts;
  const labelNumeric = parts.every((part) => part.labelNumeric);
  // As one client decides, by the distinct values over all its rows.
  const allShards = parts.flatMap((part) => part.shards);
  const sendsLevels =
    allShards.every((shard) => shard.label.levels !== null) &&
    sendsLabelLevels(
      labelNumeric,
      Object.keys(combineLevels(allShards.map((shard) => shard.label.levels ?? {}))).length,
      task,
    );
  const shards = new Map<string, ShardSchemaDigest[]>();
  for (const part of parts) {
    for (const shard of part.shards) shards.set(shard.id, [...(shards.get(shard.id) ?? []), shard]);
  }
  return {
    ...first,
    client,
    labelNumeric,
    columnsNumeric: first.columnsNumeric.map((_, k) =>
      parts.every((part) => part.columnsNumeric[k]),
    ),
    ...combineValueKinds(parts),
    totalRows: sumOf(parts, (part) => part.totalRows),
    droppedRowsMissingLabel: sumOf(parts, (part) => part.droppedRowsMissingLabel),
    droppedRowsUnassigned: sumOf(parts, (part) => part.droppedRowsUnassigned),
    shards: [...shards.entries()].map(([id, pieces]) => {
      // The label is a column whose present values are the shard's kept rows.
      const label = combineColumn(pieces.map((piece) => ({ ...piece.label, present: piece.rows })));
      return {
        id,
        rows: sumOf(pieces, (piece) => piece.rows),
        label: {
          sum: label.sum,
          sumSquaredDeviations: label.sumSquaredDeviations,
          min: label.min,
          max: label.max,
          levels: sendsLevels ? label.levels : null,
        },
        columns: pieces[0].columns.map((_, k) =>
          combineColumn(pieces.map((piece) => piece.columns[k])),
        ),
      };
    }),
  };
}

type ColumnDigest = ShardSchemaDigest["columns"][number];

/** One column's digests of one shard from several parts; null wherever a part sent null. */
function combineColumn<Column extends ColumnDigest>(pieces: Column[]): Column {
  const numeric = pieces.every((piece) => piece.sum !== null || piece.present === 0);
  const present = pieces.filter((piece) => piece.present > 0);
  const moments = numeric && present.length > 0 ? poolMoments(present) : null;
  const levels = pieces.every((piece) => piece.levels !== null)
    ? combineLevels(pieces.map((piece) => piece.levels as Record<string, number>))
    : null;
  return {
    ...pieces[0],
    present: sumOf(pieces, (piece) => piece.present),
    sum: moments && moments.sum,
    sumSquaredDeviations: moments && moments.sumSquaredDeviations,
    min: moments && Math.min(...present.map((piece) => piece.min as number)),
    max: moments && Math.max(...present.map((piece) => piece.max as number)),
    levels,
  };
}

function combineLevels(pieces: Record<string, number>[]): Record<string, number> {
  const levels: Record<string, number> = {};
  for (const piece of pieces) {
    for (const [level, count] of Object.entries(piece))
      levels[level] = (levels[level] ?? 0) + count;
  }
  return levels;
}

/** Round-2 digests of the parts of one dataset at the same request, combined shard by shard. */
export function combineGradientDigests(client: string, parts: GradientDigest[]): GradientDigest {
  const [first] = parts;
  const shards = new Map<string, ShardGradientDigest[]>();
  for (const part of parts) {
    for (const shard of part.shards) shards.set(shard.id, [...(shards.get(shard.id) ?? []), shard]);
  }
  return {
    ...first,
    client,
    totalRows: sumOf(parts, (part) => part.totalRows),
    droppedRowsMissingLabel: sumOf(parts, (part) => part.droppedRowsMissingLabel),
    droppedRowsUnassigned: sumOf(parts, (part) => part.droppedRowsUnassigned),
    gram: first.gram.map((row, j) => row.map((_, k) => sumOf(parts, (part) => part.gram[j][k]))),
    shards: [...shards.entries()].map(([id, pieces]) => ({
      id,
      rows: sumOf(pieces, (piece) => piece.rows),
      labelCounts:
        pieces[0].labelCounts &&
        pieces[0].labelCounts.map((_, c) => sumOf(pieces, (piece) => piece.labelCounts?.[c] ?? 0)),
      targetHistogram: pieces[0].targetHistogram && combineHistograms(pieces),
      featureSums: pieces[0].featureSums.map((_, j) =>
        sumOf(pieces, (piece) => piece.featureSums[j]),
      ),
      atReference: combinePointSums(pieces.map((piece) => piece.atReference)),
      alongPath: pieces[0].alongPath.map((_, t) =>
        combinePointSums(pieces.map((piece) => piece.alongPath[t])),
      ),
    })),
  };
}

function combineHistograms(pieces: ShardGradientDigest[]): [number, number][] {
  const cells = new Map<number, number>();
  for (const piece of pieces) {
    for (const [cell, rows] of piece.targetHistogram ?? []) {
      cells.set(cell, (cells.get(cell) ?? 0) + rows);
    }
  }
  return [...cells.entries()].sort(([a], [b]) => a - b);
}

function combinePointSums(pieces: PointSums[]): PointSums {
  return {
    lossSum: sumOf(pieces, (piece) => piece.lossSum),
    gradientSum: pieces[0].gradientSum.map((_, k) =>
      sumOf(pieces, (piece) => piece.gradientSum[k]),
    ),
    squaredGradientNormSum: pieces.every((piece) => piece.squaredGradientNormSum !== null)
      ? sumOf(pieces, (piece) => piece.squaredGradientNormSum as number)
      : null,
  };
}

/** The parts' answers to one evaluation of the fit, added. */
export function combineEvaluationSums(parts: EvaluationSums[]): EvaluationSums {
  const [first] = parts;
  return {
    rows: sumOf(parts, (part) => part.rows),
    lossSum: sumOf(parts, (part) => part.lossSum),
    gradientSum: first.gradientSum.map((_, k) => sumOf(parts, (part) => part.gradientSum[k])),
    hessianSum:
      first.hessianSum &&
      first.hessianSum.map((_, k) => sumOf(parts, (part) => part.hessianSum?.[k] ?? 0)),
  };
}

/** Σ in the order given (parts are few; each term is already a compensated sum). */
function sumOf<Item>(items: Item[], value: (item: Item) => number): number {
  let total = 0;
  for (const item of items) total += value(item);
  return total;
}

/** The parts' counts of numbers and other values per column, summed; none if a part has none. */
function combineValueKinds(parts: SchemaDigest[]): Pick<SchemaDigest, "columnsValueKinds"> {
  const counted = parts.map((part) => part.columnsValueKinds);
  // Stated as undefined, not left out: the first part's own counts are spread into the whole first.
  if (counted.some((kinds) => kinds === undefined)) return { columnsValueKinds: undefined };
  return {
    columnsValueKinds: parts[0].features.map((_, k) => ({
      numbers: sumOf(counted, (kinds) => kinds![k].numbers),
      others: sumOf(counted, (kinds) => kinds![k].others),
    })),
  };
}

/**
 * Feature columns of a dataset read in parts that only a read of all its rows can answer for as one
 * process does. By methods.md §1, a column with some values that are not numbers is a numeric column
 * with bad values when at least 95% of its values are numbers — an error naming its first bad rows,
 * or (the user's choice) bad values counted as missing — and otherwise a category, or left out past
 * 32 distinct values; a named feature past 32 is an error naming the row of its first non-number.
 * With the parts' counts of numbers and other values (`columnsValueKinds`) only the numeric columns
 * with bad values and the named features past 32 values need every row; without them, any column
 * whose tokens mix numbers with other values or whose distinct values a part did not count.
 */
export function findColumnsNeedingAllRows(schema: SchemaDigest): string[] {
  return schema.features.filter((_, k) => {
    if (schema.columnsNumeric[k]) return false;
    const levels = schema.shards.map((shard) => shard.columns[k].levels);
    const allCounted = levels.every((counts) => counts !== null);
    const distinct = new Set(levels.flatMap((counts) => Object.keys(counts ?? {})));
    if (schema.featuresNamed && (!allCounted || distinct.size > MAX_ONE_HOT_LEVELS)) return true;
    const kinds = schema.columnsValueKinds?.[k];
    if (kinds) {
      return (
        kinds.others > 0 && kinds.numbers >= MIN_NUMERIC_SHARE * (kinds.numbers + kinds.others)
      );
    }
    if (!allCounted) return true;
    const isNumber = (token: string) => Number.isFinite(parseNumberToken(token));
    const tokens = [...distinct];
    return tokens.some(isNumber) && !tokens.every(isNumber);
  });
}
