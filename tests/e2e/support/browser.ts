import { mkdtemp, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";

/**
 * Debian's Chromium, never a downloaded browser. launchPersistentContext because launch() refuses
 * a --user-data-dir; a fresh profile per session keeps tests independent. The networking flags stop
 * Chromium's background traffic, which this machine's closed network would refuse in bursts.
 */
const chromiumArgs = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  close(): Promise<void>;
}

/** The app under test, started by scripts/test.ts. */
export function baseUrl(): string {
  const url = process.env.E2E_BASE_URL;
  if (!url) throw new Error("E2E_BASE_URL is not set; run browser tests through `npm test`");
  return url;
}

/** A fresh browser with one page; always close() it (e.g. in afterEach) to end Chromium. */
export async function openBrowser(): Promise<BrowserSession> {
  const profileDir = await mkdtemp(path.join(os.tmpdir(), "partita-chromium-"));
  const context = await chromium.launchPersistentContext(profileDir, {
    executablePath: "/usr/bin/chromium",
    args: chromiumArgs,
    baseURL: baseUrl(),
  });
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    close: async () => {
      await context.close();
      await rm(profileDir, { recursive: true, force: true });
    },
  };
}
