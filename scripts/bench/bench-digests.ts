import { createReadStream, createWriteStream } from "node:fs";
import { once } from "node:events";
import path from "node:path";
import { createInterface } from "node:readline";
import { analyzeFromDigests, LocalDigestClient, readClientRows } from "../../lib/analysis";

/**
 * Splits a bench file (shard column last) into `clients` files of whole shards, shard m to client
 * m mod clients, each with the header: the rows of a federated team.
 */
export async function splitBenchFile(file: string, clients: number): Promise<string[]> {
  const names = Array.from({ length: clients }, (_, c) =>
    file.replace(/\.csv$/, `.client${c + 1}of${clients}.csv`),
  );
  const outputs = names.map((name) => createWriteStream(name));
  const lines = createInterface({ input: createReadStream(file) });
  let header = true;
  const shardIndex = new Map<string, number>();
  for await (const line of lines) {
    if (header) {
      for (const output of outputs) output.write(`${line}\n`);
      header = false;
      continue;
    }
    const shard = line.slice(line.lastIndexOf(",") + 1);
    let index = shardIndex.get(shard);
    if (index === undefined) {
      index = shardIndex.size;
      shardIndex.set(shard, index);
    }
    const output = outputs[index % clients];
    if (!output.write(`${line}\n`)) await once(output, "drain");
  }
  await Promise.all(
    outputs.map((output) => new Promise<void>((resolve) => output.end(() => resolve()))),
  );
  return names;
}

/**
 * The pooled-optimum fit of methods.md §9 with every client in this process (no network): the
 * time from the encoding to W*, the clients' evaluation rounds included. Returns seconds and the
 * number of rounds.
 */
export async function timeDigestFit(
  files: string[],
): Promise<{ seconds: number; rounds: number; verdict: string }> {
  const clients = await Promise.all(
    files.map(async (file, c) => {
      const raw = await readClientRows({
        data: { path: file },
        dataName: path.basename(file),
        columns: { labelColumn: "label", shardColumn: "shard" },
      });
      return new LocalDigestClient(`client-${c + 1}`, raw);
    }),
  );
  let fitStarted = 0;
  let fitEnded = 0;
  let rounds = 0;
  try {
    const summary = await analyzeFromDigests(clients, {
      lambda: 1e-3,
      reference: "optimum",
      plan: { localSteps: 10, rounds: 100, batchSize: 32 },
      onRound: (round, evaluations) => {
        if (round === "fit" && evaluations === 0) fitStarted = performance.now();
        if (round === "fit" && evaluations !== undefined) rounds = evaluations;
        if (round === "gradients") fitEnded = performance.now();
      },
    });
    return { seconds: (fitEnded - fitStarted) / 1000, rounds, verdict: summary.advice.verdict };
  } finally {
    await Promise.all(clients.map((client) => client.close()));
  }
}
