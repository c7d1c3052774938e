import { existsSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import type { Supervisor } from "./processes";

/** What a production build is made from; a change to any of them makes .next stale. */
const buildInputs = [
  "app",
  "components",
  "lib",
  "db",
  "public",
  "types",
  "next.config.mjs",
  "tailwind.config.ts",
  "postcss.config.mjs",
  "tsconfig.json",
  "package-lock.json",
];

const readyTimeoutMs = 120_000;

function nextBin(projectRoot: string): string {
  return path.join(projectRoot, "node_modules", "next", "dist", "bin", "next");
}

/** True when .next holds no finished build or any build input changed after it. */
export function isBuildStale(projectRoot: string): boolean {
  const buildId = path.join(projectRoot, ".next", "BUILD_ID");
  if (!existsSync(buildId)) return true;
  const builtAt = statSync(buildId).mtimeMs;
  return buildInputs.some((input) => newestModification(path.join(projectRoot, input)) > builtAt);
}

function newestModification(target: string): number {
  if (!existsSync(target)) return 0;
  const stats = statSync(target);
  if (!stats.isDirectory()) return stats.mtimeMs;
  return readdirSync(target).reduce(
    (newest, entry) => Math.max(newest, newestModification(path.join(target, entry))),
    stats.mtimeMs,
  );
}

/** `next build`; resolves with its exit code. */
export function buildNextApp(
  supervisor: Supervisor,
  projectRoot: string,
  env: NodeJS.ProcessEnv,
): Promise<number> {
  return supervisor.runToCompletion({
    name: "next build",
    command: process.execPath,
    args: [nextBin(projectRoot), "build"],
    cwd: projectRoot,
    env,
  });
}

/**
 * Serves the production build on 127.0.0.1 through scripts/serve-app.mjs (which tells the app the
 * caller's real address) and resolves once it answers HTTP. Started through Node directly (not
 * npx) so the supervisor holds the server's own process id.
 */
export async function startNextApp(
  supervisor: Supervisor,
  options: { projectRoot: string; port: number; env: NodeJS.ProcessEnv },
): Promise<{ url: string }> {
  // Restarted if it dies, while the database, the worker and the fakes keep running.
  const server = supervisor.keepRunning({
    name: "Next.js server",
    command: process.execPath,
    args: [
      path.join(options.projectRoot, "scripts", "serve-app.mjs"),
      "-H",
      "127.0.0.1",
      "-p",
      String(options.port),
    ],
    cwd: options.projectRoot,
    env: options.env,
  });
  const url = `http://127.0.0.1:${options.port}`;
  let exited = false;
  void server.current.exited.then(() => (exited = true));
  const deadline = Date.now() + readyTimeoutMs;
  while (!exited) {
    try {
      await fetch(url, { redirect: "manual", signal: AbortSignal.timeout(5_000) });
      return { url };
    } catch {
      if (Date.now() > deadline) throw new Error(`the app did not answer on ${url} in time`);
      await new Promise((resolve) => setTimeout(resolve, 300));
    }
  }
  throw new Error("the Next.js server exited before it answered");
}
