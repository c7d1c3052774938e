/**
 * Federated analyses on the server (methods.md §9): what the API's routes and the web's server
 * actions call. Analyst side (the caller has checked the capability): createFederatedAnalysis,
 * issueClientKey, revokeClientKey, closeRoster, getFederatedStatus, listFederatedAnalysesOf.
 * Client side (a client key's caller, or the analyst uploading a client's file):
 * acceptSchemaDigest, readClientEncoding, waitForClientWork, answerExchange, acceptGradientDigest;
 * findRosterSender names the client an analyst uploads a digest file for.
 * The coordinator runs in the worker: runFederatedCoordinator.
 */
export { acceptGradientDigest } from "./accept-gradient-digest";
export { acceptSchemaDigest } from "./accept-schema-digest";
export { answerExchange } from "./answer-exchange";
export { closeRoster } from "./close-roster";
export { createFederatedAnalysis } from "./create-federated-analysis";
export { getFederatedStatus, listFederatedAnalysesOf } from "./federated-status";
export type { FederatedStatus, RosterEntry } from "./federated-status";
export { issueClientKey } from "./issue-client-key";
export { readClientEncoding } from "./read-client-encoding";
export { revokeClientKey } from "./revoke-client-key";
export { findRosterSender } from "./roster-sender";
export { waitForClientWork } from "./wait-for-client-work";
export type { ClientWork } from "./wait-for-client-work";
