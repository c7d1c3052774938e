// `npm run test:services`: the throwaway services of `npm test` (PostgreSQL, S3 fake, SMTP fake,
// analysis worker) kept running, with their environment written to a file, so one test file can
// run against them while iterating. Ctrl-C stops everything and removes the data.
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Supervisor } from "./services/processes";
import { startThrowawayServices } from "./services/throwaway-services";
import { startWorker } from "./services/worker";

const projectRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const ENV_FILE = path.join(projectRoot, ".data", "test-services.env");

/** The variables the services set, as `export NAME='value'` lines a shell can source. */
function shellExports(env: NodeJS.ProcessEnv): string {
  const names = Object.keys(env).filter((name) => env[name] !== process.env[name]);
  return names
    .map((name) => `export ${name}='${(env[name] ?? "").replaceAll("'", "'\\''")}'`)
    .join("\n");
}

const supervisor = new Supervisor();
supervisor.installExitHandlers();

async function main() {
  const { env } = await startThrowawayServices(supervisor);
  startWorker(supervisor, projectRoot, env);
  // The file holds the throwaway database's password, so only its owner may read it.
  mkdirSync(path.dirname(ENV_FILE), { recursive: true });
  writeFileSync(ENV_FILE, `${shellExports(env)}\n`, { mode: 0o600 });
  console.log(`\nServices are up. In another shell:\n`);
  console.log(`  set -a; . ${path.relative(process.cwd(), ENV_FILE)}; set +a`);
  console.log(`  npx vitest run tests/app/members-actions.test.ts   (any test file)\n`);
  console.log("Ctrl-C stops them.");
}

main().catch((error: unknown) => {
  console.error(`Could not start the services: ${error instanceof Error ? error.message : error}`);
  supervisor.exitAfterShutdown(1);
});
