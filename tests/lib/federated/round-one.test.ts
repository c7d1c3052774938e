// The federated service's round 1 against PostgreSQL: schema digests checked on arrival (a refusal
// names the client and shard and loses nothing accepted), the encoding built once every expected
// client has sent, and the roster closed without a missing one. Open data: penguins from the
// `vega-datasets` npm package, sharded by island, split between two clients.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { mergeSchemaDigests, type SchemaDigest } from "@/lib/analysis";
import { stopSendingBoss } from "@/lib/jobs";
import {
  acceptSchemaDigest,
  cancelFederatedAnalysis,
  closeRoster,
  createFederatedAnalysis,
  getFederatedStatus,
  issueClientKey,
  revokeClientKey,
} from "@/lib/federated";
import { listAuditEntries } from "@/db/queries/audit";
import { findFederatedClientByName, markClientSeen } from "@/db/queries/federated-analyses";
import { createTeam } from "@/tests/support/accounts";
import { createPenguinClients } from "./support";

const started: string[] = [];

afterAll(async () => {
  // Analyses left open would keep the worker's coordinators waiting for clients.
  for (const analysisId of started) {
    await cancelFederatedAnalysis(team.workspaceId, team.analyst, analysisId).catch(
      () => undefined,
    );
  }
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

async function createAnalysis(clients = ["north", "south"]) {
  const { analysisId } = await createFederatedAnalysis(team.workspaceId, team.analyst.id, {
    title: "Penguins by island, federated",
    labelColumn: "Species",
    reference: "zero",
    clients,
  });
  started.push(analysisId);
  const sender = async (name: string) => {
    const client = await findFederatedClientByName(analysisId, name);
    return { analysisId, client: { id: client!.id, name } };
  };
  return { analysisId, sender };
}

describe("round 1 of a federated analysis", () => {
  it("refuses bad schema digests by client and shard, keeps what it accepted, and builds the encoding", async () => {
    const { analysisId, sender } = await createAnalysis();
    const north = await sender("north");
    const south = await sender("south");
    await acceptSchemaDigest(north, digests.north);

    // Another client's digest sent with north's key.
    await expect(acceptSchemaDigest(north, digests.south)).rejects.toThrow(
      /already sent a different schema digest/,
    );
    await expect(acceptSchemaDigest(south, digests.north)).rejects.toThrow(
      /client "north"'s, sent with client "south"'s key/,
    );
    // A shard under the minimum rows (methods.md §9: 10 by default).
    const small = structuredClone(digests.south);
    small.shards[0].rows = 9;
    await expect(acceptSchemaDigest(south, small)).rejects.toThrow(
      `client "south", shard "${small.shards[0].id}" has 9 rows, under the minimum of 10`,
    );
    // A shard north already sent.
    const twice = structuredClone(digests.south);
    twice.shards.push(structuredClone(digests.north.shards[0]));
    await expect(acceptSchemaDigest(south, twice)).rejects.toThrow(
      `shard "${digests.north.shards[0].id}" was sent twice (by client "north" and by client "south")`,
    );
    // Numbers that are not finite do not survive JSON; a string where a number belongs is refused.
    const notFinite = JSON.parse(JSON.stringify(digests.south));
    notFinite.shards[0].columns[0].sum = "Infinity";
    await expect(acceptSchemaDigest(south, notFinite)).rejects.toThrow(
      /client "south", shard "[^"]+": the schema digest is malformed at shards\.0\.columns\.0\.sum/,
    );

    let status = await getFederatedStatus(team.workspaceId, analysisId);
    expect(status.state).toBe("collecting-schemas");
    expect(status.roster.map((entry) => [entry.client, entry.round])).toEqual([
      ["north", "schema"],
      ["south", "none"],
    ]);
    expect(status.roster[1].lastRefusal).toMatch(/malformed/);

    await acceptSchemaDigest(south, digests.south);
    // A client that rejoins sends the same digest again: harmless.
    expect((await acceptSchemaDigest(north, digests.north)).repeated).toBe(true);
    // Its JSON may name the keys in another order (another serializer): still the same digest.
    const reordered = Object.fromEntries(Object.entries(digests.north).reverse());
    expect((await acceptSchemaDigest(north, reordered)).repeated).toBe(true);
    status = await getFederatedStatus(team.workspaceId, analysisId);
    expect(status.state).toBe("encoding-ready");
    // The same encoding as the engine's own merge of the two digests, in name order.
    expect(status.encodingHash).toBe(mergeSchemaDigests([digests.north, digests.south]).hash);
    expect(status.roster[1]).toMatchObject({ round: "schema", lastRefusal: null });
    expect(status.roster.reduce((rows, entry) => rows + entry.rows, 0)).toBe(
      digests.north.shards.concat(digests.south.shards).reduce((n, shard) => n + shard.rows, 0),
    );
  });

  it("goes on without a missing client once the analyst closes the roster", async () => {
    const { analysisId, sender } = await createAnalysis(["north", "south", "west"]);
    await expect(closeRoster(team.workspaceId, team.analyst, analysisId)).rejects.toThrow(
      /nothing to go on/,
    );
    await acceptSchemaDigest(await sender("north"), digests.north);
    await acceptSchemaDigest(await sender("south"), digests.south);
    expect((await getFederatedStatus(team.workspaceId, analysisId)).state).toBe(
      "collecting-schemas",
    );
    const closed = await closeRoster(team.workspaceId, team.analyst, analysisId);
    expect(closed).toEqual({ state: "encoding-ready", missing: ["west"] });
    const status = await getFederatedStatus(team.workspaceId, analysisId);
    expect(status.missing).toEqual(["west"]);
    await expect(acceptSchemaDigest(await sender("west"), digests.north)).rejects.toThrow(
      /round 1 is over/,
    );
  });

  it("issues client keys once, for roster clients only, and revokes them", async () => {
    const { analysisId } = await createAnalysis();
    const issued = await issueClientKey(team.workspaceId, team.analyst, analysisId, {
      client: "north",
      lifetimeDays: 7,
    });
    expect(issued.key).toMatch(/^prck_[A-Za-z0-9_-]{43}$/);
    await expect(
      issueClientKey(team.workspaceId, team.analyst, analysisId, { client: "east" }),
    ).rejects.toThrow(/not on this analysis's roster/);
    const status = await getFederatedStatus(team.workspaceId, analysisId);
    expect(status.keys).toHaveLength(1);
    expect(JSON.stringify(status)).not.toContain(issued.key);
    await revokeClientKey(team.workspaceId, team.analyst, analysisId, issued.keyId);
    await expect(
      revokeClientKey(team.workspaceId, team.analyst, analysisId, issued.keyId),
    ).rejects.toThrow(/no such live client key/);
    // Another workspace sees no such analysis.
    const other = await createTeam();
    await expect(getFederatedStatus(other.workspaceId, analysisId)).rejects.toThrow(
      /no such federated analysis/,
    );
  });

  it("writes key issue and revocation, roster close and stop to the workspace's audit log", async () => {
    const { analysisId, sender } = await createAnalysis(["north", "south", "west"]);
    const issued = await issueClientKey(team.workspaceId, team.analyst, analysisId, {
      client: "north",
      lifetimeDays: 7,
    });
    await revokeClientKey(team.workspaceId, team.analyst, analysisId, issued.keyId);
    await acceptSchemaDigest(await sender("north"), digests.north);
    await closeRoster(team.workspaceId, team.analyst, analysisId);
    await cancelFederatedAnalysis(team.workspaceId, team.owner, analysisId);
    // A refused action (the analysis has ended) writes nothing.
    await expect(cancelFederatedAnalysis(team.workspaceId, team.owner, analysisId)).rejects.toThrow(
      /already ended/,
    );

    const entries = (await listAuditEntries(team.workspaceId))
      .filter((entry) => [issued.keyId, analysisId].includes(entry.targetId))
      .reverse();
    const title = "Penguins by island, federated";
    expect(
      entries.map(({ action, actorEmail, targetType, details }) => ({
        action,
        actorEmail,
        targetType,
        details,
      })),
    ).toEqual([
      {
        action: "client-key.issued",
        actorEmail: team.analyst.email,
        targetType: "client-key",
        details: {
          analysis: title,
          client: "north",
          expiresOn: issued.expiresAt.toISOString().slice(0, 10),
        },
      },
      {
        action: "client-key.revoked",
        actorEmail: team.analyst.email,
        targetType: "client-key",
        details: { analysis: title, client: "north" },
      },
      {
        action: "federated.roster-closed",
        actorEmail: team.analyst.email,
        targetType: "federated-analysis",
        details: { analysis: title, missing: ["south", "west"] },
      },
      {
        action: "federated.cancelled",
        actorEmail: team.owner.email,
        targetType: "federated-analysis",
        details: { analysis: title },
      },
    ]);
  });

  it("writes a client's last seen at most every 5 s, however often it polls", async () => {
    const { analysisId } = await createAnalysis();
    const lastSeen = async () => (await findFederatedClientByName(analysisId, "north"))!.lastSeenAt;
    const north = (await findFederatedClientByName(analysisId, "north"))!;
    const start = new Date("2026-12-05T10:00:00.000Z");
    await markClientSeen(north.id, start);
    await markClientSeen(north.id, new Date(start.getTime() + 4_000));
    expect(await lastSeen()).toEqual(start);
    const later = new Date(start.getTime() + 6_000);
    await markClientSeen(north.id, later);
    expect(await lastSeen()).toEqual(later);
  });
});
