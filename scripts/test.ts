// `npm test` (and CI): every check against throwaway services — a PostgreSQL in a temporary folder,
// the S3 and SMTP fakes — all on free ports, so it runs beside `npm start` and leaves nothing behind.
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { buildNextApp, startNextApp } from "./services/next-app";
import { Supervisor } from "./services/processes";
import { startThrowawayServices } from "./services/throwaway-services";
import { startWorker } from "./services/worker";

const projectRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const bin = (...parts: string[]) => path.join(projectRoot, "node_modules", ...parts);

interface StageResult {
  name: string;
  passed: boolean;
}

interface TestCounts {
  passed: number;
  failed: number;
  skipped: number;
}

const supervisor = new Supervisor();
supervisor.installExitHandlers();
const results: StageResult[] = [];
const counts: TestCounts = { passed: 0, failed: 0, skipped: 0 };

function header(title: string) {
  const line = "═".repeat(Math.max(8, 72 - title.length));
  console.log(`\n══ ${title} ${line}\n`);
}

async function runStage(name: string, args: string[], env: NodeJS.ProcessEnv): Promise<boolean> {
  header(name);
  const code = await supervisor.runToCompletion({
    name,
    command: process.execPath,
    args,
    cwd: projectRoot,
    env,
  });
  results.push({ name, passed: code === 0 });
  return code === 0;
}

/** Adds what vitest's JSON report counted, so the run ends with one total line. */
function addVitestCounts(reportFile: string) {
  if (!existsSync(reportFile)) return;
  const report = JSON.parse(readFileSync(reportFile, "utf8")) as {
    numPassedTests: number;
    numFailedTests: number;
    numPendingTests: number;
    numTodoTests: number;
  };
  counts.passed += report.numPassedTests;
  counts.failed += report.numFailedTests;
  counts.skipped += report.numPendingTests + report.numTodoTests;
}

function vitestArgs(config: string, reportFile: string): string[] {
  return [
    bin("vitest", "vitest.mjs"),
    "run",
    "--config",
    config,
    "--reporter=default",
    "--reporter=json",
    `--outputFile.json=${reportFile}`,
  ];
}

async function main(): Promise<number> {
  header("Services: PostgreSQL, S3 fake, SMTP fake (throwaway, free ports)");
  const { env, appPort, appUrl, workDir } = await startThrowawayServices(supervisor);

  await runStage("Type check (tsc --noEmit)", [bin("typescript", "bin", "tsc"), "--noEmit"], env);
  await runStage("Lint (eslint .)", [bin("eslint", "bin", "eslint.js"), "."], env);
  await runStage(
    "Formatting (prettier --check .)",
    [bin("prettier", "bin", "prettier.cjs"), "--check", "."],
    env,
  );
  // The analysis worker, as `npm start` runs it, for tests that need jobs to be taken.
  startWorker(supervisor, projectRoot, env);
  const unitReport = path.join(workDir, "vitest-unit.json");
  await runStage(
    "Unit and integration tests (vitest)",
    vitestArgs("vitest.config.mts", unitReport),
    env,
  );
  addVitestCounts(unitReport);

  header("Build (next build)");
  const built = (await buildNextApp(supervisor, projectRoot, env)) === 0;
  results.push({ name: "Build (next build)", passed: built });
  if (built) {
    header(`App on ${appUrl}`);
    await startNextApp(supervisor, { projectRoot, port: appPort, env });
    const e2eReport = path.join(workDir, "vitest-e2e.json");
    await runStage(
      "Browser tests (vitest, Chromium)",
      vitestArgs("vitest.e2e.config.mts", e2eReport),
      { ...env, E2E_BASE_URL: appUrl },
    );
    addVitestCounts(e2eReport);
  } else {
    results.push({ name: "Browser tests (skipped: the build failed)", passed: false });
  }

  header("Summary");
  for (const result of results) {
    console.log(`  ${result.passed ? "pass" : "FAIL"}  ${result.name}`);
  }
  console.log(
    `\ntests: ${counts.passed} passed, ${counts.failed} failed, ${counts.skipped} skipped`,
  );
  return results.every((result) => result.passed) ? 0 : 1;
}

main()
  .then((code) => supervisor.exitAfterShutdown(code))
  .catch((error: unknown) => {
    // After Ctrl-C the next stage refuses to start; that is not worth a second message.
    if (!supervisor.isShuttingDown) {
      console.error(`\nnpm test could not run: ${error instanceof Error ? error.message : error}`);
    }
    supervisor.exitAfterShutdown(1);
  });
