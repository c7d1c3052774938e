import { z } from "zod";
import { RUN_STATUSES } from "@/db/schema/columns";
import { DECIMAL_MARKS, DELIMITERS, TEXT_ENCODINGS } from "@/lib/analysis/browser";
import { VERDICTS } from "@/lib/reports/report-filters";
import { DATA_FILE_KINDS } from "@/lib/uploads/file-rules";

// Schemas the API reads (queries, path ids) and those it answers with, for validation and for the
// OpenAPI description. Request bodies reuse the product's own schemas (lib/validation), so the
// API, the upload form and the analysis form accept exactly the same input.

const resourceId = z.string().trim().min(1).max(100);

export const analysisPathSchema = z.object({
  analysisId: resourceId.meta({ description: "The id returned by POST /api/v1/analyses." }),
});

export const reportPathSchema = z.object({
  reportId: resourceId.meta({ description: "A report id, e.g. from GET /api/v1/reports." }),
});

/** A page of a newest-first list: how many, and where the previous page ended. */
export const listPageQuerySchema = z.object({
  limit: z.coerce
    .number()
    .int()
    .min(1)
    .max(100)
    .default(50)
    .meta({ description: "How many, newest first (1–100)." }),
  cursor: z.string().max(300).optional().meta({
    description: "Start after the ones already listed: the nextCursor of the previous page.",
  }),
});

/** GET /api/v1/reports: unlike the list page, a bad filter is the caller's mistake (422). */
export const listReportsQuerySchema = listPageQuerySchema.extend({
  verdict: z.enum(VERDICTS).optional().meta({ description: "Only reports with this verdict." }),
  q: z
    .string()
    .trim()
    .min(1)
    .max(100)
    .optional()
    .meta({ description: "Only reports whose title contains this text." }),
});

const nextCursorSchema = z.string().nullable().meta({
  description: "Pass as cursor for the next page; null when this page is the last.",
});

export const apiErrorSchema = z
  .object({
    error: z.object({
      code: z.string().meta({
        description:
          "Stable: missing_token, invalid_token, token_expired, token_revoked, token_no_access, " +
          "forbidden, not_found, invalid, conflict, gone, rate_limited, internal.",
      }),
      message: z.string().meta({ description: "Written for a person; safe to show." }),
      fieldErrors: z
        .record(z.string(), z.string())
        .optional()
        .meta({ description: "The first problem per input field, keyed by its dotted path." }),
    }),
  })
  .meta({ id: "Error" });

export const callerSchema = z
  .object({
    workspace: z.object({ id: z.string(), name: z.string() }),
    role: z.enum(["owner", "analyst", "reviewer"]),
    user: z.object({ id: z.string(), email: z.string() }),
    token: z.object({ name: z.string() }),
  })
  .meta({ id: "Caller" });

export const uploadTicketSchema = z
  .discriminatedUnion("method", [
    z.object({
      method: z.literal("single"),
      key: z.string(),
      url: z.string().meta({ description: "PUT the whole file here within 5 minutes." }),
      headers: z
        .record(z.string(), z.string())
        .meta({ description: "Headers the PUT must carry exactly." }),
    }),
    z.object({
      method: z.literal("multipart"),
      key: z.string(),
      uploadId: z.string(),
      partSize: z.number().int().meta({ description: "Bytes per part; the last may be shorter." }),
      parts: z.array(z.object({ partNumber: z.number().int(), url: z.string() })),
    }),
  ])
  .meta({ id: "UploadTicket" });

export const signedPartsSchema = z.object({
  parts: z.array(z.object({ partNumber: z.number().int(), url: z.string() })),
});

export const completedUploadSchema = z.object({ key: z.string() });

export const dataFileSchema = z
  .object({
    id: z.string(),
    kind: z.enum(DATA_FILE_KINDS),
    name: z.string(),
    sizeBytes: z.number().int(),
    createdAt: z.iso.datetime(),
    preview: z
      .object({
        columns: z.array(
          z.object({
            name: z.string(),
            type: z.enum(["numeric", "categorical", "empty"]),
            distinct: z.number().int(),
          }),
        ),
        rows: z.array(z.array(z.string())),
        truncated: z.boolean(),
        format: z
          .object({
            encoding: z.enum(TEXT_ENCODINGS),
            delimiter: z.enum(DELIMITERS),
            decimalMark: z.enum(DECIMAL_MARKS),
          })
          .optional()
          .meta({
            description:
              "How a CSV's text was read for the preview (detected): the values to pass as options.encoding, options.delimiter and options.decimalMark. Absent for Parquet.",
          }),
      })
      .nullable(),
    sha256: z.string().nullable().meta({
      description: "SHA-256 of the stored bytes (null for files registered before it was kept).",
    }),
    analysisCount: z
      .number()
      .int()
      .meta({ description: "Analyses that read the file; one that none reads may be deleted." }),
  })
  .meta({ id: "DataFile" });

export const registeredFileSchema = dataFileSchema
  .extend({
    reused: z.boolean().meta({
      description:
        "True when the same bytes were already a file of this kind in the workspace: that file is returned (200) and the new upload is removed.",
    }),
  })
  .meta({ id: "RegisteredFile" });

export const queuedAnalysisSchema = z
  .object({
    analysisId: z.string(),
    statusUrl: z.string().meta({ description: "Poll this for status and progress." }),
  })
  .meta({ id: "QueuedAnalysis" });

const ANALYSIS_STAGES = ["reading", "encoding", "fitting", "measuring", "advising"] as const;

export const analysisStatusSchema = z
  .object({
    status: z.enum(RUN_STATUSES),
    stage: z.enum(ANALYSIS_STAGES).nullable().meta({
      description:
        "The engine's stage. Always set while running (reading until the worker reports otherwise); null while queued.",
    }),
    fraction: z.number().meta({ description: "Progress within the stage, 0 to 1." }),
    progress: z.number().meta({ description: "Overall progress, 0 to 1, simulation included." }),
    failureMessage: z.string().nullable(),
    attempts: z.number().int(),
    simulates: z.boolean().meta({ description: "Whether the analysis also simulates the plan." }),
    simulation: z
      .object({
        algorithm: z.enum(["minibatch", "local", "scaffold"]),
        phase: z.enum(["step-size", "seeds"]).meta({
          description: "Searching the step size on one seed, or re-running it on S seeds.",
        }),
        run: z.number().int().meta({
          description:
            "1-based run among `runs` = 3 × (8 + 3 + S): per algorithm the step-size grid, three places for extending it (skipped unless needed) and the seeds.",
        }),
        runs: z.number().int(),
        round: z.number().int().meta({ description: "Rounds finished in this run." }),
        rounds: z.number().int(),
        fraction: z.number().meta({ description: "The whole simulation's progress, 0 to 1." }),
      })
      .nullable()
      .meta({ description: "The simulation's latest run and round; null until it starts." }),
    reportId: z.string().nullable().meta({ description: "Set once the analysis succeeded." }),
    title: z.string(),
    workerLostAt: z.iso.datetime().nullable().meta({
      description: "When the worker running it was found stopped; the run was restarted.",
    }),
    storageUnreachableSince: z.iso.datetime().nullable().meta({
      description: "Since when the run has been waiting for storage to answer; null when it does.",
    }),
    createdAt: z.iso.datetime(),
    startedAt: z.iso.datetime().nullable(),
    finishedAt: z.iso.datetime().nullable(),
  })
  .meta({ id: "AnalysisStatus" });

export const reportListSchema = z
  .object({
    reports: z.array(
      z.object({
        id: z.string(),
        title: z.string(),
        verdict: z.enum(VERDICTS),
        version: z.number().int(),
        latestVersion: z.number().int(),
        lineageId: z.string(),
        createdAt: z.iso.datetime(),
        authorName: z.string(),
        ratio: z.number().nullable().meta({ description: "Local / minibatch bound ratio ρ." }),
        datasetRows: z.number().int(),
        shardCount: z.number().int(),
      }),
    ),
    nextCursor: z.string().nullable().meta({
      description: "Pass as cursor for the next page; null when this page is the last.",
    }),
  })
  .meta({ id: "ReportList" });

export const partitionSummarySchema = z
  .looseObject({
    engineVersion: z.string(),
    dataset: z.looseObject({}),
    shards: z.array(z.looseObject({})),
    labelSkew: z.looseObject({}),
    quantitySkew: z.looseObject({}),
    model: z.looseObject({}),
    heterogeneity: z.looseObject({}),
    advice: z.looseObject({ verdict: z.enum(VERDICTS) }),
    preprocessing: z.looseObject({}),
  })
  .meta({
    id: "PartitionSummary",
    description:
      "The report's JSON summary, byte for byte what `npm run analyze` prints for the same input " +
      "and parameters and what the report page's JSON export downloads.",
  });

export const dataFileListSchema = z
  .object({ files: z.array(dataFileSchema), nextCursor: nextCursorSchema })
  .meta({ id: "DataFileList" });

export const analysisListSchema = z
  .object({
    analyses: z.array(
      z.object({
        id: z.string(),
        title: z.string(),
        status: z.enum(RUN_STATUSES),
        stage: z.string().nullable().meta({ description: "The engine's stage while running." }),
        createdAt: z.iso.datetime(),
        finishedAt: z.iso.datetime().nullable(),
      }),
    ),
    nextCursor: nextCursorSchema,
  })
  .meta({ id: "AnalysisList" });

export const layoutPlanPathSchema = z.object({
  planId: resourceId.meta({ description: "The id returned by POST /api/v1/layout-plans." }),
});

export const layoutCandidatePathSchema = layoutPlanPathSchema.extend({
  candidate: resourceId.meta({
    description: "The candidate's name: its generator with its parameter, e.g. dirichlet-0.5.",
  }),
});

export const queuedLayoutPlanSchema = z
  .object({
    planId: z.string(),
    statusUrl: z.string().meta({ description: "Poll this for the plan's and candidates' state." }),
    resultUrl: z.string().meta({ description: "The comparison, once the plan has ended." }),
  })
  .meta({ id: "QueuedLayoutPlan" });

export const layoutPlanStatusSchema = z
  .object({
    title: z.string(),
    status: z.enum(RUN_STATUSES),
    stage: z.enum(["reading", "encoding"]).nullable().meta({
      description:
        "The shared stage before the candidates: read and encode once (each candidate fits its own reference).",
    }),
    fraction: z.number().meta({ description: "Progress within the shared stage, 0 to 1." }),
    failureMessage: z.string().nullable(),
    candidates: z.array(
      z.object({
        ordinal: z.number().int(),
        name: z.string().meta({ description: "Generator with its parameter, e.g. dirichlet-0.5." }),
        status: z.enum(RUN_STATUSES),
        fraction: z.number(),
        failureMessage: z.string().nullable(),
      }),
    ),
  })
  .meta({ id: "LayoutPlanStatus" });

export const layoutComparisonSchema = z
  .object({
    layouts: z.array(
      z.object({
        name: z.string(),
        generator: z.string(),
        parameters: z.record(z.string(), z.number()),
        seed: z.number().int(),
        shards: z.number().int(),
        summary: partitionSummarySchema,
      }),
    ),
    failures: z.array(
      z.object({
        name: z.string(),
        generator: z.string(),
        parameters: z.record(z.string(), z.number()),
        seed: z.number().int(),
        message: z.string(),
        badInput: z.boolean(),
      }),
    ),
    shardCount: z.number().int(),
    groupColumn: z.string().nullable(),
  })
  .meta({
    id: "LayoutComparison",
    description:
      "methods.md §8's comparison, as `npm run layouts` writes layouts.json: candidates ranked by " +
      "ρ, then weighted JS, each with its §6 summary; the candidates that could not be made.",
  });
