/**
 * The load test of `npm run bench`: throwaway services (PostgreSQL, fakes) on free loopback ports,
 * the production build of the app, a workspace seeded with LOAD_REPORTS reports of the bench's
 * 100-shard summary, then, per route, one client alone and LOAD_CLIENTS concurrent clients
 * (autocannon) against the reports list and a report's summary through the token API and the
 * signed-in reports list page. Bounded: a fixed number of requests per route and a time limit;
 * each client has its own token, so the per-token limit (240 a minute) never answers 429 and every
 * response is a real one. Prints requests/s and p50/p95/p99 latency per route and client count.
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
/** Requests per route under load: 50 per client, well under one token's 240 a minute. */
const REQUESTS_PER_ROUTE = LOAD_CLIENTS * 50;
/** Requests per route by the single client, on a token of its own per route: under 240 too. */
const SINGLE_CLIENT_REQUESTS = 200;
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

/** The request headers of each connection: a token of its own, or the browser's session cookie. */
type Credentials = { tokens: string[] } | { cookie: string };

/** `connections` clients, each with its own credentials, sending `amount` GETs in all. */
async function loadRoute(
  url: string,
  credentials: Credentials,
  connections: number,
  amount: number,
): Promise<RouteFigures> {
  const latencies: number[] = [];
  let nextToken = 0;
  const started = performance.now();
  const instance = autocannon({
    url,
    connections,
    amount,
    timeout: 30,
    setupClient: (client) => {
      client.setHeaders(
        "cookie" in credentials
          ? { cookie: credentials.cookie }
          : {
              authorization: `Bearer ${credentials.tokens[nextToken++ % credentials.tokens.length]}`,
            },
      );
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
        // One token per concurrent client, and one per API route for the single client.
        String(LOAD_CLIENTS + 2),
      ],
      { cwd: projectRoot, env, maxBuffer: 16 * 1024 * 1024 },
    );
    const { tokens, reportId, workspaceId, sessionCookie } = JSON.parse(seeded.stdout) as {
      tokens: string[];
      reportId: string;
      workspaceId: string;
      sessionCookie: string;
    };
    const concurrentTokens = { tokens: tokens.slice(0, LOAD_CLIENTS) };
    const browser = { cookie: sessionCookie };
    if (isBuildStale(projectRoot) && (await buildNextApp(supervisor, projectRoot, env)) !== 0) {
      throw new Error("next build failed");
    }
    const { url } = await startNextApp(supervisor, { projectRoot, port: appPort, env });
    const routes: { name: string; url: string; single: Credentials; concurrent: Credentials }[] = [
      {
        name: `reports list (GET /api/v1/reports, 50 of ${LOAD_REPORTS.toLocaleString("en")})`,
        url: `${url}/api/v1/reports`,
        single: { tokens: [tokens[LOAD_CLIENTS]] },
        concurrent: concurrentTokens,
      },
      {
        name: "report summary (GET /api/v1/reports/{id})",
        url: `${url}/api/v1/reports/${reportId}`,
        single: { tokens: [tokens[LOAD_CLIENTS + 1]] },
        concurrent: concurrentTokens,
      },
      {
        name: "reports list page (GET /w/{id}/reports, signed in)",
        url: `${url}/w/${workspaceId}/reports`,
        single: browser,
        concurrent: browser,
      },
    ];
    for (const route of routes) {
      // One unmeasured request per client first, so the figures are of a warm server.
      await loadRoute(route.url, route.concurrent, LOAD_CLIENTS, LOAD_CLIENTS);
      for (const [clients, credentials, amount] of [
        [1, route.single, SINGLE_CLIENT_REQUESTS],
        [LOAD_CLIENTS, route.concurrent, REQUESTS_PER_ROUTE],
      ] as const) {
        const figures = await loadRoute(route.url, credentials, clients, amount);
        process.stdout.write(
          `${route.name}, ${clients === 1 ? "1 client" : `${clients} concurrent clients`}: ${figures.requests} requests, ${figures.perSecond.toFixed(0)} requests/s, latency p50 ${figures.p50.toFixed(1)} ms, p95 ${figures.p95.toFixed(1)} ms, p99 ${figures.p99.toFixed(1)} ms\n`,
        );
        if (figures.errors > 0) throw new Error(`${route.name}: ${figures.errors} failed requests`);
      }
    }
  } finally {
    await supervisor.shutdown();
  }
}
