// Entry point of the engine's worker thread. A new thread starts without the TypeScript loader
// its parent process may have, so it registers tsx itself before loading the TypeScript body.
import { register } from "tsx/esm/api";

register();
await import("./analysis-thread.ts");
