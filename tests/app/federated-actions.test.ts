// The federated analysis page's server actions against the real PostgreSQL: who may call them
// (guards), that another workspace sees nothing, and digest files uploaded on a client's behalf —
// accepted as if the client had sent them, or refused naming the file, the client and the shard
// while nothing accepted is lost. Open data: penguins from the `vega-datasets` npm package,
// sharded by island, split between two clients (tests/lib/federated/support.ts).
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

import {
  cancelFederated,
  closeFederatedRoster,
  createFederatedFromForm,
  issueFederatedClientKey,
  revokeFederatedClientKey,
  uploadClientDigest,
} from "@/app/(workspace)/w/[workspaceId]/federated/actions";
import { closeDb } from "@/db/client";
import type { SchemaDigest } from "@/lib/analysis";
import { stopSendingBoss } from "@/lib/jobs";
import { getFederatedStatus, listFederatedAnalysesOf } from "@/lib/federated";
import { emptyFederatedForm, type FederatedFormValues } from "@/lib/validation/federated-form";
import { createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { createPenguinClients } from "@/tests/lib/federated/support";

afterAll(async () => {
  await stopSendingBoss();
  await closeDb();
});

let team: Awaited<ReturnType<typeof createTeam>>;
let digests: { north: SchemaDigest; south: SchemaDigest };

beforeAll(async () => {
  team = await createTeam();
  const clients = await createPenguinClients();
  digests = { north: await clients.north.schema(), south: await clients.south.schema() };
});

const statusOf = (result: { ok: boolean; status?: number }) => (result.ok ? 200 : result.status);

function formValues(overrides: Partial<FederatedFormValues> = {}): FederatedFormValues {
  const empty = emptyFederatedForm(10);
  return {
    ...empty,
    title: "Penguins by island, federated",
    clientsText: "north\nsouth\n",
    referenceSource: "zero",
    ...overrides,
    options: { ...empty.options, labelColumn: "Species", ...overrides.options },
  };
}

async function createAnalysis(clientsText = "north\nsouth") {
  actAs(team.analyst);
  const created = await createFederatedFromForm(team.workspaceId, formValues({ clientsText }));
  if (!created.ok) throw new Error(created.message);
  return created.data.analysisId;
}

/** A digest as the file `npm run digest -- schema … --out` writes. */
const asFile = (document: unknown) => `${JSON.stringify(document, null, 2)}\n`;

describe("federated analysis actions: who may call them", () => {
  it("lets analysts create and manage; a reviewer can do none of it (403)", async () => {
    const analysisId = await createAnalysis();
    actAs(team.reviewer);
    expect(statusOf(await createFederatedFromForm(team.workspaceId, formValues()))).toBe(403);
    expect(
      statusOf(
        await issueFederatedClientKey(team.workspaceId, analysisId, {
          client: "north",
          lifetimeDays: 7,
        }),
      ),
    ).toBe(403);
    actAs(team.analyst);
    const issued = await issueFederatedClientKey(team.workspaceId, analysisId, {
      client: "north",
      lifetimeDays: 7,
    });
    if (!issued.ok) throw new Error(issued.message);
    expect(issued.data.key).toMatch(/^prck_/);
    expect(issued.data.expiresAt.getTime() - Date.now()).toBeGreaterThan(6.9 * 24 * 3600_000);

    actAs(team.reviewer);
    expect(
      statusOf(await revokeFederatedClientKey(team.workspaceId, analysisId, issued.data.keyId)),
    ).toBe(403);
    expect(statusOf(await closeFederatedRoster(team.workspaceId, analysisId))).toBe(403);
    expect(
      statusOf(
        await uploadClientDigest(team.workspaceId, analysisId, {
          client: "north",
          round: "schema",
          fileName: "north-schema.json",
          text: asFile(digests.north),
        }),
      ),
    ).toBe(403);
    actAs(null);
    expect(statusOf(await closeFederatedRoster(team.workspaceId, analysisId))).toBe(401);

    // Nothing the reviewer tried changed anything: one key, still live; nobody sent round 1.
    const status = await getFederatedStatus(team.workspaceId, analysisId);
    expect(status.keys.map((key) => key.revokedAt)).toEqual([null]);
    expect(status.roster.map((entry) => entry.round)).toEqual(["none", "none"]);

    actAs(team.owner);
    expect(
      statusOf(await revokeFederatedClientKey(team.workspaceId, analysisId, issued.data.keyId)),
    ).toBe(200);
    expect(
      statusOf(await revokeFederatedClientKey(team.workspaceId, analysisId, issued.data.keyId)),
    ).toBe(404);
  });

  it("shows another workspace nothing: its members get 404 and its own id finds no analysis", async () => {
    const analysisId = await createAnalysis();
    const stranger = await createTeam();
    actAs(stranger.owner);
    // Through our workspace: not a member.
    expect(statusOf(await closeFederatedRoster(team.workspaceId, analysisId))).toBe(404);
    // Through their own workspace, naming our analysis.
    const calls = [
      issueFederatedClientKey(stranger.workspaceId, analysisId, { client: "north" }),
      closeFederatedRoster(stranger.workspaceId, analysisId),
      uploadClientDigest(stranger.workspaceId, analysisId, {
        client: "north",
        round: "schema",
        fileName: "north-schema.json",
        text: asFile(digests.north),
      }),
    ];
    for (const result of await Promise.all(calls)) expect(statusOf(result)).toBe(404);
    expect(await listFederatedAnalysesOf(stranger.workspaceId)).toEqual([]);
    expect((await getFederatedStatus(team.workspaceId, analysisId)).roster[0].round).toBe("none");
  });
});

describe("creating from the form", () => {
  it("puts refusals on the form's fields and keeps nothing half-made", async () => {
    actAs(team.analyst);
    const before = (await listFederatedAnalysesOf(team.workspaceId)).length;
    const refused = await createFederatedFromForm(
      team.workspaceId,
      formValues({
        clientsText: "north\nnorth",
        referenceSource: "weights",
        options: { ...emptyFederatedForm(10).options, labelColumn: "", lambda: -1 },
      }),
    );
    expect(refused.ok).toBe(false);
    if (refused.ok) return;
    expect(refused.status).toBe(422);
    expect(refused.fieldErrors).toMatchObject({
      clientsText: "“north” is named twice.",
      weights: "Upload the reference weights (a JSON file).",
      "options.labelColumn": "Name the column that holds the label.",
      "options.lambda": "λ must be greater than 0.",
    });
    expect((await listFederatedAnalysesOf(team.workspaceId)).length).toBe(before);
  });

  it("creates the roster and options the form stood for", async () => {
    actAs(team.analyst);
    const created = await createFederatedFromForm(
      team.workspaceId,
      formValues({
        clientsText: " north \n\nsouth\n",
        participantsMode: "sample",
        options: {
          ...emptyFederatedForm(10).options,
          labelColumn: "Species",
          featuresText: "Beak Length (mm), Flipper Length (mm)\nBody Mass (g)",
          participants: 2,
          localSteps: 5,
        },
      }),
    );
    if (!created.ok) throw new Error(created.message);
    const status = await getFederatedStatus(team.workspaceId, created.data.analysisId);
    expect(status.roster.map((entry) => entry.client)).toEqual(["north", "south"]);
    expect(status.features).toEqual(["Beak Length (mm)", "Flipper Length (mm)", "Body Mass (g)"]);
    expect(status.reference).toBe("zero");
    // methods.md §5 defaults for what the form left alone; §9's minimum of 10 rows.
    expect(status.plan).toEqual({ participants: 2, localSteps: 5, rounds: 100, batchSize: 32 });
    expect(status.lambda).toBe(1e-3);
    expect(status.minimumShardRows).toBe(10);
  });
});

describe("digest files uploaded on a client's behalf", () => {
  it("accepts round 1 as if the client sent it, and refuses bad files by file, client and shard", async () => {
    const analysisId = await createAnalysis("north\nsouth\nwest");
    actAs(team.analyst);
    const upload = (client: string, fileName: string, text: string, round = "schema" as const) =>
      uploadClientDigest(team.workspaceId, analysisId, { client, round, fileName, text });

    const accepted = await upload("north", "north-schema.json", asFile(digests.north));
    expect(accepted).toEqual({ ok: true, data: { repeated: false } });
    // The same file again (an analyst who clicked twice): harmless.
    expect(await upload("north", "north-schema.json", asFile(digests.north))).toEqual({
      ok: true,
      data: { repeated: true },
    });

    // A shard under the minimum rows (methods.md §9: 10 by default).
    const small = structuredClone(digests.south);
    small.shards[0].rows = 9;
    const refusedSmall = await upload("south", "south-schema.json", asFile(small));
    expect(refusedSmall).toMatchObject({
      ok: false,
      status: 422,
      message: expect.stringContaining(
        `south-schema.json: client "south", shard "${small.shards[0].id}" has 9 rows, under the minimum of 10`,
      ),
    });
    // North's file uploaded as south's.
    expect(await upload("south", "north-schema.json", asFile(digests.north))).toMatchObject({
      ok: false,
      status: 422,
      message: expect.stringContaining(
        `north-schema.json: the schema digest is client "north"'s, sent with client "south"'s key`,
      ),
    });
    expect(await upload("south", "notes.txt", "shard,rows\n")).toMatchObject({
      ok: false,
      status: 422,
      message: expect.stringMatching(/^notes\.txt: not JSON .*client “south”/s),
    });
    expect(await upload("east", "east-schema.json", asFile(digests.south))).toMatchObject({
      ok: false,
      status: 422,
      message: "“east” is not on this analysis's roster.",
    });

    let status = await getFederatedStatus(team.workspaceId, analysisId);
    expect(status.state).toBe("collecting-schemas");
    expect(status.roster.map((entry) => [entry.client, entry.round])).toEqual([
      ["north", "schema"],
      ["south", "none"],
      ["west", "none"],
    ]);
    // The roster shows south's last refusal until a digest of south's is accepted.
    expect(status.roster[1].lastRefusal).toMatch(/client "north"'s, sent with client "south"'s/);
    const northRows = digests.north.shards.reduce((rows, shard) => rows + shard.rows, 0);
    expect(status.roster[0]).toMatchObject({
      shards: digests.north.shards.map((shard) => shard.id),
      rows: northRows,
      lastRefusal: null,
    });

    expect(await upload("south", "south-schema.json", asFile(digests.south))).toMatchObject({
      ok: true,
    });
    // Round 2 before the coordinator asks for it is refused, naming the client.
    expect(
      await uploadClientDigest(team.workspaceId, analysisId, {
        client: "north",
        round: "gradients",
        fileName: "north-grad.json",
        text: asFile({ client: "north" }),
      }),
    ).toMatchObject({
      ok: false,
      message: expect.stringMatching(/^north-grad\.json: client "north"/),
    });

    const closed = await closeFederatedRoster(team.workspaceId, analysisId);
    expect(closed).toEqual({ ok: true, data: { missing: ["west"] } });
    status = await getFederatedStatus(team.workspaceId, analysisId);
    expect(status.missing).toEqual(["west"]);
    expect(status.encodingHash).not.toBeNull();
    // After the roster closed, the left-out client's file is refused, naming it.
    expect(await upload("west", "west-schema.json", asFile(digests.south))).toMatchObject({
      ok: false,
      status: 409,
      message: expect.stringContaining(
        `west-schema.json: client "west": round 1 is over (the roster was closed without it)`,
      ),
    });

    // The coordinator now waits for north and south; cancelling ends it (a reviewer cannot).
    actAs(team.reviewer);
    expect(statusOf(await cancelFederated(team.workspaceId, analysisId))).toBe(403);
    actAs(team.analyst);
    expect(statusOf(await cancelFederated(team.workspaceId, analysisId))).toBe(200);
    expect((await getFederatedStatus(team.workspaceId, analysisId)).state).toBe("failed");
    expect(statusOf(await cancelFederated(team.workspaceId, analysisId))).toBe(409);
  });
});
