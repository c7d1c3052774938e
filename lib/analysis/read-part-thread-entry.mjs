// Entry point of a thread that reads one part of a CSV (see parallel-read.ts). A new thread starts
// without the TypeScript loader its parent may have, so it registers tsx itself before loading the
// TypeScript body (as pass-thread-entry.mjs does).
import { register } from "tsx/esm/api";

register();
await import("./read-part-thread.ts");
