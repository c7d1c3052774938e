/**
 * The load test of `npm run bench`: throwaway services (PostgreSQL, fakes) on free loopback ports,
 * the production build of the app, a workspace seeded with LOAD_REPORTS reports of the bench's
 * 100-shard summary, then LOAD_CLIENTS concurrent clients (autocannon) against the reports list
 * and a report's summary through the token API. Bounded: a fixed number of requests per route and
 * a time limit; each client has its own token, so the per-token limit (240 a minute) never answers
 * 429 and every response is a real one. Prints requests/s and p50/p95/p99 latency per route.
 */
import { execFile } from "node:child_process";
import path from "node:path";
import { promisify } from "node:util";
import autocannon from "autocannon";
import { buildNextApp, isBuildStale, startNextApp } from "../services/next-app";
import { Supervisor } from "../services/processes";
import { startThrowawayServices } from "../services/throwaway-services";

export const LOAD_REPORTS = 1_000;
export const LOAD_CLIENTS = 20;
/** Requests per route: 50 per client, well under one token's 240 a minute. */
const REQUESTS_PER_ROUTE = LOAD_CLIENTS * 50;
const ROUTE_TIME_LIMIT_MS = 120_000;

const run = promisify(execFile);

interface RouteFigures {
  requests: number;
  errors: number;
  perSecond: number;
  p50: number;
  p95: number;
  p99: number;
}

/** The latency at quantile q of sorted values (nearest rank, the common definition). */
function nearestRank(sorted: number[], q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))];
}

/** LOAD_CLIENTS connections, each with its own token, sending `amount` GETs in all. */
async function loadRoute(url: string, tokens: string[], amount: number): Promise<RouteFigures> {
  const latencies: number[] = [];
  let nextToken = 0;
  const started = performance.now();
  const instance = autocannon({
    url,
    connections: LOAD_CLIENTS,
    amount,
    timeout: 30,
    setupClient: (client) => {
      client.setHeaders({ authorization: `Bearer ${tokens[nextToken++ % tokens.length]}` });
    },
  });
  instance.on("response", (_client, _status, _bytes, responseTime) => latencies.push(responseTime));
  const limit = setTimeout(() => instance.stop(), ROUTE_TIME_LIMIT_MS);
  const result = await instance;
  clearTimeout(limit);
  const seconds = (performance.now() - started) / 1000;
  latencies.sort((a, b) => a - b);
  return {
    requests: latencies.length,
    errors: result.errors + result.timeouts + result.non2xx,
    perSecond: latencies.length / seconds,
    p50: nearestRank(latencies, 0.5),
    p95: nearestRank(latencies, 0.95),
    p99: nearestRank(latencies, 0.99),
  };
}

/**
 * Runs the load test against `summaryFile` (a summary the analyze CLI printed) and prints its
 * figures; throws when a route answered anything but 2xx.
 */
export async function runLoadTest(projectRoot: string, summaryFile: string): Promise<void> {
  const supervisor = new Supervisor();
  // Ctrl-C stops the app and the throwaway services instead of leaving them running.
  supervisor.installExitHandlers();
  try {
    const { env, appPort } = await startThrowawayServices(supervisor);
    process.stdout.write(`seeding ${LOAD_REPORTS} reports …\n`);
    const seeded = await run(
      process.execPath,
      [
        "--conditions=react-server",
        "--import",
        "tsx",
        path.join(projectRoot, "scripts/bench/seed-reports.ts"),
        summaryFile,
        String(LOAD_REPORTS),
        String(LOAD_CLIENTS),
      ],
      { cwd: projectRoot, env, maxBuffer: 16 * 1024 * 1024 },
    );
    const { tokens, reportId } = JSON.parse(seeded.stdout) as {
      tokens: string[];
      reportId: string;
    };
    if (isBuildStale(projectRoot) && (await buildNextApp(supervisor, projectRoot, env)) !== 0) {
      throw new Error("next build failed");
    }
    const { url } = await startNextApp(supervisor, { projectRoot, port: appPort, env });
    const routes: [string, string][] = [
      ["reports list (GET /api/v1/reports, 50 of 1,000)", `${url}/api/v1/reports`],
      ["report summary (GET /api/v1/reports/{id})", `${url}/api/v1/reports/${reportId}`],
    ];
    // One unmeasured request per client and route first, so the figures are of a warm server.
    for (const [, routeUrl] of routes) await loadRoute(routeUrl, tokens, LOAD_CLIENTS);
    for (const [name, routeUrl] of routes) {
      const figures = await loadRoute(routeUrl, tokens, REQUESTS_PER_ROUTE);
      process.stdout.write(
        `${name}: ${figures.requests} requests by ${LOAD_CLIENTS} clients, ${figures.perSecond.toFixed(0)} requests/s, latency p50 ${figures.p50.toFixed(1)} ms, p95 ${figures.p95.toFixed(1)} ms, p99 ${figures.p99.toFixed(1)} ms\n`,
      );
      if (figures.errors > 0) throw new Error(`${name}: ${figures.errors} failed requests`);
    }
  } finally {
    await supervisor.shutdown();
  }
}
