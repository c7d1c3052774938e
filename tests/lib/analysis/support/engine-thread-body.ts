// Runs the engine in this worker thread on the file named in workerData, with pass threads of its
// own (nested worker threads), and posts the summary back as JSON.
import { createReadStream } from "node:fs";
import { parentPort, workerData } from "node:worker_threads";
import { analyzePartition } from "@/lib/analysis";

const { file, threads } = workerData as { file: string; threads: number };
const summary = await analyzePartition({
  data: createReadStream(file),
  dataName: "data.csv",
  options: { labelColumn: "label", shardColumn: "shard", lambda: 1e-3 },
  threads,
});
parentPort!.postMessage(JSON.stringify(summary));
