import { randomBytes } from "node:crypto";
import { chmodSync, mkdirSync, mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fakeS3Credentials, startFakeS3 } from "../../fakes/s3";
import { startFakeSmtp } from "../../fakes/smtp";
import { buildAppEnvironment } from "./app-environment";
import { applyMigrations } from "./migrate";
import { findFreePort } from "./ports";
import { startPostgres } from "./postgres";
import type { Supervisor } from "./processes";

export interface ThrowawayServices {
  /** The environment the app, the worker and the tests run with. */
  env: NodeJS.ProcessEnv;
  /** A free port reserved for the app, and its address (already in env as NEXTAUTH_URL). */
  appPort: number;
  appUrl: string;
  /** A temporary folder removed at shutdown, for reports and logs. */
  workDir: string;
}

/**
 * Starts a PostgreSQL in a temporary folder (migrated), the S3 fake and the SMTP fake, all on free
 * ports so they run beside `npm start`; the supervisor stops them and removes the folder at exit.
 * Shared by `npm test` and `npm run test:services`, so a single test file runs against exactly
 * what the full gate uses.
 */
export async function startThrowawayServices(supervisor: Supervisor): Promise<ThrowawayServices> {
  // Open to other users so the postgres account can reach the cluster folder inside it.
  const workDir = mkdtempSync(path.join(os.tmpdir(), "partita-test-"));
  chmodSync(workDir, 0o755);
  supervisor.register("temporary folder", async () =>
    rmSync(workDir, { recursive: true, force: true }),
  );

  const [postgresPort, s3Port, smtpPort, appPort] = await Promise.all([
    findFreePort(),
    findFreePort(),
    findFreePort(),
    findFreePort(),
  ]);
  const appUrl = `http://127.0.0.1:${appPort}`;
  const postgres = await startPostgres(supervisor, {
    dataDir: path.join(workDir, "pg"),
    port: postgresPort,
    portVariable: "(a free port)",
    database: "partita_test",
    password: randomBytes(24).toString("hex"),
    logFile: path.join(workDir, "postgres.log"),
  });
  supervisor.register("PostgreSQL", postgres.stop);
  console.log(`PostgreSQL on 127.0.0.1:${postgresPort}`);
  if (!(await applyMigrations(postgres.url))) console.log("drizzle/ holds no migrations yet");
  else console.log("Migrations applied");

  const bucket = "partita-test";
  const s3 = await startFakeS3({
    port: s3Port,
    directory: path.join(workDir, "s3"),
    bucket,
    allowedOrigins: [appUrl],
  });
  supervisor.register("S3 fake", s3.stop);
  console.log(`S3 fake on ${s3.endpoint}`);
  const mailDirectory = path.join(workDir, "mail");
  mkdirSync(mailDirectory);
  const smtp = await startFakeSmtp({ port: smtpPort, directory: mailDirectory });
  supervisor.register("SMTP fake", smtp.stop);
  console.log(`SMTP fake on 127.0.0.1:${smtpPort}`);

  const env = buildAppEnvironment({
    databaseUrl: postgres.url,
    nextAuthSecret: randomBytes(48).toString("base64url"),
    appUrl,
    fakeS3: { endpoint: s3.endpoint, bucket, ...fakeS3Credentials },
    fakeSmtp: { port: smtpPort, mailDirectory },
  });
  return { env, appPort, appUrl, workDir };
}
