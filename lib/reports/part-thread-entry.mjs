// Entry point of an analysis part's thread. A new thread starts without the TypeScript loader its
// parent process may have, so it registers tsx itself before loading the TypeScript body.
import { register } from "tsx/esm/api";

register();
await import("./part-thread.ts");
