import { createDocument } from "zod-openapi";
import {
  createUploadSchema,
  abortMultipartSchema,
  completeMultipartSchema,
} from "@/lib/validation/upload";
import { registerDataFileSchema, signPartsSchema } from "@/lib/validation/upload";
import { layoutPlanSchema } from "@/lib/validation/layout-plan";
import { startAnalysisSchema } from "@/lib/validation/start-analysis";
import { API_TOKEN_PREFIX } from "@/lib/auth/api-token-secret";
import { json, operation } from "./openapi-operation";
import { clientKeyScheme, federatedPaths } from "./openapi-federated";
import {
  analysisListSchema,
  analysisPathSchema,
  analysisStatusSchema,
  callerSchema,
  completedUploadSchema,
  dataFileListSchema,
  listPageQuerySchema,
  layoutCandidatePathSchema,
  layoutComparisonSchema,
  layoutPlanPathSchema,
  layoutPlanStatusSchema,
  listReportsQuerySchema,
  partitionSummarySchema,
  queuedAnalysisSchema,
  queuedLayoutPlanSchema,
  registeredFileSchema,
  reportListSchema,
  reportPathSchema,
  signedPartsSchema,
  uploadTicketSchema,
} from "./schemas";

const PLAN_RUNNING = "Not yet: the plan is still running.";

/**
 * The OpenAPI 3.1 description of /api/v1, generated from the zod schemas the handlers validate
 * with, so the document cannot drift from what the API accepts.
 */
export function createApiDocument() {
  return createDocument({
    openapi: "3.1.0",
    info: {
      title: "Partita pipeline API",
      version: "1.0.0",
      description:
        "Run partition analyses from a pipeline: upload a dataset and a layout, start an analysis, " +
        "follow it, and read the report's JSON summary; or plan candidate layouts of a dataset " +
        "and read their comparison. Authenticate with a personal API token " +
        `(\`Authorization: Bearer ${API_TOKEN_PREFIX}…\`) made on a workspace's API tokens page; ` +
        "it acts with its owner's current role in that workspace.",
    },
    servers: [{ url: "/" }],
    security: [{ bearerToken: [] }],
    components: {
      securitySchemes: {
        bearerToken: {
          type: "http",
          scheme: "bearer",
          description: `A personal API token, starting with ${API_TOKEN_PREFIX}.`,
        },
        ...clientKeyScheme,
      },
    },
    paths: {
      "/api/v1/workspace": {
        get: operation({
          operationId: "getCaller",
          summary: "The token's workspace, user and current role",
          success: ["200", "Who the token acts as.", callerSchema],
          failures: [],
        }),
      },
      "/api/v1/uploads": {
        post: operation({
          operationId: "createUpload",
          summary: "Presigned URL(s) to upload a dataset, layout or weights file",
          description:
            "With method `single`, PUT the file to `url` with `headers`. With `multipart`, PUT " +
            "each part to its URL, keep each answer's ETag, then POST /api/v1/uploads/complete.",
          requestBody: json(createUploadSchema),
          success: ["201", "Where to send the bytes.", uploadTicketSchema],
          failures: ["403", "422"],
        }),
      },
      "/api/v1/uploads/parts": {
        post: operation({
          operationId: "signUploadParts",
          summary: "Fresh URLs for parts of a multipart upload",
          requestBody: json(signPartsSchema),
          success: ["200", "One URL per part number.", signedPartsSchema],
          failures: ["403", "404", "422"],
        }),
      },
      "/api/v1/uploads/complete": {
        post: operation({
          operationId: "completeUpload",
          summary: "Assemble a multipart upload from its parts",
          requestBody: json(completeMultipartSchema),
          success: ["200", "The assembled object's key.", completedUploadSchema],
          failures: ["403", "404", "422"],
        }),
      },
      "/api/v1/uploads/abort": {
        post: operation({
          operationId: "abortUpload",
          summary: "Drop an unfinished multipart upload",
          requestBody: json(abortMultipartSchema),
          success: ["204", "Dropped (or already gone)."],
          failures: ["403", "404", "422"],
        }),
      },
      "/api/v1/files": {
        get: operation({
          operationId: "listFiles",
          summary: "The workspace's registered files, newest first, a page at a time",
          requestParams: { query: listPageQuerySchema },
          success: ["200", "A page of files.", dataFileListSchema],
          failures: ["422"],
        }),
        post: operation({
          operationId: "registerFile",
          summary: "Register an uploaded object as a dataset, layout or weights file",
          description:
            "The server reads the object back, previews it and hashes it; bad files answer 422. " +
            "Bytes already registered as a file of the same kind answer 200 with that file.",
          requestBody: json(registerDataFileSchema),
          success: ["201", "The registered file.", registeredFileSchema],
          failures: ["403", "404", "422"],
        }),
      },
      "/api/v1/analyses": {
        get: operation({
          operationId: "listAnalyses",
          summary: "The workspace's analyses, newest first, a page at a time",
          requestParams: { query: listPageQuerySchema },
          success: ["200", "A page of analyses.", analysisListSchema],
          failures: ["422"],
        }),
        post: operation({
          operationId: "startAnalysis",
          summary: "Queue an analysis of registered files with the plan's parameters",
          requestBody: json(startAnalysisSchema),
          success: ["202", "Queued; poll statusUrl.", queuedAnalysisSchema],
          failures: ["403", "422"],
        }),
      },
      "/api/v1/analyses/{analysisId}": {
        get: operation({
          operationId: "getAnalysisStatus",
          summary: "Status, stage and progress of an analysis",
          requestParams: { path: analysisPathSchema },
          success: ["200", "The analysis's state.", analysisStatusSchema],
          failures: ["404", "422"],
        }),
      },
      "/api/v1/layout-plans": {
        post: operation({
          operationId: "startLayoutPlan",
          summary:
            "Queue a layout plan: candidate splits of a registered dataset, scored and compared",
          description:
            "The worker reads and encodes the dataset once and scores every generator's candidate " +
            "with the full analysis under the same options (methods.md §8). No shard column, no " +
            "simulation; a group column keeps each group's rows in one shard.",
          requestBody: json(layoutPlanSchema),
          success: ["202", "Queued; poll statusUrl.", queuedLayoutPlanSchema],
          failures: ["403", "422"],
        }),
      },
      "/api/v1/layout-plans/{planId}": {
        get: operation({
          operationId: "getLayoutPlanStatus",
          summary: "State of a layout plan and of each candidate",
          requestParams: { path: layoutPlanPathSchema },
          success: ["200", "The plan's state.", layoutPlanStatusSchema],
          failures: ["404", "422"],
        }),
      },
      "/api/v1/layout-plans/{planId}/result": {
        get: operation({
          operationId: "getLayoutComparison",
          summary: "The comparison of an ended plan (the CLI's layouts.json)",
          requestParams: { path: layoutPlanPathSchema },
          success: [
            "200",
            "Scored candidates ranked, and the failed ones.",
            layoutComparisonSchema,
          ],
          failures: ["404", "422"],
          conflict: PLAN_RUNNING,
        }),
      },
      "/api/v1/layout-plans/{planId}/candidates/{candidate}/map": {
        get: operation({
          operationId: "getLayoutCandidateMap",
          summary: "A scored candidate's partition map as CSV (the CLI's <name>.csv)",
          description:
            "`row_id,shard`, or the 0-based data row index without an id column (methods.md §8): " +
            "upload it as a layout and the analysis reads it back to the candidate's summary.",
          requestParams: { path: layoutCandidatePathSchema },
          success: ["200", "The partition map."],
          successMediaType: "text/csv",
          failures: ["404", "422"],
          conflict: PLAN_RUNNING,
        }),
      },
      "/api/v1/reports": {
        get: operation({
          operationId: "listReports",
          summary: "The workspace's reports, newest first",
          requestParams: { query: listReportsQuerySchema },
          success: ["200", "Matching reports.", reportListSchema],
          failures: ["422"],
        }),
      },
      "/api/v1/reports/{reportId}": {
        get: operation({
          operationId: "getReportSummary",
          summary:
            "A report's JSON summary (the CLI's output, then `inputs`: files and parameters)",
          requestParams: { path: reportPathSchema },
          success: ["200", "The summary.", partitionSummarySchema],
          failures: ["404", "422"],
        }),
      },
      ...federatedPaths(),
      "/api/v1/openapi.json": {
        get: {
          operationId: "getOpenApiDocument",
          summary: "This document",
          security: [],
          responses: { "200": { description: "The OpenAPI 3.1 description of /api/v1." } },
        },
      },
    },
  });
}
