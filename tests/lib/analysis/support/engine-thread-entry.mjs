// Entry of a worker thread that runs the engine, started by parallel-passes.test.ts the way
// lib/reports/engine-thread.ts starts its engine thread: no inherited flags, tsx registered here.
import { register } from "tsx/esm/api";

register();
await import("./engine-thread-body.ts");
