import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import type { KeptService } from "@/scripts/services/processes";
import { Supervisor } from "@/scripts/services/processes";
import { startWorker } from "@/scripts/services/worker";

const projectRoot = path.resolve(import.meta.dirname, "../..");

/**
 * A worker started as `npm start` starts it (the same supervisor and start function), for tests
 * that kill it mid-run. Its heartbeat and staleness are shortened (500 ms, 3 s) so a dead run is
 * noticed in seconds; they go into this process's environment too, which the caller restores.
 */
export function superviseTestWorker(name: string) {
  const supervisor = new Supervisor();
  const workDir = mkdtempSync(path.join(os.tmpdir(), `partita-${name}-`));
  const logFile = path.join(workDir, "worker.log");
  let worker: KeptService | undefined;
  const log = () => readFileSync(logFile, "utf8");

  /** Waits (polling every 100 ms) until `read` returns a value, for at most `limitMs`. */
  async function waitFor<T>(
    what: string,
    read: () => Promise<T | undefined> | T | undefined,
    limitMs: number,
  ): Promise<T> {
    const deadline = Date.now() + limitMs;
    for (;;) {
      const value = await read();
      if (value !== undefined) return value;
      if (Date.now() > deadline) throw new Error(`${what} did not happen; worker log:\n${log()}`);
      await new Promise((resolve) => setTimeout(resolve, 100));
    }
  }

  return {
    log,
    waitFor,
    /** Starts the worker and resolves once it takes jobs. */
    async start(): Promise<void> {
      Object.assign(process.env, { WORKER_HEARTBEAT_MS: "500", WORKER_STALE_AFTER_MS: "3000" });
      worker = startWorker(supervisor, projectRoot, { ...process.env }, logFile);
      await waitFor("worker start", () => (/ready/.test(log()) ? true : undefined), 60_000);
    },
    /** Kills the worker's whole process group, as a crash would, and waits for the supervisor's restart. */
    async killAndAwaitRestart(): Promise<{ killedPid: number; restartedPid: number }> {
      if (!worker) throw new Error("the worker was not started");
      const restarted = new Promise<number>((resolve) =>
        worker!.onRestart((process) => resolve(process.pid)),
      );
      const killedPid = worker.current.pid;
      process.kill(-killedPid, "SIGKILL");
      return { killedPid, restartedPid: await restarted };
    },
    async stop(): Promise<void> {
      await supervisor.shutdown();
      rmSync(workDir, { recursive: true, force: true });
    },
  };
}
