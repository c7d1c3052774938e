import { describe, expect, it } from "vitest";
import {
  evaluationRequestSchema,
  evaluationSumsSchema,
  hashDocument,
  schemaDigestSchema,
  sendsLabelLevels,
} from "@/lib/analysis/digests/digest-format";
import { parseDigest } from "@/lib/analysis/digests/parse-digest";
import { AnalysisInputError } from "@/lib/analysis/errors";
import { runPythonJson } from "../support/run-python";
import { inputErrorOf } from "../support/input-error";

/** A well-formed round-1 digest of one client with two shards (methods.md §9's fields). */
function schemaDigest() {
  const column = {
    present: 12,
    sum: 30.5,
    sumSquaredDeviations: 4.25,
    min: 1,
    max: 4,
    levels: null,
  };
  const shard = (id: string) => ({
    id,
    rows: 12,
    label: { sum: null, sumSquaredDeviations: null, min: null, max: null, levels: { a: 5, b: 7 } },
    columns: [column],
  });
  return {
    kind: "partita-schema-digest",
    version: 1,
    client: "south",
    labelColumn: "species",
    features: ["mass"],
    featuresNamed: false,
    labelNumeric: false,
    columnsNumeric: [true],
    totalRows: 24,
    droppedRowsMissingLabel: 0,
    droppedRowsUnassigned: 0,
    shards: [shard("north"), shard("east")],
  };
}

/** The AnalysisInputError `parseDigest` throws for `document`, read as a schema digest. */
function refusal(document: unknown, file?: string): AnalysisInputError {
  return inputErrorOf(
    () => parseDigest(document, schemaDigestSchema, "schema digest", file),
    "the document was accepted",
  );
}

describe("a digest document's hash (SHA-256 of its canonical JSON, quoted by every later digest)", () => {
  it("is CPython's hashlib.sha256 of json.dumps with sorted keys, no spaces and non-ASCII kept", () => {
    // Keys whose code-unit and alphabetical orders differ, nesting in arrays, non-ASCII text, the
    // escapes JSON writes for quotes and control characters, and every kind of JSON value.
    const document = {
      zeta: [1, -2.5, 0.1, { b: true, B: false, a: null }],
      alpha: 'naïve "quoted"\n\ttab',
      Alpha: { é: 3, e: [[], {}] },
      "10": 1234.5678,
      "9": "nine",
    };
    const reference = runPythonJson<string>(
      `import hashlib, json, sys
d = json.load(sys.stdin)
print(json.dumps(hashlib.sha256(json.dumps(d, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode("utf-8")).hexdigest()))`,
      document,
    );
    expect(hashDocument(document)).toBe(reference);
    // A key without a value is not part of the document (the encoding's hash is taken without it).
    expect(hashDocument({ ...document, hash: undefined })).toBe(reference);
  });
});

describe("which labels send their level counts in round 1 (methods.md §1's task rule)", () => {
  it("a non-numeric label or one of at most 20 values can be classes; regression never counts levels", () => {
    // §1: classification when the label is non-numeric or has at most 20 distinct values; an
    // explicit task overrides the rule.
    expect(sendsLabelLevels(false, 500, undefined)).toBe(true);
    expect(sendsLabelLevels(true, 20, undefined)).toBe(true);
    expect(sendsLabelLevels(true, 21, undefined)).toBe(false);
    expect(sendsLabelLevels(true, 500, "classification")).toBe(true);
    expect(sendsLabelLevels(false, 3, "regression")).toBe(false);
    expect(sendsLabelLevels(true, 3, "regression")).toBe(false);
  });
});

describe("reading a digest as it arrived (a file or a request to the server)", () => {
  it("returns a well-formed digest as it was written", () => {
    const document = schemaDigest();
    expect(parseDigest(document, schemaDigestSchema, "schema digest")).toEqual(document);
    const request = { encodingHash: "ab", weights: [0, 1.5], sample: null, hessian: false };
    expect(parseDigest(request, evaluationRequestSchema, "evaluation request")).toEqual(request);
  });

  it("names the client, the shard by its id and the field, and says what to send instead", () => {
    const document = schemaDigest();
    document.shards[1].columns[0] = { ...document.shards[1].columns[0], sum: "30.5" as never };
    const error = refusal(document, "south.json");
    expect(error.problem).toMatch(
      /^client "south", shard "east": the schema digest is malformed at shards\.1\.columns\.0\.sum: ./,
    );
    expect(error.file).toBe("south.json");
    // A value that is not a number where a number belongs is named apart: the usual cause is a
    // number JSON cannot hold as finite (see below).
    expect(error.expected).toBe("finite numbers only");
  });

  it("counts a shard without a readable id from 1, and names no client that is not a string", () => {
    const document = schemaDigest();
    document.shards[0] = { ...document.shards[0], id: 7 as never };
    const error = refusal(document);
    expect(error.problem).toMatch(
      /^client "south", shard #1: the schema digest is malformed at shards\.0\.id: ./,
    );
    expect(error.expected).toBe("a schema digest written by npm run digest");
    expect(error.file).toBeUndefined();
    // A shard that is not an object at all is counted the same way.
    expect(refusal({ ...schemaDigest(), shards: [null] }).problem).toMatch(
      /^client "south", shard #1: the schema digest is malformed at shards\.0: ./,
    );
    // A field numbered like a shard outside the shards, or the shards themselves, names no shard.
    expect(refusal({ ...schemaDigest(), columnsNumeric: ["yes"] }).problem).toMatch(
      /^client "south": the schema digest is malformed at columnsNumeric\.0: ./,
    );
    expect(refusal({ ...schemaDigest(), shards: "none" }).problem).toMatch(
      /^client "south": the schema digest is malformed at shards: ./,
    );
    const unnamed = refusal({ ...schemaDigest(), client: 7 });
    expect(unnamed.problem).toMatch(/^the schema digest is malformed at client: ./);
  });

  it("names the top level when the document is not an object at all, and no shard outside the shards", () => {
    for (const document of [null, undefined, 3, "text", []]) {
      const error = refusal(document);
      expect(error.problem).toMatch(/^the schema digest is malformed at \(top\): ./);
      expect(error.expected).toBe("a schema digest written by npm run digest");
    }
    const wrongKind = { ...schemaDigest(), kind: "partita-gradient-digest" };
    expect(refusal(wrongKind).problem).toMatch(
      /^client "south": the schema digest is malformed at kind: ./,
    );
    const wrongCount = { ...schemaDigest(), totalRows: -1 };
    expect(refusal(wrongCount).problem).toMatch(
      /^client "south": the schema digest is malformed at totalRows: ./,
    );
    // A negative count is a number, but not a count: not the finite-numbers problem.
    expect(refusal(wrongCount).expected).toBe("a schema digest written by npm run digest");
  });

  it("refuses a number JSON cannot hold as finite (1e999 reads as Infinity) as not a finite number", () => {
    const sums = JSON.parse(
      '{"rows": 3, "lossSum": 1e999, "gradientSum": [1], "hessianSum": null}',
    );
    expect(() => parseDigest(sums, evaluationSumsSchema, "evaluation answer")).toThrow(
      expect.objectContaining({
        problem: expect.stringMatching(/^the evaluation answer is malformed at lossSum: ./),
        expected: "finite numbers only",
      }),
    );
  });
});
