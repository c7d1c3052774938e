import { describe, expect, it } from "vitest";
import {
  analyzeFromDigests,
  type DigestClientConnection,
  type DigestEncoding,
  type EvaluationRequest,
  type EvaluationSums,
} from "@/lib/analysis";
import { analyzeText } from "../support/analyze-text";
import { loadPenguinsCsv } from "../support/open-data";
import { compareSummaries, createTextClient, splitAmongClients } from "./support";

/** Wraps a client so that its `failAt`-th evaluation fails once, as a dropped connection would. */
function dropOnce(client: DigestClientConnection, failAt: number) {
  let evaluations = 0;
  let rejoin: () => void = () => {};
  const rejoined = new Promise<void>((resolve) => (rejoin = resolve));
  const flaky: DigestClientConnection = {
    name: client.name,
    schema: () => client.schema(),
    gram: (encoding) => client.gram(encoding),
    gradients: (encoding, request) => client.gradients(encoding, request),
    async evaluate(encoding: DigestEncoding, request: EvaluationRequest): Promise<EvaluationSums> {
      evaluations++;
      if (evaluations === failAt) {
        // The client comes back after the coordinator noticed the loss.
        queueMicrotask(rejoin);
        throw new Error("connection lost");
      }
      return client.evaluate(encoding, request);
    },
  };
  return { flaky, rejoined, evaluationsSeen: () => evaluations };
}

describe("a client that drops out during the fit (methods.md §9)", () => {
  it("rejoins and the analysis ends with the central summary; without a retry it fails", async () => {
    // Penguins (vega-datasets npm package), shards by island, two clients.
    const { csv } = loadPenguinsCsv();
    const rows = csv.trim().split("\n");
    const withShard = [
      `${rows[0]},shard`,
      ...rows.slice(1).map((line) => `${line},${line.split(",")[2]}`),
    ].join("\n");
    const columns = { labelColumn: "Species", shardColumn: "shard", idColumn: "row" };
    const central = await analyzeText(`${withShard}\n`, columns);
    const parts = splitAmongClients(`${withShard}\n`, "shard", 2, 9);
    const clients = await Promise.all(
      parts.map((part, c) => createTextClient(`client-${c + 1}`, part, columns)),
    );
    try {
      const dropping = dropOnce(clients[1], 4);
      const errors: string[] = [];
      const merged = await analyzeFromDigests([clients[0], dropping.flaky], {
        lambda: 1e-3,
        reference: "optimum",
        plan: { localSteps: 10, rounds: 100, batchSize: 32 },
        onClientError: async (client, error) => {
          errors.push(`${client}: ${(error as Error).message}`);
          await dropping.rejoined;
          return "retry";
        },
      });
      expect(errors).toEqual(["client-2: connection lost"]);
      expect(dropping.evaluationsSeen()).toBeGreaterThan(4);
      const differences = compareSummaries(central, merged, false).filter(
        (line) => !line.startsWith(".model.gradNorm:"),
      );
      expect(differences).toEqual([]);

      const failing = dropOnce(clients[1], 2);
      await expect(
        analyzeFromDigests([clients[0], failing.flaky], {
          lambda: 1e-3,
          reference: "optimum",
          plan: { localSteps: 10, rounds: 100, batchSize: 32 },
        }),
      ).rejects.toThrow("connection lost");
    } finally {
      await Promise.all(clients.map((client) => client.close()));
    }
  }, 120_000);
});
