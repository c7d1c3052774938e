import type { Supervisor } from "./processes";

/**
 * Starts the analysis worker (scripts/worker.ts) under the supervisor, which starts it again if it
 * dies (its unfinished analysis is then taken up again: see lib/reports/lost-runs.ts). The
 * react-server condition lets it import db/ modules, which import "server-only".
 */
export function startWorker(
  supervisor: Supervisor,
  projectRoot: string,
  env: NodeJS.ProcessEnv,
  /** Where its output goes; the terminal when not given. */
  logFile?: string,
) {
  return supervisor.keepRunning({
    name: "Analysis worker",
    command: process.execPath,
    args: ["--conditions=react-server", "--import", "tsx", "scripts/worker.ts"],
    cwd: projectRoot,
    env,
    logFile,
  });
}
