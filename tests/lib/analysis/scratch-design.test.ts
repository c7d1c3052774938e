// A design beyond the memory limit lives in a scratch file read block by block for each pass; the
// summary must be the in-memory summary bit for bit (the identity the scratch path promises; the
// in-memory analysis is itself checked against scikit-learn elsewhere), and no scratch file may
// outlive the analysis, whether it succeeds or fails. The data is scikit-learn's bundled digits,
// ten copies stacked so the rows span two 16 384-row blocks (see loadStackedDigitsCsv).
import { mkdtempSync, readdirSync, readlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { analyzePartition, type PartitionInput } from "@/lib/analysis";
import { loadStackedDigitsCsv } from "./support/open-data";

const folder = mkdtempSync(path.join(tmpdir(), "partita-scratch-design-"));
/** 1 MiB: far below the 9 MB of encoded rows, so both the values read and the design go to disk. */
const TINY_LIMIT = 2 ** 20;
/** Two analyses of 18 000 rows each: allow for a busy machine. */
const TIMEOUT_MS = 300_000;

function writeDigits(name: string, lastRowEdit?: string): string {
  const digitsCsv = loadStackedDigitsCsv(10);
  const file = path.join(folder, name);
  writeFileSync(
    file,
    lastRowEdit === undefined
      ? digitsCsv
      : digitsCsv.replace(/\n([^\n]*)\n$/, `\n${lastRowEdit}\n`),
  );
  return file;
}

/** Open descriptors of this process that point into `directory` (scratch files still held). */
function openFilesIn(directory: string): string[] {
  return readdirSync("/proc/self/fd")
    .map((fd) => {
      try {
        return readlinkSync(`/proc/self/fd/${fd}`);
      } catch {
        return "";
      }
    })
    .filter((target) => target.startsWith(directory));
}

async function analyzeBoth(file: string, options: PartitionInput["options"]) {
  const scratchDirectory = mkdtempSync(path.join(folder, "scratch-"));
  const scratchFiles: string[] = [];
  const input = { data: { path: file }, dataName: "digits.csv", options, threads: 2 };
  const inMemory = await analyzePartition(input);
  const onDisk = await analyzePartition({
    ...input,
    memory: {
      limitBytes: TINY_LIMIT,
      scratchDirectory,
      onScratchFile: (scratch) => {
        scratchFiles.push(scratch);
        // Held open, but already gone from the folder.
        expect(openFilesIn(scratchDirectory)).not.toHaveLength(0);
        expect(readdirSync(scratchDirectory)).toEqual([]);
      },
    },
  });
  return { inMemory, onDisk, scratchFiles, scratchDirectory };
}

describe("a design beyond the memory limit", () => {
  it(
    "gives the in-memory summary bit for bit (classification) and leaves no file",
    async () => {
      const file = writeDigits("digits.csv");
      const { inMemory, onDisk, scratchFiles, scratchDirectory } = await analyzeBoth(file, {
        labelColumn: "digit",
        shardColumn: "shard",
      });
      // The values read, then the encoded design.
      expect(scratchFiles).toHaveLength(2);
      expect(inMemory.dataset.rows).toBe(17_970);
      expect(inMemory.preprocessing.featureNames).toContain("ink=dark");
      expect(onDisk).toEqual(inMemory);
      expect(openFilesIn(scratchDirectory)).toEqual([]);
      expect(readdirSync(scratchDirectory)).toEqual([]);
    },
    TIMEOUT_MS,
  );

  it(
    "gives the in-memory summary bit for bit (regression)",
    async () => {
      const file = writeDigits("digits-regression.csv");
      const { inMemory, onDisk, scratchFiles } = await analyzeBoth(file, {
        labelColumn: "digit",
        shardColumn: "shard",
        task: "regression",
        reference: "zero",
      });
      expect(scratchFiles).toHaveLength(2);
      expect(onDisk).toEqual(inMemory);
    },
    TIMEOUT_MS,
  );

  it(
    "closes its scratch file when the input turns out bad after the rows went to disk",
    async () => {
      // The last row's pixel is not a number: found only once every row was read (and 95% of the
      // column's values are numbers, so it is a numeric column with a bad value: an input error).
      const file = writeDigits(
        "digits-bad.csv",
        `${"0,".repeat(64)}9,s1,light`.replace(/^0,/, "x,"),
      );
      const scratchDirectory = mkdtempSync(path.join(folder, "scratch-"));
      let scratchFiles = 0;
      await expect(
        analyzePartition({
          data: { path: file },
          dataName: "digits-bad.csv",
          options: { labelColumn: "digit", shardColumn: "shard" },
          threads: 2,
          memory: { limitBytes: TINY_LIMIT, scratchDirectory, onScratchFile: () => scratchFiles++ },
        }),
      ).rejects.toThrow(/pixel_0_0.*not numbers/);
      expect(scratchFiles).toBe(1);
      expect(openFilesIn(scratchDirectory)).toEqual([]);
    },
    TIMEOUT_MS,
  );

  it(
    "refuses the simulation, which needs the rows in memory, naming the limit that would do",
    async () => {
      const file = writeDigits("digits-simulate.csv");
      await expect(
        analyzePartition({
          data: { path: file },
          options: { labelColumn: "digit", shardColumn: "shard", simulate: { seeds: 2 } },
          memory: { limitBytes: TINY_LIMIT, scratchDirectory: folder },
        }),
      ).rejects.toThrow(
        /simulation needs the encoded rows in memory.*memory limit of at least \d+ MiB/,
      );
    },
    TIMEOUT_MS,
  );
});
