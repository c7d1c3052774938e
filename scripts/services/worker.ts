import type { Supervisor } from "./processes";

/**
 * Starts the analysis worker (scripts/worker.ts) under the supervisor. The react-server condition
 * lets it import db/ modules, which import "server-only".
 */
export function startWorker(supervisor: Supervisor, projectRoot: string, env: NodeJS.ProcessEnv) {
  return supervisor.startService({
    name: "Analysis worker",
    command: process.execPath,
    args: ["--conditions=react-server", "--import", "tsx", "scripts/worker.ts"],
    cwd: projectRoot,
    env,
  });
}
