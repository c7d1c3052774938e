// A design beyond the memory limit lives in a scratch file read block by block for each pass; the
// summary must be the in-memory summary bit for bit (the identity the scratch path promises; the
// in-memory analysis is itself checked against scikit-learn elsewhere), and no scratch file may
// outlive the analysis, whether it succeeds or fails. The data is scikit-learn's bundled digits
// (UCI optical recognition of handwritten digits: 1797 rows, 64 pixel features, 10 classes), ten
// copies stacked so the rows span two 16 384-row blocks, with a seeded label-skewed shard column,
// a few pixels blanked (imputation) and a category derived from each image's ink (one-hot).
import { mkdtempSync, readdirSync, readlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { analyzePartition, type PartitionInput } from "@/lib/analysis";
import { runPythonJson } from "./support/run-python";

const folder = mkdtempSync(path.join(tmpdir(), "partita-scratch-design-"));
/** 1 MiB: far below the 9 MB of encoded rows, so both the values read and the design go to disk. */
const TINY_LIMIT = 2 ** 20;

/** The stacked digits as CSV text, made once by /usr/bin/python3. */
let digitsCsv: string | undefined;

function writeDigits(name: string, lastRowEdit?: string): string {
  digitsCsv ??= runPythonJson<string>(
    `import json,sys,io
import numpy as np
import pandas as pd
from sklearn.datasets import load_digits
digits=load_digits(as_frame=True)
frame=pd.concat([digits.frame.rename(columns={"target":"digit"})]*10,ignore_index=True)
rng=np.random.default_rng(13)
home=frame["digit"].to_numpy()%12
frame["shard"]=["s"+str(h if rng.random()<0.6 else rng.integers(12)) for h in home]
frame.loc[::97,"pixel_2_3"]=np.nan
ink=digits.frame.drop(columns="target").sum(axis=1)
cuts=np.quantile(ink,[1/3,2/3])
frame["ink"]=np.tile(np.where(ink<cuts[0],"light",np.where(ink<cuts[1],"medium","dark")),10)
out=io.StringIO(); frame.to_csv(out,index=False)
print(json.dumps(out.getvalue()))`,
  );
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
  it("gives the in-memory summary bit for bit (classification) and leaves no file", async () => {
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
  });

  it("gives the in-memory summary bit for bit (regression)", async () => {
    const file = writeDigits("digits-regression.csv");
    const { inMemory, onDisk, scratchFiles } = await analyzeBoth(file, {
      labelColumn: "digit",
      shardColumn: "shard",
      task: "regression",
      reference: "zero",
    });
    expect(scratchFiles).toHaveLength(2);
    expect(onDisk).toEqual(inMemory);
  });

  it("closes its scratch file when the input turns out bad after the rows went to disk", async () => {
    // The last row's pixel is not a number: found only once every row was read (and 95% of the
    // column's values are numbers, so it is a numeric column with a bad value: an input error).
    const file = writeDigits("digits-bad.csv", `${"0,".repeat(64)}9,s1,light`.replace(/^0,/, "x,"));
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
  });

  it("refuses the simulation, which needs the rows in memory, naming the limit that would do", async () => {
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
  });
});
