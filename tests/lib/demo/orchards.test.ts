import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import path from "node:path";
import { Readable } from "node:stream";
import { promisify } from "node:util";
import { describe, expect, it } from "vitest";
import { analyzePartition } from "@/lib/analysis";
import { DEMO_PLAN, generateOrchardDemo } from "@/lib/demo/orchards";

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../../..");

// The demo is invented data; these checks are about the product's promise for the demo (two
// layouts whose verdicts disagree), not about the correctness of any number.
describe("the orchard demo", () => {
  const files = generateOrchardDemo();

  it("is the same bytes on every run, in another process too", async () => {
    // A separate Node process: a generator that read the clock, Math.random or process state
    // would give other bytes there, where a second call in this process might not.
    const { stdout } = await run(
      process.execPath,
      [
        "--import",
        "tsx",
        "--input-type=module",
        "-e",
        'import { generateOrchardDemo } from "./lib/demo/orchards.ts";' +
          "process.stdout.write(JSON.stringify(generateOrchardDemo()));",
      ],
      { cwd: root, maxBuffer: 64 * 1024 * 1024 },
    );
    // Compared by SHA-256: a failing diff of megabytes of CSV would take minutes to print.
    const digest = (text: string) => createHash("sha256").update(text).digest("hex");
    const expected = digest(JSON.stringify(files));
    expect(digest(stdout)).toBe(expected);
    expect(digest(JSON.stringify(generateOrchardDemo()))).toBe(expected);
  });

  it("assigns every row once in both layouts, to 24 shards", () => {
    const rowIds = files.dataset
      .trim()
      .split("\n")
      .slice(1)
      .map((line) => line.split(",")[0]);
    for (const layout of [files.byOrchard, files.shuffled]) {
      const lines = layout.trim().split("\n").slice(1);
      expect(lines.map((line) => line.split(",")[0])).toEqual(rowIds);
      expect(new Set(lines.map((line) => line.split(",")[1])).size).toBe(24);
    }
  });

  it("gives the two layouts different verdicts under the demo plan", async () => {
    const verdictFor = async (layout: string) => {
      const summary = await analyzePartition({
        data: Readable.from([files.dataset]),
        partition: Readable.from([layout]),
        options: { labelColumn: "condition", idColumn: "row_id", ...DEMO_PLAN },
      });
      return summary.advice.verdict;
    };
    expect(await verdictFor(files.byOrchard)).toBe("large-minibatch");
    expect(await verdictFor(files.shuffled)).toBe("local-updates");
  });
});
