// Round 2 as files through the server (methods.md §9): clients that cannot stay connected upload a
// schema digest, fetch the encoding, and upload a gradient digest measured offline at the
// analysis's supplied reference; the worker's coordinator sets its fit aside, waits for the last
// file and merges them. Open data: penguins from the `vega-datasets` npm package, sharded by island,
// split between two clients. The supplied W is the pooled optimum W* of the central analysis at the
// same λ, so the central analysis's path t·W* is the merge's t·W, and the report equals
// `analyze --reference W` of the pooled rows — every summary key to 1e-9 relative (§9's equality).
// "Run again" on that report starts the same plan as a new analysis, whose report is version 2.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { closeDb } from "@/db/client";
import { findFederatedClientByName } from "@/db/queries/federated-analyses";
import { findReportSummary } from "@/db/queries/reports";
import {
  createMeasurementRequest,
  type DigestEncoding,
  type PartitionSummary,
} from "@/lib/analysis";
import {
  acceptGradientDigest,
  acceptSchemaDigest,
  cancelFederatedAnalysis,
  createFederatedAnalysis,
  DIGEST_CAUTION,
  findPlanToRevise,
  getFederatedStatus,
  readClientEncoding,
} from "@/lib/federated";
import { stopSendingBoss } from "@/lib/jobs";
import {
  federatedFormFrom,
  federatedFormSchema,
  toFederatedRequest,
} from "@/lib/validation/federated-form";
import type { ReferenceWeights } from "@/lib/validation/analysis-options";
import { compareSummaries } from "@/tests/lib/analysis/digests/support";
import { analyzeText } from "@/tests/lib/analysis/support/analyze-text";
import { createTeam } from "@/tests/support/accounts";
import { createPenguinClients, PENGUIN_COLUMNS } from "./support";

let team: Awaited<ReturnType<typeof createTeam>>;
let clients: Awaited<ReturnType<typeof createPenguinClients>>;
const started: string[] = [];

beforeAll(async () => {
  team = await createTeam();
  clients = await createPenguinClients();
});

afterAll(async () => {
  for (const analysisId of started) {
    await cancelFederatedAnalysis(team.workspaceId, team.analyst, analysisId).catch(
      () => undefined,
    );
  }
  await Promise.all([clients.north.close(), clients.south.close()]);
  await stopSendingBoss();
  await closeDb();
});

async function createAnalysis(reference: "zero" | ReferenceWeights) {
  const { analysisId } = await createFederatedAnalysis(team.workspaceId, team.analyst.id, {
    title: "Penguins by island, as files",
    labelColumn: "Species",
    reference,
    clients: ["north", "south"],
  });
  started.push(analysisId);
  const sender = async (name: "north" | "south") => {
    const client = await findFederatedClientByName(analysisId, name);
    return { analysisId, client: { id: client!.id, name } };
  };
  return { analysisId, north: await sender("north"), south: await sender("south") };
}

/** Waits (polling the stored state) until the analysis reaches one of these states. */
async function waitForState(analysisId: string, states: string[]) {
  return vi.waitFor(
    async () => {
      const status = await getFederatedStatus(team.workspaceId, analysisId);
      if (!states.includes(status.state)) throw new Error(`still ${status.state}`);
      return status;
    },
    { timeout: 120_000, interval: 100 },
  );
}

/** What `npm run digest -- gradients --at W.json` writes: the file, as JSON text read back. */
async function gradientFile(
  client: "north" | "south",
  encoding: DigestEncoding,
  at: "zero" | ReferenceWeights,
): Promise<unknown> {
  const request = createMeasurementRequest(encoding, at, null);
  return JSON.parse(JSON.stringify(await clients[client].gradients(encoding, request)));
}

describe("round 2 as files on the server", () => {
  it("merges files measured at the supplied W into the central analysis's summary at W", async () => {
    const optimum = await analyzeText(clients.csv, PENGUIN_COLUMNS);
    const supplied: ReferenceWeights = optimum.model.optimum;
    const central = await analyzeText(clients.csv, { ...PENGUIN_COLUMNS, reference: supplied });
    const { analysisId, north, south } = await createAnalysis(supplied);

    await acceptSchemaDigest(north, JSON.parse(JSON.stringify(await clients.north.schema())));
    await acceptSchemaDigest(south, JSON.parse(JSON.stringify(await clients.south.schema())));
    const encoding = await readClientEncoding({ analysisId });

    // A file measured at another point than the analysis's reference is refused, naming the client.
    await expect(
      acceptGradientDigest(north, await gradientFile("north", encoding, "zero")),
    ).rejects.toThrow(/client "north" measured round 2 at another point than this analysis's/);

    // North's file sets the coordinator's fit aside; with south's file missing it lets go.
    await acceptGradientDigest(north, await gradientFile("north", encoding, supplied));
    const waiting = await waitForState(analysisId, ["collecting-gradients"]);
    expect(waiting.roster.map((entry) => entry.round)).toEqual(["gradients", "schema"]);
    // South's file, the last one, queues the merge.
    await acceptGradientDigest(south, await gradientFile("south", encoding, supplied));
    const done = await waitForState(analysisId, ["done", "failed"]);
    expect(done.failureMessage).toBeNull();

    const stored = await findReportSummary(team.workspaceId, done.reportId!);
    const merged = stored!.summary as PartitionSummary;
    // At W = W*, ‖∇F‖ is a residual below the fit's tolerance, a sum of terms that cancel: only its
    // size is compared (as in the command line's file test).
    const differences = compareSummaries(central, merged, false);
    expect(differences.filter((line) => !line.startsWith(".model.gradNorm:"))).toEqual([]);
    expect(merged.model.gradNorm).toBeLessThanOrEqual(central.model.optimizer.tolerance);
    expect(merged.digests?.fitted).toBe(false);
    expect(merged.digests?.clients.map((client) => client.client)).toEqual(["north", "south"]);
    expect(merged.preprocessing.warnings).toContain(DIGEST_CAUTION);

    // "Run again" on the report: the same plan, reference and roster as a new federated analysis,
    // whose report is the earlier one's next version.
    const plan = await findPlanToRevise(team.workspaceId, done.reportId!);
    const request = toFederatedRequest(
      federatedFormSchema.parse(federatedFormFrom(plan!, done.reportId!)),
    );
    const again = await createFederatedAnalysis(team.workspaceId, team.analyst.id, request);
    started.push(again.analysisId);
    const before = await getFederatedStatus(team.workspaceId, analysisId);
    const after = await getFederatedStatus(team.workspaceId, again.analysisId);
    const options = (status: typeof before) => {
      const { title, labelColumn, features, task, lambda, reference, referenceWeights } = status;
      const { plan: advised, minimumShardRows, roster } = status;
      return {
        title,
        labelColumn,
        features,
        task,
        lambda,
        reference,
        referenceWeights,
        advised,
        minimumShardRows,
        clients: roster.map((entry) => entry.client),
      };
    };
    expect(options(after)).toEqual(options(before));
    const senders = {
      north: { analysisId: again.analysisId, client: { id: "", name: "north" } },
      south: { analysisId: again.analysisId, client: { id: "", name: "south" } },
    };
    for (const name of ["north", "south"] as const) {
      senders[name].client.id = (await findFederatedClientByName(again.analysisId, name))!.id;
      await acceptSchemaDigest(senders[name], await clients[name].schema());
    }
    const againEncoding = await readClientEncoding({ analysisId: again.analysisId });
    for (const name of ["north", "south"] as const) {
      await acceptGradientDigest(senders[name], await gradientFile(name, againEncoding, supplied));
    }
    const revised = await waitForState(again.analysisId, ["done", "failed"]);
    expect(revised.failureMessage).toBeNull();
    expect((await findReportSummary(team.workspaceId, revised.reportId!))!.version).toBe(2);
  }, 300_000);

  it("refuses a file for an analysis at the pooled optimum, which needs its clients online", async () => {
    const { analysisId } = await createFederatedAnalysis(team.workspaceId, team.analyst.id, {
      title: "Penguins by island, at the optimum",
      labelColumn: "Species",
      reference: "optimum",
      clients: ["north"],
    });
    started.push(analysisId);
    const client = await findFederatedClientByName(analysisId, "north");
    const north = { analysisId, client: { id: client!.id, name: "north" } };
    await acceptSchemaDigest(north, await clients.north.schema());
    const encoding = await readClientEncoding({ analysisId });
    await expect(
      acceptGradientDigest(north, await gradientFile("north", encoding, "zero")),
    ).rejects.toThrow(/the pooled optimum needs the online command/);
  }, 120_000);
});
