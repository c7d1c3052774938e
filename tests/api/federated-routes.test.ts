// The federated routes of /api/v1 against PostgreSQL: who may call the analyst's routes (issue 11:
// analysts create, issue and revoke keys and close the roster; reviewers read; another workspace
// sees nothing), what a client key reaches (its own analysis's digest routes, and nothing else of
// the API — every route file under app/api/v1 is found and called, so a new route is covered),
// and refusals over HTTP that name the client and shard. Open data: penguins from the
// `vega-datasets` npm package, sharded by island, split between two clients.
import { readdirSync } from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { POST as createFederated } from "@/app/api/v1/federated/route";
import { GET as getStatus } from "@/app/api/v1/federated/[analysisId]/route";
import { POST as issueKey } from "@/app/api/v1/federated/[analysisId]/keys/route";
import { DELETE as revokeKey } from "@/app/api/v1/federated/[analysisId]/keys/[keyId]/route";
import { POST as closeRosterRoute } from "@/app/api/v1/federated/[analysisId]/close/route";
import { POST as cancelRoute } from "@/app/api/v1/federated/[analysisId]/cancel/route";
import { GET as describeClient } from "@/app/api/v1/digests/client/route";
import { GET as readEncoding } from "@/app/api/v1/digests/encoding/route";
import { POST as sendSchema } from "@/app/api/v1/digests/schema/route";
import { POST as sendGradients } from "@/app/api/v1/digests/gradients/route";
import { closeDb } from "@/db/client";
import { findFederatedClientByName } from "@/db/queries/federated-analyses";
import { openExchange } from "@/db/queries/federated-digests";
import { createMeasurementRequest, type DigestEncoding, type SchemaDigest } from "@/lib/analysis";
import { stopSendingBoss } from "@/lib/jobs";
import { analyzeText } from "@/tests/lib/analysis/support/analyze-text";
import { createPenguinClients, PENGUIN_COLUMNS } from "@/tests/lib/federated/support";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { apiRequest, issueTestToken } from "@/tests/support/api-tokens";
import { insertReport } from "@/tests/support/report-fixtures";

type Team = Awaited<ReturnType<typeof createTeam>>;
type Clients = Awaited<ReturnType<typeof createPenguinClients>>;

let team: Team;
let tokens: Record<"owner" | "analyst" | "reviewer" | "stranger", string>;
let clients: Clients;
let schemas: { north: SchemaDigest; south: SchemaDigest };
let reportId: string;
const started: string[] = [];

beforeAll(async () => {
  team = await createTeam();
  const stranger = await createAccount("stranger");
  const issue = async (userId: string, workspaceId = team.workspaceId) =>
    (await issueTestToken(userId, workspaceId)).token;
  tokens = {
    owner: await issue(team.owner.id),
    analyst: await issue(team.analyst.id),
    reviewer: await issue(team.reviewer.id),
    stranger: await issue(stranger.id, stranger.workspaceId),
  };
  clients = await createPenguinClients();
  schemas = { north: await clients.north.schema(), south: await clients.south.schema() };
  ({ reportId } = await insertReport({
    workspaceId: team.workspaceId,
    authorId: team.analyst.id,
    summary: await analyzeText(clients.csv, PENGUIN_COLUMNS),
  }));
});

afterAll(async () => {
  // Analyses left open would keep the worker's coordinators waiting for clients.
  for (const analysisId of started) {
    await cancelRoute(apiRequest(`/api/v1/federated/${analysisId}/cancel`, tokens.analyst, {}), {
      params: Promise.resolve({ analysisId }),
    });
  }
  await Promise.all([clients.north.close(), clients.south.close()]);
  await stopSendingBoss();
  await closeDb();
});

const params = <T extends object>(values: T) => ({ params: Promise.resolve(values) });

async function createAnalysis(token = tokens.analyst): Promise<Response> {
  return createFederated(
    apiRequest("/api/v1/federated", token, {
      title: "Penguins by island, federated",
      labelColumn: "Species",
      reference: "zero",
      clients: ["north", "south"],
    }),
  );
}

async function createWithKeys() {
  const response = await createAnalysis();
  const { analysisId } = (await response.json()) as { analysisId: string };
  started.push(analysisId);
  const keyOf = async (client: string) => {
    const issued = await issueKey(
      apiRequest(`/api/v1/federated/${analysisId}/keys`, tokens.analyst, { client }),
      params({ analysisId }),
    );
    expect(issued.status).toBe(201);
    return (await issued.json()) as { key: string; keyId: string };
  };
  return { analysisId, north: await keyOf("north"), south: await keyOf("south") };
}

describe("the analyst's federated routes", () => {
  it("let analysts and owners create and manage, reviewers read, and other workspaces see nothing", async () => {
    expect((await createAnalysis(tokens.reviewer)).status).toBe(403);
    expect((await createAnalysis(tokens.owner)).status).toBe(201);
    const { analysisId, north } = await createWithKeys();
    const statusAs = (token: string) =>
      getStatus(apiRequest(`/api/v1/federated/${analysisId}`, token), params({ analysisId }));
    expect((await statusAs(tokens.reviewer)).status).toBe(200);
    expect((await statusAs(tokens.stranger)).status).toBe(404);
    const keyAs = (token: string) =>
      issueKey(
        apiRequest(`/api/v1/federated/${analysisId}/keys`, token, { client: "north" }),
        params({ analysisId }),
      );
    expect((await keyAs(tokens.reviewer)).status).toBe(403);
    expect((await keyAs(tokens.stranger)).status).toBe(404);
    const closeAs = (token: string) =>
      closeRosterRoute(
        apiRequest(`/api/v1/federated/${analysisId}/close`, token, {}),
        params({ analysisId }),
      );
    expect((await closeAs(tokens.reviewer)).status).toBe(403);
    expect((await closeAs(tokens.analyst)).status).toBe(409); // nobody has sent round 1 yet

    const status = (await (await statusAs(tokens.analyst)).json()) as {
      state: string;
      roster: { client: string; round: string }[];
      keys: { id: string; client: string }[];
    };
    expect(status.state).toBe("collecting-schemas");
    expect(status.roster.map((entry) => entry.client)).toEqual(["north", "south"]);
    expect(status.keys.map((key) => key.client).sort()).toEqual(["north", "south"]);
    expect(JSON.stringify(status)).not.toContain(north.key);

    // A revoked key stops at once.
    const revoke = (token: string) =>
      revokeKey(
        new Request(`http://partita.test/api/v1/federated/${analysisId}/keys/${north.keyId}`, {
          method: "DELETE",
          headers: { authorization: `Bearer ${token}` },
        }),
        params({ analysisId, keyId: north.keyId }),
      );
    expect((await revoke(tokens.reviewer)).status).toBe(403);
    expect((await revoke(tokens.analyst)).status).toBe(204);
    const refused = await describeClient(apiRequest("/api/v1/digests/client", north.key));
    expect(refused.status).toBe(401);
    expect(((await refused.json()) as { error: { code: string } }).error.code).toBe("key_revoked");
  });
});

type RouteHandler = (request: Request, context: { params: Promise<object> }) => Promise<Response>;

/** Every route module under app/api/v1, with its URL and the methods it exports. */
async function listRoutes(): Promise<{ url: string; methods: [string, RouteHandler][] }[]> {
  const root = path.resolve("app/api/v1");
  const files: string[] = [];
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else if (entry.name === "route.ts") files.push(full);
    }
  };
  walk(root);
  return Promise.all(
    files.map(async (file) => {
      const handlers = (await import(file)) as Record<string, unknown>;
      const url = `/api/v1/${path.relative(root, path.dirname(file)).split(path.sep).join("/")}`;
      const methods = ["GET", "POST", "PUT", "PATCH", "DELETE"]
        .filter((method) => typeof handlers[method] === "function")
        .map((method) => [method, handlers[method] as RouteHandler] as [string, RouteHandler]);
      return { url: url.replace(/\/$/, ""), methods };
    }),
  );
}

describe("a client key", () => {
  it("reaches its own analysis's digest routes and nothing else of the API", async () => {
    const { analysisId, north } = await createWithKeys();
    const other = await createWithKeys();
    // A real open question of the other analysis's coordinator to its client "north".
    const otherNorth = await findFederatedClientByName(other.analysisId, "north");
    const otherExchange = await openExchange({
      federatedAnalysisId: other.analysisId,
      clientId: otherNorth!.id,
      kind: "evaluate",
      requestKey: "another analysis's question",
      request: {},
    });
    // The ids it could try: its own analysis, another one, a report, its own key and the other
    // analysis's open question.
    const ids: Record<string, string> = {
      analysisId,
      reportId,
      keyId: north.keyId,
      exchangeId: otherExchange.id,
    };
    const routes = await listRoutes();
    expect(routes.length).toBeGreaterThan(15);
    const reached: string[] = [];
    for (const { url, methods } of routes) {
      if (url === "/api/v1/openapi.json") continue; // the public description of the API
      // Its own digest routes are its to use (the other tests use them); an exchange id of
      // another analysis is not.
      if (url.startsWith("/api/v1/digests/") && !url.includes("[exchangeId]")) continue;
      for (const [method, handler] of methods) {
        for (const target of [analysisId, other.analysisId]) {
          const values = Object.fromEntries(
            [...url.matchAll(/\[(\.\.\.)?(\w+)\]/g)].map(([, rest, name]) => [
              name,
              rest ? ["anything"] : name === "analysisId" ? target : ids[name],
            ]),
          );
          const concrete = url.replace(/\[(?:\.\.\.)?(\w+)\]/g, (_, name: string) =>
            String(values[name]),
          );
          const request = new Request(`http://partita.test${concrete}`, {
            method,
            headers: { authorization: `Bearer ${north.key}`, "content-type": "application/json" },
            body: method === "GET" || method === "DELETE" ? undefined : "{}",
          });
          const response = await handler(request, params(values));
          if (![401, 403, 404].includes(response.status)) {
            reached.push(`${method} ${concrete}: ${response.status}`);
          }
        }
      }
    }
    expect(reached).toEqual([]);
    // And it does reach its own: who it is, and round 1.
    const self = await describeClient(apiRequest("/api/v1/digests/client", north.key));
    expect(await self.json()).toMatchObject({ client: "north", analysisId });
  });

  it("is refused by the analyst's routes, and an API token by the client's", async () => {
    const { analysisId, north } = await createWithKeys();
    const asKey = await getStatus(
      apiRequest(`/api/v1/federated/${analysisId}`, north.key),
      params({ analysisId }),
    );
    expect(asKey.status).toBe(401);
    const asToken = await describeClient(apiRequest("/api/v1/digests/client", tokens.analyst));
    expect(asToken.status).toBe(401);
    expect(((await asToken.json()) as { error: { code: string } }).error.code).toBe("invalid_key");
  });
});

describe("digests refused over HTTP", () => {
  it("name the client and shard, and leave what was accepted", async () => {
    const { analysisId, north, south } = await createWithKeys();
    const send = async (key: string, digest: unknown) => {
      const response = await sendSchema(apiRequest("/api/v1/digests/schema", key, digest));
      return {
        status: response.status,
        body: (await response.json()) as { error?: { message: string } },
      };
    };
    expect((await send(north.key, schemas.north)).status).toBe(201);

    const small = structuredClone(schemas.south);
    small.shards[0].rows = 3;
    const underMinimum = await send(south.key, small);
    expect(underMinimum.status).toBe(422);
    expect(underMinimum.body.error?.message).toBe(
      `client "south", shard "${small.shards[0].id}" has 3 rows, under the minimum of 10 (expected at least 10 kept rows per shard)`,
    );
    const twice = structuredClone(schemas.south);
    twice.shards.push(schemas.north.shards[0]);
    const duplicate = await send(south.key, twice);
    expect(duplicate.status).toBe(422);
    expect(duplicate.body.error?.message).toContain(
      `shard "${schemas.north.shards[0].id}" was sent twice (by client "north" and by client "south")`,
    );
    const encodingEarly = await readEncoding(apiRequest("/api/v1/digests/encoding", south.key));
    expect(encodingEarly.status).toBe(409);

    expect((await send(south.key, schemas.south)).status).toBe(201);
    const encoding = (await (
      await readEncoding(apiRequest("/api/v1/digests/encoding", south.key))
    ).json()) as DigestEncoding;
    const digest = await clients.south.gradients(
      encoding,
      createMeasurementRequest(encoding, "zero", null),
    );
    const wrongHash = await sendGradients(
      apiRequest("/api/v1/digests/gradients", south.key, {
        ...digest,
        encodingHash: "0".repeat(64),
      }),
    );
    expect(wrongHash.status).toBe(422);
    expect(((await wrongHash.json()) as { error: { message: string } }).error.message).toMatch(
      /^client "south" sent digests for encoding 000000000000…, not this analysis's [0-9a-f]{12}…/,
    );

    const status = (await (
      await getStatus(
        apiRequest(`/api/v1/federated/${analysisId}`, tokens.analyst),
        params({ analysisId }),
      )
    ).json()) as {
      state: string;
      roster: { client: string; round: string; lastRefusal: string }[];
    };
    expect(status.state).not.toBe("collecting-schemas");
    expect(status.roster.map((entry) => entry.round)).toEqual(["schema", "schema"]);
    expect(status.roster[1].lastRefusal).toMatch(/client "south" sent digests for encoding 0{12}/);
  });
});
