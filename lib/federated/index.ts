/**
 * Federated analyses on the server (methods.md §9): what the API's routes and the web's server
 * actions call. Analyst side (the caller has checked the capability): createFederatedAnalysis,
 * issueClientKey, revokeClientKey, closeRoster, cancelFederatedAnalysis, getFederatedStatus,
 * listFederatedAnalysesOf, findPlanToRevise.
 * Client side (a client key's caller, or `findRosterSender` for the analyst uploading a client's
 * file): describeClient, acceptSchemaDigest, readClientEncoding, waitForClientWork,
 * answerExchange, acceptGradientDigest.
 * The coordinator runs in the worker: runFederatedCoordinator (./run-coordinator).
 */
export { acceptGradientDigest } from "./accept-gradient-digest";
export { acceptSchemaDigest } from "./accept-schema-digest";
export { answerExchange } from "./answer-exchange";
export { CANCELLED_MESSAGE, cancelFederatedAnalysis } from "./cancel-federated-analysis";
export { closeRoster } from "./close-roster";
export { createFederatedAnalysis } from "./create-federated-analysis";
export { describeClient } from "./describe-client";
export { DIGEST_CAUTION } from "./digest-caution";
export { getFederatedStatus, listFederatedAnalysesOf } from "./federated-status";
export type { FederatedStatus, RosterEntry } from "./federated-status";
export { issueClientKey } from "./issue-client-key";
export { readClientEncoding } from "./read-client-encoding";
export { revokeClientKey } from "./revoke-client-key";
export { findPlanToRevise } from "./plan-to-revise";
export { findRosterSender } from "./roster-sender";
export { waitForClientWork } from "./wait-for-client-work";
export type { ClientWork } from "./wait-for-client-work";
