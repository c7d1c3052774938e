import { z } from "zod";
import { FEDERATED_STATES } from "@/db/schema/federated";

// What the federated routes read from paths and queries and answer with, for validation and the
// OpenAPI description. Bodies reuse the product's own schemas (lib/validation, the digest formats).

const resourceId = z.string().trim().min(1).max(100);

export const federatedPathSchema = z.object({
  analysisId: resourceId.meta({ description: "The id returned by POST /api/v1/federated." }),
});

export const clientKeyPathSchema = federatedPathSchema.extend({
  keyId: resourceId.meta({ description: "A key id, from the analysis's status (`keys`)." }),
});

export const exchangePathSchema = z.object({
  exchangeId: resourceId.meta({ description: "The `exchangeId` of GET /api/v1/digests/work." }),
});

export const waitQuerySchema = z.object({
  wait: z.coerce
    .number()
    .min(0)
    .max(30)
    .default(20)
    .meta({ description: "Seconds to hold the request open while there is nothing to do (0–30)." }),
});

export const createdFederatedSchema = z
  .object({ analysisId: z.string(), statusUrl: z.string() })
  .meta({ id: "CreatedFederatedAnalysis" });

const round = z.enum(["none", "schema", "fit", "gradients"]);
const states = z.enum(FEDERATED_STATES);

export const federatedStatusSchema = z
  .object({
    id: z.string(),
    title: z.string(),
    state: states,
    labelColumn: z.string(),
    features: z.array(z.string()).nullable(),
    task: z.enum(["classification", "regression"]).nullable(),
    lambda: z.number(),
    reference: z.enum(["optimum", "zero", "weights"]),
    plan: z.object({
      participants: z.number().int().optional(),
      localSteps: z.number().int(),
      rounds: z.number().int(),
      batchSize: z.number().int(),
    }),
    minimumShardRows: z.number().int(),
    rosterClosedAt: z.iso.datetime().nullable(),
    encodingHash: z.string().nullable(),
    evaluations: z.number().int().meta({ description: "Evaluation rounds of the fit so far." }),
    failureMessage: z.string().nullable(),
    reportId: z.string().nullable().meta({ description: "Once done: GET /api/v1/reports/{id}." }),
    roster: z.array(
      z.object({
        client: z.string(),
        shards: z.array(z.string()),
        rows: z.number().int(),
        round: round.meta({ description: "The furthest step the client has taken." }),
        lastSeenAt: z.iso.datetime().nullable(),
        lastRefusal: z
          .string()
          .nullable()
          .meta({ description: "Why its last digest was refused." }),
      }),
    ),
    missing: z.array(z.string()).meta({ description: "Left out when the roster was closed." }),
    keys: z.array(
      z.object({
        id: z.string(),
        client: z.string(),
        expiresAt: z.iso.datetime(),
        revokedAt: z.iso.datetime().nullable(),
        lastUsedAt: z.iso.datetime().nullable(),
        createdAt: z.iso.datetime(),
      }),
    ),
  })
  .meta({ id: "FederatedAnalysisStatus" });

export const federatedListSchema = z.object({
  analyses: z.array(
    z.object({
      id: z.string(),
      title: z.string(),
      state: states,
      reportId: z.string().nullable(),
      expectedClients: z.number().int(),
      createdAt: z.iso.datetime(),
      finishedAt: z.iso.datetime().nullable(),
    }),
  ),
});

export const issuedKeySchema = z
  .object({
    key: z.string().meta({ description: "Shown this once; only its hash is kept." }),
    keyId: z.string(),
    client: z.string(),
    expiresAt: z.iso.datetime(),
  })
  .meta({ id: "IssuedClientKey" });

export const closedRosterSchema = z.object({ state: states, missing: z.array(z.string()) });

export const clientSelfSchema = z
  .object({
    client: z.string(),
    analysisId: z.string(),
    title: z.string(),
    state: states,
    labelColumn: z.string(),
    features: z.array(z.string()).nullable(),
    task: z.enum(["classification", "regression"]).nullable(),
    minimumShardRows: z.number().int(),
  })
  .meta({ id: "DigestClient" });

export const acceptedDigestSchema = z.object({
  repeated: z
    .boolean()
    .meta({ description: "True when the same digest had been accepted before." }),
});

export const clientWorkSchema = z
  .object({
    kind: z.enum(["evaluate", "gram", "gradients", "wait", "done", "failed"]),
    exchangeId: z.string().optional(),
    request: z.unknown().optional().meta({
      description:
        "evaluate: an evaluation request (W, subsample, Hessian); gram: {encodingHash}; gradients: the measurement request of round 2.",
    }),
    state: states.optional(),
    reportId: z.string().nullable().optional(),
    message: z.string().optional(),
  })
  .meta({ id: "ClientWork" });
