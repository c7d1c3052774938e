// The defining test of methods.md §9 through the server: two clients run the online client's own
// loop against the /api/v1/digests handlers, the worker's coordinator merges their digests, and the
// stored report's summary (read back through GET /api/v1/reports/{id}) equals the central
// analysis of the pooled rows — every summary key to 1e-9 relative — for each reference kind.
// Open data: penguins from the `vega-datasets` npm package, sharded by island.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { POST as createFederated } from "@/app/api/v1/federated/route";
import { POST as issueKey } from "@/app/api/v1/federated/[analysisId]/keys/route";
import { GET as getReport } from "@/app/api/v1/reports/[reportId]/route";
import { closeDb } from "@/db/client";
import { readClientRows, type PartitionSummary } from "@/lib/analysis";
import { runOnlineClient } from "@/lib/cli/digest-online";
import { DIGEST_CAUTION } from "@/lib/federated";
import { stopSendingBoss } from "@/lib/jobs";
import type { ReferenceWeights } from "@/lib/validation/analysis-options";
import { Readable } from "node:stream";
import { compareSummaries } from "@/tests/lib/analysis/digests/support";
import { analyzeText } from "@/tests/lib/analysis/support/analyze-text";
import { PENGUIN_COLUMNS, createPenguinClients } from "@/tests/lib/federated/support";
import { createTeam } from "@/tests/support/accounts";
import { apiRequest, issueTestToken } from "@/tests/support/api-tokens";
import { createDigestRoutesClient } from "@/tests/support/digest-routes";

afterAll(async () => {
  await stopSendingBoss();
  await closeDb();
});

let token: string;
let texts: { north: string; south: string };
let pooledCsv: string;

beforeAll(async () => {
  const team = await createTeam();
  token = (await issueTestToken(team.analyst.id, team.workspaceId)).token;
  const clients = await createPenguinClients();
  texts = clients.texts;
  pooledCsv = clients.csv;
  await Promise.all([clients.north.close(), clients.south.close()]);
});

/** A federated analysis over the API with a key per client. */
async function createWithKeys(reference: "optimum" | "zero" | ReferenceWeights) {
  const created = await createFederated(
    apiRequest("/api/v1/federated", token, {
      title: "Penguins by island, federated",
      labelColumn: "Species",
      reference,
      clients: ["north", "south"],
    }),
  );
  expect(created.status).toBe(201);
  const { analysisId } = (await created.json()) as { analysisId: string };
  const keyOf = async (client: string) => {
    const response = await issueKey(
      apiRequest(`/api/v1/federated/${analysisId}/keys`, token, { client, lifetimeDays: 1 }),
      { params: Promise.resolve({ analysisId }) },
    );
    expect(response.status).toBe(201);
    return ((await response.json()) as { key: string }).key;
  };
  return { analysisId, keys: { north: await keyOf("north"), south: await keyOf("south") } };
}

/** One client's run of the online loop over its own rows (the CLI's readRows, from text). */
function runClient(
  name: "north" | "south",
  key: string,
  dropWhen?: Parameters<typeof createDigestRoutesClient>[1],
  reconnectLimitMs?: number,
) {
  return runOnlineClient({
    api: createDigestRoutesClient(key, dropWhen),
    print: () => {},
    log: () => {},
    waitSeconds: 5,
    reconnectLimitMs,
    readRows: (assignment) =>
      readClientRows({
        data: Readable.from([Buffer.from(texts[name], "utf8")]),
        dataName: `${name}.csv`,
        columns: { ...PENGUIN_COLUMNS, labelColumn: assignment.labelColumn },
      }),
  });
}

async function readSummary(reportId: string): Promise<PartitionSummary> {
  const response = await getReport(apiRequest(`/api/v1/reports/${reportId}`, token), {
    params: Promise.resolve({ reportId }),
  });
  expect(response.status).toBe(200);
  return (await response.json()) as PartitionSummary;
}

function expectEqualToCentral(central: PartitionSummary, merged: PartitionSummary) {
  expect(compareSummaries(central, merged, false)).toEqual([]);
  expect(merged.digests?.clients.map((client) => client.client)).toEqual(["north", "south"]);
  expect(merged.digests?.missingClients).toEqual([]);
  expect(merged.preprocessing.warnings).toContain(DIGEST_CAUTION);
}

describe("a federated analysis through the server equals the central analysis", () => {
  it("for zero, supplied weights and the pooled optimum", async () => {
    const optimum = await analyzeText(pooledCsv, PENGUIN_COLUMNS);
    const supplied: ReferenceWeights = {
      ...optimum.model.optimum,
      weights: optimum.model.optimum.weights.map((row) => row.map((v, j) => 0.5 * v + 0.01 * j)),
    };
    for (const reference of ["zero", supplied, "optimum"] as const) {
      const central =
        reference === "optimum"
          ? optimum
          : await analyzeText(pooledCsv, { ...PENGUIN_COLUMNS, reference });
      const { keys } = await createWithKeys(reference);
      const [northReport, southReport] = await Promise.all([
        runClient("north", keys.north),
        runClient("south", keys.south),
      ]);
      expect(northReport).toBe(southReport);
      expectEqualToCentral(central, await readSummary(northReport!));
    }
  }, 300_000);

  it("takes back a client that lost its connection during the fit", async () => {
    const { keys } = await createWithKeys("optimum");
    let answers = 0;
    // South's first run drops its third answer to the fit and gives up at once.
    const firstRun = runClient(
      "south",
      keys.south,
      (method, path) => method === "POST" && path.includes("/exchanges/") && ++answers === 3,
      0,
    );
    const north = runClient("north", keys.north);
    await expect(firstRun).rejects.toThrow(/connection dropped/);
    // It rejoins with the same key: round 1 is already accepted, the open question waits for it.
    const [northReport, southReport] = await Promise.all([north, runClient("south", keys.south)]);
    expect(southReport).toBe(northReport);
    expectEqualToCentral(
      await analyzeText(pooledCsv, PENGUIN_COLUMNS),
      await readSummary(northReport!),
    );
  }, 300_000);
});
