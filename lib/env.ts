import { z } from "zod";
import { parseMemorySize } from "./analysis/browser";

/**
 * Configuration, parsed once. Every hosted service is reached through these values only, so pointing
 * Partita at real S3 or SMTP is a matter of configuration. Bad configuration fails at start with one
 * clear line per problem instead of a confusing error deep inside an SDK.
 */
const environmentSchema = z.object({
  DATABASE_URL: z.url({ message: "DATABASE_URL must be a postgres:// URL" }),
  NEXTAUTH_SECRET: z.string().min(32, "NEXTAUTH_SECRET must be at least 32 characters"),
  NEXTAUTH_URL: z.url().default("http://127.0.0.1:3000"),
  S3_ENDPOINT: z.url().optional(),
  S3_REGION: z.string().default("us-east-1"),
  S3_BUCKET: z.string().min(3).default("partita"),
  S3_ACCESS_KEY_ID: z.string().min(1),
  S3_SECRET_ACCESS_KEY: z.string().min(1),
  S3_FORCE_PATH_STYLE: z
    .enum(["true", "false"])
    .default("false")
    .transform((value) => value === "true"),
  /**
   * How long a storage call may wait to connect, or wait idle for the next bytes, before it fails
   * (milliseconds). A frozen S3 then costs a request this long per attempt instead of hanging it.
   */
  STORAGE_TIMEOUT_MS: z.coerce.number().int().positive().default(10_000),
  /**
   * How long an analysis keeps retrying while storage is unreachable before it fails
   * (milliseconds; half an hour by default, so a storage outage of that length loses no run).
   */
  STORAGE_RETRY_WINDOW_MS: z.coerce
    .number()
    .int()
    .positive()
    .default(30 * 60 * 1000),
  /** How often a worker records that it is still running its analysis (milliseconds). */
  WORKER_HEARTBEAT_MS: z.coerce.number().int().positive().default(10_000),
  /**
   * After how long without a heartbeat a running analysis counts as abandoned by a worker that
   * died, and is handed back to the queue (milliseconds). Checked every heartbeat interval, so a
   * dead worker's run is noticed within this plus one interval: 40 s by default.
   */
  WORKER_STALE_AFTER_MS: z.coerce.number().int().positive().default(30_000),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().positive().default(2525),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  SMTP_SECURE: z
    .enum(["true", "false"])
    .default("false")
    .transform((value) => value === "true"),
  /** How long the mail sender waits to connect, for the greeting or for an answer (milliseconds). */
  MAIL_TIMEOUT_MS: z.coerce.number().int().positive().default(10_000),
  MAIL_FROM: z.string().default("Partita <no-reply@partita.local>"),
  /** The largest file a user may upload (bytes); checked in the browser and again by the server. */
  UPLOAD_MAX_BYTES: z.coerce
    .number()
    .int()
    .positive("UPLOAD_MAX_BYTES must be a positive number of bytes")
    .default(2 * 1024 ** 3),
  /**
   * How many reverse proxies stand in front of the app and append to X-Forwarded-For. 0 (the
   * default) ignores that header entirely, since any client can write it; the address the server
   * sees is then the client's. Rate limits and the development inbox key on this address.
   */
  TRUSTED_PROXY_HOPS: z.coerce
    .number()
    .int()
    .min(0, "TRUSTED_PROXY_HOPS must be 0 or more (the number of proxies in front of the app)")
    .default(0),
  /** Set by scripts/serve-app.mjs: the address the app listens on. */
  PARTITA_LISTEN_HOST: z.string().optional(),
  /**
   * Peak memory an analysis aims to stay under (2 GiB by default), as a size such as 2G, 1.5GB or
   * 512M: encoded rows beyond its share go to a scratch file, with the same report.
   */
  PARTITA_MEMORY_LIMIT: z
    .string()
    .optional()
    .transform((value, context) => {
      if (value === undefined || value === "") return undefined;
      try {
        return parseMemorySize(value, "PARTITA_MEMORY_LIMIT");
      } catch {
        context.addIssue("PARTITA_MEMORY_LIMIT must be a size such as 2G, 1.5GB, 512M or bytes");
        return z.NEVER;
      }
    }),
  /**
   * Parts one analysis is split into, each a job any worker may take (methods.md §9's digests,
   * merged by the analysis's own job): set it to the number of workers sharing the queue. 1 (the
   * default) keeps every analysis in one process.
   */
  PARTITA_ANALYSIS_PARTS: z.coerce.number().int().min(1).max(64).default(1),
  /** Smallest dataset (a size such as 64M) split into parts; smaller ones are not worth the rounds. */
  PARTITA_PARTS_MIN_BYTES: z
    .string()
    .default("64M")
    .transform((value, context) => {
      try {
        return parseMemorySize(value, "PARTITA_PARTS_MIN_BYTES");
      } catch {
        context.addIssue("PARTITA_PARTS_MIN_BYTES must be a size such as 64M, 1G or bytes");
        return z.NEVER;
      }
    }),
  /** Folder for an analysis's scratch files (the system's temporary folder by default). */
  PARTITA_SCRATCH_DIR: z.string().optional(),
  /** Set only when the local SMTP fake is in use: the folder it writes messages to. Enables the dev inbox. */
  DEV_MAIL_DIR: z.string().optional(),
});

export type Environment = z.infer<typeof environmentSchema>;

let cached: Environment | undefined;

export function readEnvironment(source: NodeJS.ProcessEnv = process.env): Environment {
  const parsed = environmentSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map(
      (issue) => `  ${issue.path.join(".") || "(environment)"}: ${issue.message}`,
    );
    throw new Error(`Partita's configuration is invalid:\n${lines.join("\n")}`);
  }
  return parsed.data;
}

/** The process environment, validated on first use and cached. */
export function env(): Environment {
  cached ??= readEnvironment();
  return cached;
}
