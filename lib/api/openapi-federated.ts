import { z } from "zod";
import type { ZodOpenApiPathsObject } from "zod-openapi";
import { evaluationSumsSchema, gradientDigestSchema, schemaDigestSchema } from "@/lib/analysis";
import { CLIENT_KEY_PREFIX } from "@/lib/auth/client-key-secret";
import {
  createFederatedAnalysisSchema,
  issueClientKeySchema,
} from "@/lib/validation/federated-analysis";
import {
  acceptedDigestSchema,
  clientKeyPathSchema,
  clientSelfSchema,
  clientWorkSchema,
  closedRosterSchema,
  createdFederatedSchema,
  exchangePathSchema,
  federatedListSchema,
  federatedPathSchema,
  federatedStatusSchema,
  issuedKeySchema,
  waitQuerySchema,
} from "./federated-schemas";
import { json, operation } from "./openapi-operation";

/** The client key's security scheme: it reaches only the /api/v1/digests routes. */

/** Both rounds' digests answer alike: 201 on first acceptance, 200 when the same digest comes again. */
const DIGEST_ACCEPTED: [string, string, typeof acceptedDigestSchema] = [
  "201",
  "Accepted (200 when the same digest was accepted before).",
  acceptedDigestSchema,
];
export const clientKeyScheme = {
  clientKey: {
    type: "http" as const,
    scheme: "bearer",
    description: `A client key (${CLIENT_KEY_PREFIX}…) the analyst issued for one client of one federated analysis.`,
  },
};

const NOT_NOW = "Not now: the analysis is in another state, or this was sent already.";

/**
 * The federated analysis's paths (methods.md §9): the analyst's, with a personal API token, and a
 * client's, with its client key.
 */
export function federatedPaths(): ZodOpenApiPathsObject {
  const asClient = { security: [{ clientKey: [] }] };
  return {
    "/api/v1/federated": {
      post: operation({
        operationId: "createFederatedAnalysis",
        summary: "Create a federated analysis with its roster of expected clients",
        description:
          "Rows never reach the server: each client sends digests (counts and sums). Issue each client a key next.",
        requestBody: json(createFederatedAnalysisSchema),
        success: ["201", "Created; it waits for round 1.", createdFederatedSchema],
        failures: ["403", "422"],
      }),
      get: operation({
        operationId: "listFederatedAnalyses",
        summary: "The workspace's federated analyses, newest first",
        success: ["200", "The analyses.", federatedListSchema],
        failures: [],
      }),
    },
    "/api/v1/federated/{analysisId}": {
      get: operation({
        operationId: "getFederatedAnalysis",
        summary: "State, roster (what each client sent, when last seen) and keys",
        requestParams: { path: federatedPathSchema },
        success: ["200", "The analysis.", federatedStatusSchema],
        failures: ["404", "422"],
      }),
    },
    "/api/v1/federated/{analysisId}/keys": {
      post: operation({
        operationId: "issueClientKey",
        summary: "Issue a client key for one roster client (shown once)",
        requestParams: { path: federatedPathSchema },
        requestBody: json(issueClientKeySchema),
        success: ["201", "The key; only its hash is kept.", issuedKeySchema],
        failures: ["403", "404", "422"],
        conflict: NOT_NOW,
      }),
    },
    "/api/v1/federated/{analysisId}/keys/{keyId}": {
      delete: operation({
        operationId: "revokeClientKey",
        summary: "Revoke a client key at once",
        requestParams: { path: clientKeyPathSchema },
        success: ["204", "Revoked."],
        failures: ["403", "404", "422"],
      }),
    },
    "/api/v1/federated/{analysisId}/close": {
      post: operation({
        operationId: "closeRoster",
        summary: "End round 1 without the clients still missing",
        requestParams: { path: federatedPathSchema },
        success: ["200", "The state after, and who is missing.", closedRosterSchema],
        failures: ["403", "404", "422"],
        conflict: NOT_NOW,
      }),
    },
    "/api/v1/federated/{analysisId}/cancel": {
      post: operation({
        operationId: "cancelFederatedAnalysis",
        summary: "Stop a federated analysis that has not ended",
        requestParams: { path: federatedPathSchema },
        success: ["204", "Stopped; accepted digests stay stored."],
        failures: ["403", "404", "422"],
        conflict: NOT_NOW,
      }),
    },
    "/api/v1/digests/client": {
      get: operation({
        ...asClient,
        operationId: "describeDigestClient",
        summary: "The key's client and its analysis's label, features and task",
        success: ["200", "Who the key speaks for.", clientSelfSchema],
        failures: ["404"],
      }),
    },
    "/api/v1/digests/schema": {
      post: operation({
        ...asClient,
        operationId: "sendSchemaDigest",
        summary: "Round 1: the client's schema digest",
        requestBody: json(schemaDigestSchema),
        success: DIGEST_ACCEPTED,
        failures: ["404", "422"],
        conflict: NOT_NOW,
      }),
    },
    "/api/v1/digests/encoding": {
      get: operation({
        ...asClient,
        operationId: "getEncoding",
        summary: "The encoding (merged round 1); 409 while round 1 is open",
        success: ["200", "The encoding with its hash."],
        failures: ["404"],
        conflict: NOT_NOW,
      }),
    },
    "/api/v1/digests/work": {
      get: operation({
        ...asClient,
        operationId: "waitForDigestWork",
        summary: "Long poll: the coordinator's next question to this client, or the end",
        description:
          "Answer `evaluate` and `gram` at /api/v1/digests/exchanges/{exchangeId}, `gradients` by sending the gradient digest. A client that lost its connection asks again and finds the same open question.",
        requestParams: { query: waitQuerySchema },
        success: ["200", "What to do next.", clientWorkSchema],
        failures: ["404", "422"],
      }),
    },
    "/api/v1/digests/exchanges/{exchangeId}": {
      post: operation({
        ...asClient,
        operationId: "answerDigestExchange",
        summary: "Answer one evaluation of the fit (Σℓᵢ, Σ∇ℓᵢ) or Σx̃x̃ᵀ",
        requestParams: { path: exchangePathSchema },
        requestBody: json(z.union([evaluationSumsSchema, z.array(z.array(z.number()))])),
        success: ["200", "Stored.", acceptedDigestSchema],
        failures: ["404", "422"],
      }),
    },
    "/api/v1/digests/gradients": {
      post: operation({
        ...asClient,
        operationId: "sendGradientDigest",
        summary: "Round 2: the gradient digest at the points the coordinator asked for",
        requestBody: json(gradientDigestSchema),
        success: DIGEST_ACCEPTED,
        failures: ["404", "422"],
        conflict: NOT_NOW,
      }),
    },
  };
}
