/**
 * Federated analyses on the server (methods.md §9): what the API's routes and the web's server
 * actions call. Analyst side (the caller has checked the capability): createFederatedAnalysis,
<<<<<<< HEAD
 * issueClientKey, revokeClientKey, closeRoster, getFederatedStatus, listFederatedAnalysesOf.
 * Client side (a client key's caller, or the analyst uploading a client's file):
 * acceptSchemaDigest, readClientEncoding, waitForClientWork, answerExchange, acceptGradientDigest;
 * findRosterSender names the client an analyst uploads a digest file for.
 * The coordinator runs in the worker: runFederatedCoordinator.
=======
 * issueClientKey, revokeClientKey, closeRoster, cancelFederatedAnalysis, getFederatedStatus,
 * listFederatedAnalysesOf.
 * Client side (a client key's caller, or `findClientSender` for the analyst uploading a client's
 * file): describeClient, acceptSchemaDigest, readClientEncoding, waitForClientWork,
 * answerExchange, acceptGradientDigest.
 * The coordinator runs in the worker: runFederatedCoordinator (./run-coordinator).
>>>>>>> fbee10f (Federated analyses over the API and in the worker: analyst routes (create, status and roster, keys, close, cancel) and client-key routes (round 1, encoding, long-polled questions of the fit, round 2), all in the OpenAPI document; the worker's coordinator runs the engine's analyzeFromDigests over stored exchanges and stores a normal report; npm run digest -- --server … is the online client)
 */
export { acceptGradientDigest } from "./accept-gradient-digest";
export { acceptSchemaDigest } from "./accept-schema-digest";
export { answerExchange } from "./answer-exchange";
export { CANCELLED_MESSAGE, cancelFederatedAnalysis } from "./cancel-federated-analysis";
export { closeRoster } from "./close-roster";
export { createFederatedAnalysis } from "./create-federated-analysis";
export { describeClient } from "./describe-client";
export { DIGEST_CAUTION } from "./digest-caution";
export { findClientSender } from "./find-client-sender";
export { getFederatedStatus, listFederatedAnalysesOf } from "./federated-status";
export type { FederatedStatus, RosterEntry } from "./federated-status";
export { issueClientKey } from "./issue-client-key";
export { readClientEncoding } from "./read-client-encoding";
export { revokeClientKey } from "./revoke-client-key";
export { findRosterSender } from "./roster-sender";
export { waitForClientWork } from "./wait-for-client-work";
export type { ClientWork } from "./wait-for-client-work";
