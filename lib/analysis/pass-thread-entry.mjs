// Entry point of a pass-pool worker thread (see pass-pool.ts). A new thread starts without the
// TypeScript loader its parent may have, so it registers tsx itself before loading the TypeScript
// body (the approach of lib/reports/analysis-thread-entry.mjs).
import { register } from "tsx/esm/api";

register();
await import("./pass-thread.ts");
