import { execFile } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { beforeAll, describe, expect, it } from "vitest";
import type { PartitionSummary } from "@/lib/analysis";
import { loadWineDirichletCsv } from "../support/open-data";
import { compareSummaries } from "./support";

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../../../..");
const directory = mkdtempSync(path.join(tmpdir(), "partita-digest-cli-"));
const file = (name: string) => path.join(directory, name);

/** Runs a script as the user would (node with the tsx loader) and captures the outcome. */
async function runScript(
  script: string,
  args: string[],
): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run(process.execPath, ["--import", "tsx", script, ...args], {
      cwd: root,
      env: { ...process.env, DEBUG: "" },
      maxBuffer: 64 * 1024 * 1024,
    });
    return { code: 0, stdout, stderr };
  } catch (error) {
    const failure = error as { code: number; stdout: string; stderr: string };
    return { code: failure.code, stdout: failure.stdout, stderr: failure.stderr };
  }
}
const digest = (args: string[]) => runScript("scripts/digest.ts", args);
const analyze = (args: string[]) => runScript("scripts/analyze.ts", args);

/**
 * scikit-learn's wine data (load_wine, 178 rows, 13 features, 3 cultivars) split into 5 shards, and
 * three clients that name their shards in the three ways the command offers: a shard column, a
 * partition map by row index, one shard for the whole file.
 */
let pooledCsv = "";
beforeAll(() => {
  pooledCsv = loadWineDirichletCsv(5, 1000, 5);
  const [header, ...lines] = pooledCsv.trim().split("\n");
  const shardOf = (line: string) => line.slice(line.lastIndexOf(",") + 1);
  const withoutShard = (line: string) => line.slice(0, line.lastIndexOf(","));
  const rowsOf = (shards: string[]) => lines.filter((line) => shards.includes(shardOf(line)));
  writeFileSync(file("pooled.csv"), pooledCsv);
  writeFileSync(file("a.csv"), [header, ...rowsOf(["s0", "s1"])].join("\n") + "\n");
  const bRows = rowsOf(["s2", "s3"]);
  writeFileSync(
    file("b.csv"),
    [withoutShard(header), ...bRows.map(withoutShard)].join("\n") + "\n",
  );
  writeFileSync(
    file("b-map.csv"),
    ["row_id,shard", ...bRows.map((line, index) => `${index},${shardOf(line)}`)].join("\n") + "\n",
  );
  writeFileSync(
    file("c.csv"),
    [withoutShard(header), ...rowsOf(["s4"]).map(withoutShard)].join("\n") + "\n",
  );
}, 60_000);

const label = ["--label", "cultivar"];
const clients = [
  { name: "a", data: ["--data", file("a.csv"), ...label, "--shard-column", "shard"] },
  {
    name: "b",
    data: ["--data", file("b.csv"), ...label, "--partition", file("b-map.csv")],
  },
  { name: "c", data: ["--data", file("c.csv"), ...label, "--shard", "s4"] },
];

describe("npm run digest: the rounds as files (methods.md §9)", () => {
  it("three clients' files merge into the summary analyze prints for the pooled rows", async () => {
    // The supplied W is the pooled optimum at the same λ, so analyze's path t·W* is the merge's t·W.
    const plan = [
      "--local-steps",
      "20",
      "--rounds",
      "50",
      "--batch-size",
      "16",
      "--lambda",
      "0.01",
    ];
    const central = await analyze([
      "--data",
      file("pooled.csv"),
      ...label,
      "--shard-column",
      "shard",
      "--lambda",
      "0.01",
      "--out",
      file("optimum.json"),
    ]);
    expect(central.code, central.stderr).toBe(0);
    const optimum = JSON.parse(readFileSync(file("optimum.json"), "utf8")) as PartitionSummary;
    writeFileSync(file("w.json"), JSON.stringify(optimum.model.optimum));
    const reference = await analyze([
      "--data",
      file("pooled.csv"),
      ...label,
      "--shard-column",
      "shard",
      "--reference",
      file("w.json"),
      ...plan,
      "--out",
      file("central.json"),
    ]);
    expect(reference.code, reference.stderr).toBe(0);

    for (const client of clients) {
      const schema = await digest([
        "schema",
        ...client.data,
        "--client",
        client.name,
        "--out",
        file(`${client.name}-schema.json`),
      ]);
      expect(schema.code, schema.stderr).toBe(0);
    }
    const encoding = await digest([
      "encoding",
      ...clients.map((client) => file(`${client.name}-schema.json`)),
      "--out",
      file("encoding.json"),
    ]);
    expect(encoding.code, encoding.stderr).toBe(0);
    for (const client of clients) {
      const gradients = await digest([
        "gradients",
        ...client.data,
        "--client",
        client.name,
        "--encoding",
        file("encoding.json"),
        "--at",
        file("w.json"),
        "--out",
        file(`${client.name}-grad.json`),
      ]);
      expect(gradients.code, gradients.stderr).toBe(0);
    }
    const merged = await digest([
      "merge",
      "--encoding",
      file("encoding.json"),
      ...clients.map((client) => file(`${client.name}-grad.json`)),
      ...plan,
      "--out",
      file("merged.json"),
    ]);
    expect(merged.code, merged.stderr).toBe(0);

    // No row in any file a client wrote: no feature value of the data appears in its digests.
    const firstRowValue = pooledCsv.split("\n")[1].split(",")[4];
    for (const client of clients) {
      expect(readFileSync(file(`${client.name}-grad.json`), "utf8")).not.toContain(
        `${firstRowValue},`,
      );
    }
    const expected = JSON.parse(readFileSync(file("central.json"), "utf8")) as PartitionSummary;
    const actual = JSON.parse(readFileSync(file("merged.json"), "utf8")) as PartitionSummary;
    // At W = W*, ‖∇F‖ is a residual below the fit's tolerance, the sum of terms that cancel: only
    // its size is compared (the rest of the summary is compared to 1e-9 relative).
    const differences = compareSummaries(expected, actual, false);
    expect(differences.filter((line) => !line.startsWith(".model.gradNorm:"))).toEqual([]);
    expect(actual.model.gradNorm).toBeLessThanOrEqual(expected.model.optimizer.tolerance);
    expect(actual.digests?.clients.map((client) => client.client)).toEqual(["a", "b", "c"]);
  }, 180_000);

  it("refuses a shard under the minimum rows, naming client and shard (exit 2)", async () => {
    const result = await digest([
      "schema",
      ...clients[2].data,
      "--client",
      "c",
      "--min-rows",
      "100",
      "--out",
      file("refused.json"),
    ]);
    expect(result.code).toBe(2);
    expect(result.stderr).toContain('client "c", shard "s4" has');
    expect(result.stderr).toContain("under the minimum of 100");
  }, 60_000);

  it("refuses a shard sent twice, naming both clients (exit 2)", async () => {
    await digest(["schema", ...clients[0].data, "--client", "a", "--out", file("twice-a.json")]);
    await digest(["schema", ...clients[0].data, "--client", "a2", "--out", file("twice-b.json")]);
    const result = await digest([
      "encoding",
      file("twice-a.json"),
      file("twice-b.json"),
      "--out",
      file("twice.json"),
    ]);
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(
      /shard "s[01]" was sent twice \(by client "a" and by client "a2"\)/,
    );
  }, 60_000);

  it("refuses digests made with another encoding, and non-finite numbers, naming the client (exit 2)", async () => {
    for (const client of clients) {
      await digest([
        "schema",
        ...client.data,
        "--client",
        client.name,
        "--out",
        file(`${client.name}-s.json`),
      ]);
    }
    await digest([
      "encoding",
      file("a-s.json"),
      file("b-s.json"),
      file("c-s.json"),
      "--out",
      file("enc-1.json"),
    ]);
    await digest([
      "encoding",
      file("a-s.json"),
      file("b-s.json"),
      file("c-s.json"),
      "--task",
      "classification",
      "--min-rows",
      "5",
      "--out",
      file("enc-2.json"),
    ]);
    const grads = [];
    for (const [index, client] of clients.entries()) {
      const encoding = index === 1 ? "enc-2.json" : "enc-1.json";
      await digest([
        "gradients",
        ...client.data,
        "--client",
        client.name,
        "--encoding",
        file(encoding),
        "--at",
        "zero",
        "--out",
        file(`${client.name}-g.json`),
      ]);
      grads.push(file(`${client.name}-g.json`));
    }
    const wrongHash = await digest([
      "merge",
      "--encoding",
      file("enc-1.json"),
      ...grads,
      "--out",
      file("m.json"),
    ]);
    expect(wrongHash.code).toBe(2);
    expect(wrongHash.stderr).toContain('client "b" sent digests for encoding');

    // JSON has no Infinity; a number too large for a double reads as one.
    const broken = JSON.parse(readFileSync(grads[0], "utf8")) as {
      shards: { atReference: { lossSum: number } }[];
    };
    broken.shards[1].atReference.lossSum = 123.456789;
    writeFileSync(
      file("broken.json"),
      JSON.stringify(broken).replace('"lossSum":123.456789', '"lossSum":1e999'),
    );
    const nonFinite = await digest([
      "merge",
      "--encoding",
      file("enc-1.json"),
      file("broken.json"),
      "--out",
      file("m.json"),
    ]);
    expect(nonFinite.code).toBe(2);
    expect(nonFinite.stderr).toContain('client "a", shard "s1"');
    expect(nonFinite.stderr).toContain("shards.1.atReference.lossSum");
    expect(nonFinite.stderr).toContain("finite numbers only");
  }, 120_000);
});
