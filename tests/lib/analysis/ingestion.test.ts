import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis";
import { compareCodePoints } from "@/lib/analysis/code-point-order";
import { binIntoDeciles } from "@/lib/analysis/encode-design";
import { RowStore } from "@/lib/analysis/row-store";
import { parseSimpleDecimal } from "@/lib/analysis/tokens";
import { analyzeText } from "./support/analyze-text";
import { designFromText } from "./support/design-from-text";
import { runPythonJson } from "./support/run-python";

describe("ingestion rules of methods.md §1", () => {
  it("treats NA, N/A, NaN, null, None and empty (any case, padded) as missing and imputes the pooled mean", async () => {
    const csv = [
      "\uFEFFx,label,shard",
      "1,a,s1",
      " NaN ,b,s1",
      "3,a,s2",
      "none,b,s2",
      "n/a,a,s1",
      "5,b,s2",
      "NULL,a,s2",
      ",b,s1",
    ].join("\r\n");
    const design = await designFromText(csv, "label", "shard");
    // Mean of present values (1, 3, 5) = 3 fills 5 missing; standardized column (hand-computed):
    // values 1,3,3,3,5,3,3,3 → mean 3, population std √(8/8) = 1.
    const column = Array.from({ length: design.x.rows }, (_, i) => design.x.data[i * 2]);
    const expected = [-2, 0, 0, 0, 0, 0, 0, 2];
    column.sort((a, b) => a - b).forEach((value, i) => expect(value).toBeCloseTo(expected[i], 14));
    expect(design.featureNames).toEqual(["x"]);
  });

  it("drops rows with a missing label and counts them; the partition may skip them", async () => {
    const summary = await analyzeText(
      "id,x,label\nr0,1,a\nr1,2,\nr2,3,b\nr3,4,NA\nr4,5,a\nr5,6,b\n",
      { labelColumn: "label", idColumn: "id" },
      "row_id,shard\nr0,s1\nr2,s1\nr4,s2\nr5,s2\nr1,s2\n",
    );
    expect(summary.dataset.rows).toBe(4);
    expect(summary.preprocessing.droppedRowsMissingLabel).toBe(2);
  });

  it("matches partition rows by 0-based index without an id column, and can drop unassigned rows", async () => {
    const data = "x,label\n1,a\n2,b\n3,a\n4,b\n5,a\n";
    const map = "row_id,shard\n0,s1\n1,s1\n002,s2\n3,s2\n";
    await expect(analyzeText(data, { labelColumn: "label" }, map)).rejects.toThrow(/rows 4\)/);
    const summary = await analyzeText(
      data,
      { labelColumn: "label", dropUnassignedRows: true },
      map,
    );
    expect(summary.dataset.rows).toBe(4);
    expect(summary.preprocessing.droppedRowsUnassigned).toBe(1);
  });

  it("rejects a repeated id in the dataset", async () => {
    await expect(
      analyzeText(
        "id,x,label\nq,1,a\nq,2,b\n",
        { labelColumn: "label", idColumn: "id" },
        "row_id,shard\nq,s1\n",
      ),
    ).rejects.toThrow(/"q" appears on more than one data row/);
  });

  it("orders shards, classes and one-hot levels by code point, and leaves out >32-level text columns", async () => {
    const rows = Array.from({ length: 40 }, (_, i) =>
      [
        i,
        i % 2 ? "Zed" : "apple",
        `name${i}`,
        ["b", "B", "\u{1F600}", "\uFFFD"][i % 4],
        `sh${i % 3 ? "é" : "Z"}`,
      ].join(","),
    );
    const summary = await analyzeText(`x,kind,name,label,shard\n${rows.join("\n")}\n`, {
      labelColumn: "label",
      shardColumn: "shard",
    });
    expect(summary.dataset.classNames).toEqual(["B", "b", "\uFFFD", "\u{1F600}"]);
    expect(summary.shards.map((shard) => shard.id)).toEqual(["shZ", "shé"]);
    expect(summary.preprocessing.featureNames).toEqual(["x", "kind=Zed", "kind=apple"]);
    expect(summary.preprocessing.omittedColumns).toEqual([
      { column: "name", reason: "too-many-levels" },
    ]);
    expect(summary.preprocessing.warnings[0]).toMatch(/"name".*left out/);
    expect(["\u{1F600}", "\uFFFD"].sort(compareCodePoints)).toEqual(["\uFFFD", "\u{1F600}"]);
  });

  it("reads quoted fields with commas, quotes and line breaks", async () => {
    const csv =
      'x,"label, quoted",shard\n1,"a ""b""",s1\n2,"c\nd",s1\n3,"a ""b""",s2\n4,"c\nd",s2\n';
    const summary = await analyzeText(csv, { labelColumn: "label, quoted", shardColumn: "shard" });
    expect(summary.dataset.classNames).toEqual(['a "b"', "c\nd"]);
  });

  it("drops constant columns and reports them", async () => {
    const summary = await analyzeText("x,k,label,shard\n1,7,a,s1\n2,7,b,s1\n3,7,a,s2\n4,7,b,s2\n", {
      labelColumn: "label",
      shardColumn: "shard",
    });
    expect(summary.preprocessing.omittedColumns).toEqual([{ column: "k", reason: "constant" }]);
  });

  it("classifies numeric labels with ≤ 20 values and regresses on more, unless overridden", async () => {
    const few = Array.from({ length: 60 }, (_, i) => `${i},${i % 20},s${i % 2}`).join("\n");
    const many = Array.from({ length: 60 }, (_, i) => `${i},${i % 21},s${i % 2}`).join("\n");
    const options = { labelColumn: "y", shardColumn: "shard" };
    expect((await analyzeText(`x,y,shard\n${few}\n`, options)).dataset.task).toBe("classification");
    expect((await analyzeText(`x,y,shard\n${many}\n`, options)).dataset.task).toBe("regression");
    const forced = await analyzeText(`x,y,shard\n${many}\n`, {
      ...options,
      task: "classification",
    });
    expect(forced.dataset.classes).toBe(21);
    await expect(
      analyzeText("x,y,shard\n1,a,s1\n2,b,s2\n", { ...options, task: "regression" }),
    ).rejects.toThrow(/regression needs a numeric label/);
  });

  it("handles huge finite values without overflow", async () => {
    const csv = "x,label,shard\n1e300,a,s1\n-1e300,b,s1\n1.7e308,a,s2\n-1.7e308,b,s2\n";
    const summary = await analyzeText(csv, { labelColumn: "label", shardColumn: "shard" });
    expect(Number.isFinite(summary.model.loss)).toBe(true);
    expect(summary.dataset.features).toBe(1);
  });

  it("rejects options it cannot honour with an AnalysisInputError", async () => {
    const csv = "x,label,shard\n1,a,s1\n2,b,s2\n";
    await expect(
      analyzeText(csv, { labelColumn: "label", shardColumn: "shard", participants: 3 }),
    ).rejects.toThrow(/3 participants.*at most the number of shards \(2\)/);
    await expect(
      analyzeText(csv, { labelColumn: "label", shardColumn: "shard", lambda: -1 }),
    ).rejects.toBeInstanceOf(AnalysisInputError);
    await expect(analyzeText(csv, { labelColumn: "label" })).rejects.toThrow(
      /no partition was given/,
    );
    await expect(
      analyzeText("x,x,label\n1,2,a\n", { labelColumn: "label", shardColumn: "x" }),
    ).rejects.toThrow(/names this column twice/);
  });
});

describe("regression deciles (methods.md §4)", () => {
  it("bins like numpy.quantile cut points with #{k : y > q_k}, dropping empty bins", () => {
    const values = Float64Array.from([5, 1, 1, 1, 1, 1, 2, 3, 4, 9, 7, 7, 8, 0.5, 6, 6]);
    // Outside reference: NumPy quantiles and searchsorted(side='left') = #{k : y > q_k}.
    const reference = runPythonJson<number[]>(
      `import json,sys
import numpy as np
y=np.array(json.load(sys.stdin)); q=np.quantile(y,np.arange(1,10)/10)
b=np.searchsorted(q,y,side="left"); u=np.unique(b)
print(json.dumps([int(np.where(u==v)[0][0]) for v in b]))`,
      Array.from(values),
    );
    const { categories, count } = binIntoDeciles(values);
    expect(Array.from(categories)).toEqual(reference);
    expect(count).toBe(new Set(reference).size);
  });
});

describe("parseSimpleDecimal", () => {
  it("gives exactly Number(token) on plain decimals (ECMAScript's correctly rounded conversion)", () => {
    let state = 12345;
    const random = () => {
      state = (state * 1103515245 + 12345) % 2147483648;
      return state / 2147483648;
    };
    const tokens = ["0", "-0", "+7", "007", "5.", ".5", "-.25", "123456789012345", "0.1", "-2.675"];
    for (let k = 0; k < 20_000; k++) {
      const digits = 1 + Math.floor(random() * 15);
      let token = random() < 0.3 ? "-" : "";
      const point = Math.floor(random() * (digits + 1));
      for (let d = 0; d < digits; d++) {
        if (d === point) token += ".";
        token += String(Math.floor(random() * 10));
      }
      tokens.push(token);
    }
    for (const token of tokens)
      expect(Object.is(parseSimpleDecimal(token), Number(token))).toBe(true);
  });

  it("declines everything else, which the general rules then handle", () => {
    const declined = [
      "",
      "-",
      ".",
      "+.",
      "1e5",
      " 7",
      "7 ",
      "0x1F",
      "1,5",
      "1.2.3",
      "NaN",
      "Infinity",
    ];
    declined.push("1234567890123456"); // 16 digits: beyond the exact-integer fast path
    for (const token of declined) expect(parseSimpleDecimal(token)).toBeNaN();
  });
});

describe("RowStore", () => {
  it("keeps every row as it grows, in place and past its growable maximum", () => {
    const width = 3;
    // Room for 2¹⁷ rows in the growable buffer, so the store has to move to plain buffers later.
    const store = new RowStore(width, { maxGrowableBytes: width * 8 * 2 ** 17 });
    const rows = 300_001;
    for (let row = 0; row < rows; row++) {
      const offset = store.appendRow();
      for (let k = 0; k < width; k++) store.values[offset + k] = row * width + k;
    }
    const values = store.finish() as Float64Array;
    expect(values.length).toBe(rows * width);
    expect(values.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(values.every((value, index) => value === index)).toBe(true);
  });
});
