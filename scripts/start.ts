// `npm start`: runs Partita on this machine with everything it needs, kept under .data/ so the next
// start finds the same database, objects and mail. Ctrl-C stops every process it started.
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { closeDb } from "../db/client";
import { seedDemo } from "../lib/demo/seed";
import { seedDemoReviews } from "../lib/demo/seed-reviews";
import { fakeS3Credentials, startFakeS3 } from "../fakes/s3";
import { startFakeSmtp } from "../fakes/smtp";
import { buildAppEnvironment, type AppServices } from "./services/app-environment";
import { applyMigrations } from "./services/migrate";
import { buildNextApp, isBuildStale, startNextApp } from "./services/next-app";
import { assertPortFree, readPort } from "./services/ports";
import { startPostgres } from "./services/postgres";
import { Supervisor } from "./services/processes";
import { startWorker } from "./services/worker";

const projectRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const dataDir = path.resolve(process.env.PARTITA_DATA_DIR ?? path.join(projectRoot, ".data"));
const bucket = "partita";

const ports = {
  postgres: readPort("PARTITA_PG_PORT", 54329),
  s3: readPort("PARTITA_S3_PORT", 4569),
  smtp: readPort("PARTITA_SMTP_PORT", 2525),
  app: readPort("PORT", 3000),
};

// Real services are used when their configuration is given; otherwise the local fakes.
const useFakeS3 = !process.env.S3_ACCESS_KEY_ID;
const useFakeSmtp = !process.env.SMTP_HOST;

/** A random secret kept in a file under .data/, created on first start and reused after. */
function readOrCreateSecret(file: string): string {
  if (existsSync(file)) return readFileSync(file, "utf8").trim();
  const secret = randomBytes(48).toString("base64url");
  writeFileSync(file, `${secret}\n`, { mode: 0o600 });
  return secret;
}

function step(message: string) {
  console.log(`\n▸ ${message}`);
}

/** How long the demo review seed waits for the worker to store the demo reports. */
const DEMO_REVIEW_WAIT_MS = 10 * 60 * 1000;

const supervisor = new Supervisor();
supervisor.installExitHandlers();

async function main() {
  const logDir = path.join(dataDir, "logs");
  mkdirSync(logDir, { recursive: true });
  const appUrl = `http://127.0.0.1:${ports.app}`;
  await assertPortFree(ports.app, "The app", "PORT");

  step(`PostgreSQL on 127.0.0.1:${ports.postgres}`);
  const postgres = await startPostgres(supervisor, {
    dataDir: path.join(dataDir, "pg"),
    port: ports.postgres,
    portVariable: "PARTITA_PG_PORT",
    database: "partita",
    password: readOrCreateSecret(path.join(dataDir, "postgres-password")),
    logFile: path.join(logDir, "postgres.log"),
  });
  supervisor.register("PostgreSQL", postgres.stop);

  step("Applying migrations");
  if (!(await applyMigrations(postgres.url))) console.log("  (drizzle/ holds no migrations yet)");

  const services: AppServices = {
    databaseUrl: postgres.url,
    nextAuthSecret: process.env.NEXTAUTH_SECRET ?? readOrCreateSecret(path.join(dataDir, "secret")),
    appUrl,
  };
  if (useFakeS3) {
    step(`S3 fake on 127.0.0.1:${ports.s3}`);
    await assertPortFree(ports.s3, "The S3 fake", "PARTITA_S3_PORT");
    const s3 = await startFakeS3({
      port: ports.s3,
      directory: path.join(dataDir, "s3"),
      bucket,
      allowedOrigins: [appUrl, `http://localhost:${ports.app}`],
    });
    supervisor.register("S3 fake", s3.stop);
    services.fakeS3 = { endpoint: s3.endpoint, bucket, ...fakeS3Credentials };
  }
  if (useFakeSmtp) {
    step(`SMTP fake on 127.0.0.1:${ports.smtp}`);
    await assertPortFree(ports.smtp, "The SMTP fake", "PARTITA_SMTP_PORT");
    const mailDirectory = path.join(dataDir, "mail");
    const smtp = await startFakeSmtp({ port: ports.smtp, directory: mailDirectory });
    supervisor.register("SMTP fake", smtp.stop);
    services.fakeSmtp = { port: ports.smtp, mailDirectory };
  }
  const appEnvironment = buildAppEnvironment(services);
  // The seed and anything it imports read configuration from this process's environment.
  Object.assign(process.env, appEnvironment);

  step("Seeding the demo workspace");
  const accounts = await seedDemo(postgres.url);

  step("Starting the analysis worker");
  startWorker(supervisor, projectRoot, appEnvironment);
  seedDemoReviewsInBackground();

  if (isBuildStale(projectRoot)) {
    step("Building the app (next build)");
    if ((await buildNextApp(supervisor, projectRoot, appEnvironment)) !== 0) {
      throw new Error("next build failed; see the output above");
    }
  }

  step(`Starting the app on ${appUrl}`);
  await startNextApp(supervisor, { projectRoot, port: ports.app, env: appEnvironment });

  const shown = (folder: string) =>
    folder.startsWith(projectRoot + path.sep) ? path.relative(projectRoot, folder) : folder;
  console.log(`\nPartita is running at ${appUrl}\n`);
  console.log(
    `  PostgreSQL  127.0.0.1:${ports.postgres}, data in ${shown(path.join(dataDir, "pg"))}`,
  );
  if (services.fakeS3) {
    console.log(
      `  S3 fake     ${services.fakeS3.endpoint}, bucket "${bucket}", objects in ${shown(path.join(dataDir, "s3"))}`,
    );
  }
  if (services.fakeSmtp) {
    console.log(
      `  SMTP fake   127.0.0.1:${ports.smtp}, mail in ${shown(services.fakeSmtp.mailDirectory)}, inbox at ${appUrl}/dev/inbox`,
    );
  }
  console.log("  Worker      one analysis worker (scripts/worker.ts), output below");
  console.log(`  Logs        ${shown(logDir)}`);
  if (accounts.length > 0) {
    console.log("\nDemo accounts (demo data only):");
    for (const account of accounts) {
      console.log(`  ${account.role.padEnd(9)} ${account.email.padEnd(32)} ${account.password}`);
    }
  }
  console.log("\nPress Ctrl-C to stop.");
}

/**
 * The demo's reviews need the demo reports, which the worker stores a little after start; waiting
 * for them must not hold up the app, so this runs beside the build and start and reports by line.
 */
function seedDemoReviewsInBackground() {
  seedDemoReviews(DEMO_REVIEW_WAIT_MS)
    .then((seeded) => {
      if (seeded) console.log("Demo: review requests, a comment and an approval added.");
    })
    .catch((error: unknown) => {
      console.error(
        `Demo reviews were not added: ${error instanceof Error ? error.message : error}`,
      );
    })
    .finally(() => void closeDb());
}

main().catch((error: unknown) => {
  // After Ctrl-C a step cut short fails too; that is not worth a second message.
  if (!supervisor.isShuttingDown) {
    const message = error instanceof Error ? error.message : String(error);
    console.error(`\npartita start failed: ${message}`);
  }
  supervisor.exitAfterShutdown(1);
});
