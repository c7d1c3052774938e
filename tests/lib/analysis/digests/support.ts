import { Readable } from "node:stream";
import { LocalDigestClient, readClientRows } from "@/lib/analysis";
import { SeededRandom } from "@/lib/math/random";

/**
 * Splits CSV text with a shard column among `clientCount` clients: whole shards, dealt by a seeded
 * shuffle, each client getting at least one. Returns each client's CSV text (header + its rows).
 */
export function splitAmongClients(
  csv: string,
  shardColumn: string,
  clientCount: number,
  seed: number,
): string[] {
  const [header, ...lines] = csv.trim().split("\n");
  const shardIndex = header.split(",").indexOf(shardColumn);
  const shards = [...new Set(lines.map((line) => line.split(",")[shardIndex]))];
  const random = new SeededRandom(seed);
  for (let i = shards.length - 1; i > 0; i--) {
    const j = random.integer(i + 1);
    [shards[i], shards[j]] = [shards[j], shards[i]];
  }
  const clientOf = new Map(shards.map((shard, index) => [shard, index % clientCount]));
  const parts = Array.from({ length: clientCount }, () => [header]);
  for (const line of lines) parts[clientOf.get(line.split(",")[shardIndex]) as number].push(line);
  return parts.map((part) => `${part.join("\n")}\n`);
}

/** A client over CSV text (read with the engine's reader, as a file would be). */
export async function createTextClient(
  name: string,
  csv: string,
  columns: { labelColumn: string; shardColumn: string; idColumn?: string },
  options: ConstructorParameters<typeof LocalDigestClient>[2] = {},
  { dropUnassignedRows = false }: { dropUnassignedRows?: boolean } = {},
): Promise<LocalDigestClient> {
  const raw = await readClientRows({
    data: Readable.from([Buffer.from(csv, "utf8")]),
    dataName: `${name}.csv`,
    columns,
    dropUnassignedRows,
  });
  return new LocalDigestClient(name, raw, options);
}

/**
 * Keys outside §6's contract that differ by construction: how the fit got there, the notes, and the
 * text format each client read its own files in (the coordinator never sees their text, so the
 * merged summary states none).
 */
const SKIPPED = new Set(["engineVersion", "optimizer", "warnings", "digests", "format"]);
/** Regression label skew comes from a 4096-cell histogram (methods.md §9's stated exception). */
const HISTOGRAM_KEYS = new Set([
  "labelSkew",
  "tv",
  "hellinger",
  "js",
  "kl",
  "classesPresent",
  "effectiveClasses",
  "labelCounts",
]);

/**
 * Every number of `actual` within 1e-9 relative of `expected`, lists the keys that differ. A vector
 * (an array of numbers: a row of weights) is compared relative to its largest entry, as a vector is.
 */
export function compareSummaries(
  expected: unknown,
  actual: unknown,
  skipHistogramKeys: boolean,
  path = "",
  vectorScale = 0,
): string[] {
  if (typeof expected === "number" && typeof actual === "number") {
    const scale = Math.max(Math.abs(expected), Math.abs(actual), vectorScale);
    return Math.abs(expected - actual) <= 1e-9 * scale
      ? []
      : [`${path}: central ${expected}, digests ${actual}`];
  }
  if (Array.isArray(expected) && Array.isArray(actual)) {
    if (expected.length !== actual.length) return [`${path}: lengths differ`];
    const numbers = expected.every((item) => typeof item === "number");
    const scale = numbers ? Math.max(...expected.map((item: number) => Math.abs(item))) : 0;
    return expected.flatMap((item, i) =>
      compareSummaries(item, actual[i], skipHistogramKeys, `${path}[${i}]`, scale),
    );
  }
  if (expected && actual && typeof expected === "object" && typeof actual === "object") {
    return Object.keys(expected).flatMap((key) => {
      if (SKIPPED.has(key) || (skipHistogramKeys && HISTOGRAM_KEYS.has(key))) return [];
      return compareSummaries(
        (expected as Record<string, unknown>)[key],
        (actual as Record<string, unknown>)[key],
        skipHistogramKeys,
        `${path}.${key}`,
      );
    });
  }
  return expected === actual
    ? []
    : [`${path}: central ${String(expected)}, digests ${String(actual)}`];
}
