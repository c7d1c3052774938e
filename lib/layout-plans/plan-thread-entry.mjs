// Entry point of the layout planner's worker thread. A new thread starts without the TypeScript
// loader its parent process may have, so it registers tsx itself before loading the body.
import { register } from "tsx/esm/api";

register();
await import("./plan-thread.ts");
