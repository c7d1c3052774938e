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
): Promise<LocalDigestClient> {
  const raw = await readClientRows({
    data: Readable.from([Buffer.from(csv, "utf8")]),
    dataName: `${name}.csv`,
    columns,
  });
  return new LocalDigestClient(name, raw, options);
}
