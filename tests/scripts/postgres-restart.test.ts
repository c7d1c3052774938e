// PostgreSQL stopping under `npm start`'s supervisor: killed outright, or restarted behind the
// supervisor's back with pg_ctl (which leaves a server it did not start). Either way the supervisor
// runs its own server again, none is left unowned, and the app's pool (db/client.ts) logs the lost
// connection in one line and reconnects, instead of the uncaught error that ended the process.
import { spawnSync } from "node:child_process";
import { chmodSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { closeDb, db } from "@/db/client";
import { findFreePort } from "@/scripts/services/ports";
import { startPostgres, type RunningPostgres } from "@/scripts/services/postgres";
import { Supervisor, type SupervisedProcess } from "@/scripts/services/processes";

const savedDatabaseUrl = process.env.DATABASE_URL;
const supervisor = new Supervisor();
let workDir: string;
let dataDir: string;
let postgres: RunningPostgres;

/** The pid PostgreSQL records for the server running on the folder. */
const serverPid = () =>
  Number(readFileSync(path.join(dataDir, "postmaster.pid"), "utf8").split("\n")[0]);

/** Retries a query until the server answers (it is restarting), for at most a minute. */
async function queryWhenBack(): Promise<number> {
  const deadline = Date.now() + 60_000;
  for (;;) {
    try {
      const result = await db().execute<{ answer: number }>(sql`select 1 as answer`);
      return result.rows[0].answer;
    } catch (error) {
      if (Date.now() > deadline) throw error;
      await new Promise((resolve) => setTimeout(resolve, 200));
    }
  }
}

beforeAll(async () => {
  workDir = mkdtempSync(path.join(os.tmpdir(), "partita-pg-restart-"));
  chmodSync(workDir, 0o755);
  dataDir = path.join(workDir, "pg");
  postgres = await startPostgres(supervisor, {
    dataDir,
    port: await findFreePort(),
    portVariable: "(a free port)",
    database: "partita_restart",
    password: crypto.randomUUID(),
    logFile: path.join(workDir, "postgres.log"),
  });
  // Read by db/client.ts on first use, which comes after this.
  process.env.DATABASE_URL = postgres.url;
});

afterAll(async () => {
  await closeDb();
  await supervisor.shutdown();
  process.env.DATABASE_URL = savedDatabaseUrl;
  rmSync(workDir, { recursive: true, force: true });
});

describe("PostgreSQL under the supervisor", () => {
  it("is started again after it is killed, and the pool logs the lost connection and reconnects", async () => {
    expect(await queryWhenBack()).toBe(1);
    const logged = vi.spyOn(console, "error").mockImplementation(() => undefined);
    const restarted = new Promise<SupervisedProcess>((resolve) => postgres.onRestart(resolve));
    process.kill(-serverPid(), "SIGKILL");
    await restarted;
    expect(await queryWhenBack()).toBe(1);
    const lost = logged.mock.calls.filter(([line]) => String(line).startsWith("[database] lost"));
    expect(lost.length).toBeGreaterThan(0);
    logged.mockRestore();
  });

  it("replaces a server restarted with pg_ctl behind its back, leaving none unowned", async () => {
    expect(await queryWhenBack()).toBe(1);
    const ours = serverPid();
    const restarted = new Promise<SupervisedProcess>((resolve) => postgres.onRestart(resolve));
    const quiet = vi.spyOn(console, "error").mockImplementation(() => undefined);
    const versions = readdirSync("/usr/lib/postgresql").sort((a, b) => Number(b) - Number(a));
    const binDir = process.env.PG_BIN_DIR ?? path.join("/usr/lib/postgresql", versions[0], "bin");
    // As root the server runs as `postgres` (scripts/services/postgres.ts), and so must pg_ctl.
    const owner =
      process.getuid?.() === 0
        ? {
            uid: Number(spawnSync("id", ["-u", "postgres"], { encoding: "utf8" }).stdout),
            gid: Number(spawnSync("id", ["-g", "postgres"], { encoding: "utf8" }).stdout),
          }
        : {};
    // pg_ctl stops the supervisor's server and starts one of its own with the same options.
    const pgCtl = spawnSync(
      path.join(binDir, "pg_ctl"),
      ["-D", dataDir, "-m", "fast", "-l", path.join(dataDir, "outside.log"), "restart"],
      { ...owner, encoding: "utf8" },
    );
    expect(pgCtl.status, pgCtl.stderr).toBe(0);
    const replacement = await restarted;
    expect(await queryWhenBack()).toBe(1);
    quiet.mockRestore();
    // The server now running is the supervisor's child, not pg_ctl's nor the first one.
    expect(serverPid()).toBe(replacement.pid);
    expect(serverPid()).not.toBe(ours);
    expect(existsSync(path.join(dataDir, "postmaster.pid"))).toBe(true);
  });
});
