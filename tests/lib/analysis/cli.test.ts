import { execFile } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { gzipSync } from "node:zlib";
import { describe, expect, it } from "vitest";
import type { PartitionSummary } from "@/lib/analysis";

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../../..");
const directory = mkdtempSync(path.join(tmpdir(), "partita-cli-"));

function writeInput(name: string, text: string): string {
  const file = path.join(directory, name);
  writeFileSync(file, text);
  return file;
}

/** Runs `scripts/analyze.ts` as the user would (node with the tsx loader) and captures the outcome. */
async function runCli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run(
      process.execPath,
      ["--import", "tsx", "scripts/analyze.ts", ...args],
      {
        cwd: root,
        env: { ...process.env, DEBUG: "" },
      },
    );
    return { code: 0, stdout, stderr };
  } catch (error) {
    const failure = error as { code: number; stdout: string; stderr: string };
    return { code: failure.code, stdout: failure.stdout, stderr: failure.stderr };
  }
}

const GOOD = [
  "id,x1,x2,colour,label",
  "a,1,2,red,yes",
  "b,2,1,blue,no",
  "c,3,5,red,yes",
  "d,4,3,blue,no",
  "",
].join("\n");
const GOOD_MAP = ["row_id,shard", "a,s1", "b,s1", "c,s2", "d,s2", ""].join("\n");

describe("analyze CLI", () => {
  it("writes the §6 summary to --out and a human summary to stderr (exit 0)", async () => {
    const data = writeInput("good.csv", GOOD);
    const map = writeInput("good-map.csv", GOOD_MAP);
    const out = path.join(directory, "summary.json");
    const result = await runCli([
      "--data",
      data,
      "--label",
      "label",
      "--partition",
      map,
      "--id-column",
      "id",
      "--out",
      out,
    ]);
    expect(result.code).toBe(0);
    expect(result.stderr).toMatch(/fitting/);
    expect(result.stderr).toMatch(/local\/minibatch bound ratio/);
    const summary = JSON.parse(readFileSync(out, "utf8")) as PartitionSummary;
    expect(Object.keys(summary)).toEqual(
      expect.arrayContaining([
        "dataset",
        "shards",
        "labelSkew",
        "quantitySkew",
        "model",
        "heterogeneity",
        "advice",
      ]),
    );
    // x1, x2 and colour one-hot (blue, red): d = 4.
    expect(summary.dataset).toMatchObject({
      rows: 4,
      features: 4,
      classes: 2,
      task: "classification",
    });
    expect(summary.shards.map((shard) => shard.id)).toEqual(["s1", "s2"]);
    expect(summary.advice).toMatchObject({
      participants: 2,
      localSteps: 10,
      rounds: 100,
      batchSize: 32,
    });
    expect(summary.model.lambda).toBe(1e-3);
  });

  it("prints the JSON to stdout without --out and accepts a given reference weights file", async () => {
    const data = writeInput("good2.csv", GOOD);
    const map = writeInput("good2-map.csv", GOOD_MAP);
    const first = await runCli([
      "--data",
      data,
      "--label",
      "label",
      "--partition",
      map,
      "--id-column",
      "id",
    ]);
    expect(first.code).toBe(0);
    const optimum = (JSON.parse(first.stdout) as PartitionSummary).model.optimum;
    const weights = writeInput("weights.json", JSON.stringify(optimum));
    const second = await runCli([
      "--data",
      data,
      "--label",
      "label",
      "--partition",
      map,
      "--id-column",
      "id",
      "--reference",
      weights,
      "--local-steps",
      "4",
      "--rounds",
      "50",
      "--batch-size",
      "8",
      "--participants",
      "1",
      "--lambda",
      "0.01",
    ]);
    expect(second.code).toBe(0);
    const summary = JSON.parse(second.stdout) as PartitionSummary;
    expect(summary.model.reference).toBe("given");
    expect(summary.advice).toMatchObject({
      participants: 1,
      localSteps: 4,
      rounds: 50,
      batchSize: 8,
    });
    expect(summary.model.lambda).toBe(0.01);
  });

  const badInputs: Array<{
    name: string;
    files: Record<string, string | Buffer>;
    args: string[];
    message: RegExp;
  }> = [
    {
      name: "unassigned rows",
      files: { "data.csv": GOOD, "map.csv": "row_id,shard\na,s1\nb,s2\n" },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /map\.csv.*2 data rows with a label have no shard \(rows 2, 3\)/,
    },
    {
      name: "unknown ids in the partition map",
      files: { "data.csv": GOOD, "map.csv": `${GOOD_MAP}zz,s2\n` },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /map\.csv.*1 row ids in the partition map match no data row \("zz"\)/,
    },
    {
      name: "duplicate ids in the partition map",
      files: { "data.csv": GOOD, "map.csv": `${GOOD_MAP}a,s2\n` },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /map\.csv.*column "row_id".*listed more than once: "a"/,
    },
    {
      name: "a missing label column",
      files: { "data.csv": GOOD.replace("label", "outcome"), "map.csv": GOOD_MAP },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /data\.csv.*column "label".*no label column/,
    },
    {
      name: "a ragged row",
      files: { "data.csv": GOOD.replace("c,3,5,red,yes", "c,3,red,yes"), "map.csv": GOOD_MAP },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /data\.csv, data row 2 .*line 4.*4 fields.*expected 5 fields/,
    },
    {
      name: "an empty file",
      files: { "data.csv": "", "map.csv": GOOD_MAP },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /data\.csv: the file is empty \(expected a header row\)/,
    },
    {
      name: "one class",
      files: { "data.csv": GOOD.replace(/,no$/gm, ",yes"), "map.csv": GOOD_MAP },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /column "label".*single class.*at least two classes/,
    },
    {
      name: "one shard",
      files: { "data.csv": GOOD, "map.csv": GOOD_MAP.replace(/s2/g, "s1") },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /1 shard.*expected at least two shards/,
    },
    {
      name: "a non-numeric column named in --features",
      files: {
        "data.csv": [
          "id,x1,name,label",
          ...Array.from({ length: 40 }, (_, i) => `r${i},${i % 7},n${i},${i % 2 ? "yes" : "no"}`),
          "",
        ].join("\n"),
      },
      args: ["--shard-column", "x1", "--id-column", "id", "--features", "name"],
      message:
        /column "name".*not numeric \("n0"\).*expected numbers, or at most 32 distinct categories/,
    },
    {
      name: "a value too large for a double",
      files: { "data.csv": GOOD.replace("b,2,1", "b,1e999,1"), "map.csv": GOOD_MAP },
      args: ["--partition", "map.csv", "--id-column", "id"],
      message: /data row 1 .*column "x1".*"1e999" is too large.*expected a finite number/,
    },
    {
      name: "a missing data file",
      files: {},
      args: ["--shard-column", "colour"],
      message: /cannot read.*data\.csv/,
    },
    {
      name: "a bad number option",
      files: { "data.csv": GOOD },
      args: ["--shard-column", "colour", "--rounds", "many"],
      message: /--rounds is "many".*expected a number/,
    },
    {
      name: "a batch size of zero",
      files: { "data.csv": GOOD },
      args: ["--shard-column", "colour", "--batch-size", "0"],
      message: /bad input: --batch-size is 0 \(expected a number > 0\)\n$/,
    },
    {
      name: "more participants than shards",
      files: { "data.csv": GOOD },
      args: ["--shard-column", "colour", "--participants", "99"],
      message: /bad input: --participants is 99 .*expected at most the number of shards \(2\)/,
    },
    {
      name: "a negative number of rounds",
      files: { "data.csv": GOOD },
      args: ["--shard-column", "colour", "--rounds", "-5"],
      message: /bad input: --rounds is -5 \(expected a number > 0\)/,
    },
    {
      name: "an unknown delimiter",
      files: { "data.csv": GOOD },
      args: ["--shard-column", "colour", "--delimiter", "|"],
      message: /--delimiter is "\|" \(expected one of ",", ";", tab\)/,
    },
    {
      name: "a spreadsheet",
      files: { "data.csv": Buffer.concat([Buffer.from("PK\u0003\u0004"), gzipSync(GOOD)]) },
      args: ["--shard-column", "colour"],
      message: /data\.csv: not a text CSV: a ZIP archive \(an \.xlsx or \.ods spreadsheet is one\)/,
    },
    {
      name: "a header with terminal control sequences",
      files: { "data.csv": GOOD.replace("label", "\u001b]0;owned\u0007label") },
      args: ["--shard-column", "colour"],
      message: /"\\x1b\]0;owned\\x07label"/,
    },
  ];

  it.concurrent.each(badInputs)(
    "exits 2 and names the cause for $name",
    async ({ name, files, args, message }) => {
      const folder = mkdtempSync(path.join(directory, "case-"));
      for (const [file, text] of Object.entries(files))
        writeFileSync(path.join(folder, file), text);
      const resolved = args.map((arg) => (arg.endsWith(".csv") ? path.join(folder, arg) : arg));
      const result = await runCli([
        "--data",
        path.join(folder, "data.csv"),
        "--label",
        "label",
        ...resolved,
      ]);
      expect(result.code, name).toBe(2);
      expect(result.stderr).toMatch(message);
      expect(result.stderr).not.toMatch(/\n\s+at /); // no stack trace
      // No raw control character from the files reaches the terminal (line feeds end lines).
      expect(result.stderr).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f]/);
      expect(result.stdout).toBe("");
    },
  );
});
