/**
 * Federated analysis from client digests (methods.md §9): the same report without moving a row.
 *
 * Client side, over any source of rows (`readClientRows` for a file, or any RawDataset such as a
 * part of one large file): `computeSchemaDigest` (round 1), `encodeClientRows` with the
 * coordinator's encoding, then over `ClientPasses` `computeGradientDigest` (round 2) and
 * `ClientPasses.evaluate` (one evaluation of the fit); `LocalDigestClient` bundles these.
 * Coordinator side: `mergeSchemaDigests` → encoding, `fitPooledOptimum` driven by an evaluate(W)
 * callback, `createMeasurementRequest`, `mergeGradientDigests` → the §6 summary;
 * `analyzeFromDigests` runs all rounds against a list of client connections.
 */
export { analyzeFromDigests, createMeasurementRequest } from "./analyze-from-digests";
export type { DigestAnalysisOptions } from "./analyze-from-digests";
export { encodeClientRows, readClientRows } from "./client-rows";
export type { ClientDesign, ClientRowsInput } from "./client-rows";
export {
  DEFAULT_MINIMUM_SHARD_ROWS,
  encodingSchema,
  evaluationRequestSchema,
  evaluationSumsSchema,
  gradientDigestSchema,
  hashDocument,
  measurementRequestSchema,
  schemaDigestSchema,
  TARGET_HISTOGRAM_CELLS,
} from "./digest-format";
export type {
  DigestEncoding,
  EvaluationRequest,
  EvaluationSums,
  GradientDigest,
  MeasurementRequest,
  SchemaDigest,
} from "./digest-format";
export { fitPooledOptimum, mergeEvaluationSums } from "./fit-pooled-optimum";
export type { EvaluatePooled } from "./fit-pooled-optimum";
export { ClientPasses } from "./client-passes";
export {
  combineEvaluationSums,
  combineGradientDigests,
  combineSchemaDigests,
  findColumnsNeedingAllRows,
} from "./combine-parts";
export {
  localDatasetBytes,
  planDatasetParts,
  planOnePart,
  readDatasetPart,
  withFileRowNumbers,
} from "./dataset-parts";
export type { DatasetBytes, DatasetPart, DatasetPartPlan } from "./dataset-parts";
export { PartsConnection } from "./parts-connection";
export { computeGradientDigest } from "./gradient-digest";
export { LocalDigestClient } from "./local-client";
export type { DigestClientConnection } from "./local-client";
export { mergeGradientDigests } from "./merge-gradients";
export type { DigestPlan, MergeGradientsOptions, PooledFit } from "./merge-gradients";
export { checkSchemaAgreement, computeEncodingHash, mergeSchemaDigests } from "./merge-schemas";
export { parseDigest } from "./parse-digest";
export { computeSchemaDigest } from "./schema-digest";
export type { SchemaDigestOptions } from "./schema-digest";
