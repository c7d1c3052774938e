// Entry point of a simulation worker thread (see run-threads.ts). A new thread starts without the
// TypeScript loader its parent may have, so it registers tsx itself before loading the TypeScript
// body (as lib/analysis/pass-thread-entry.mjs does).
import { register } from "tsx/esm/api";

register();
await import("./run-thread.ts");
