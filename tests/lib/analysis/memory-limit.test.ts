// How an analysis shares its memory limit (memory-limit.ts). Checked against the rules the module
// states and identities of them: the smallest limit for rows of b bytes is the one whose row budget
// first holds b bytes; blocks of a scratch file are whole Gram tasks of 16 384 rows
// (GRAM_CHUNK_ROWS) and take 1/32 of the limit within 1 MiB and 64 MiB; sizes are binary
// (IEC 80000-13: 1 GiB = 2³⁰ bytes).
import { tmpdir } from "node:os";
import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis";
import {
  chooseBlockRows,
  DEFAULT_MEMORY_LIMIT_BYTES,
  measureLimitForRows,
  measureRowBudget,
  readMemorySettings,
  resolveMemorySettings,
} from "@/lib/analysis/memory-limit";

const MIB = 2 ** 20;
const GIB = 2 ** 30;
const TASK_ROWS = 16_384;

function settings(limitBytes: number) {
  return { limitBytes, scratchDirectory: "/unused" };
}

describe("memory settings", () => {
  it("default to 2 GiB and the system's temporary folder (Node's os.tmpdir())", () => {
    expect(DEFAULT_MEMORY_LIMIT_BYTES).toBe(2 * GIB);
    const resolved = resolveMemorySettings();
    expect(resolved).toEqual({
      limitBytes: 2 * GIB,
      scratchDirectory: tmpdir(),
      onScratchFile: undefined,
    });
    const onScratchFile = () => {};
    expect(resolveMemorySettings({ limitBytes: 5, scratchDirectory: "/s", onScratchFile })).toEqual(
      {
        limitBytes: 5,
        scratchDirectory: "/s",
        onScratchFile,
      },
    );
  });

  it("come from PARTITA_MEMORY_LIMIT and PARTITA_SCRATCH_DIR, a flag winning", () => {
    expect(readMemorySettings({})).toMatchObject({
      limitBytes: 2 * GIB,
      scratchDirectory: tmpdir(),
    });
    expect(readMemorySettings({ PARTITA_MEMORY_LIMIT: "", PARTITA_SCRATCH_DIR: "" })).toMatchObject(
      {
        limitBytes: 2 * GIB,
        scratchDirectory: tmpdir(),
      },
    );
    expect(
      readMemorySettings({ PARTITA_MEMORY_LIMIT: "1G", PARTITA_SCRATCH_DIR: "/env" }),
    ).toMatchObject({
      limitBytes: GIB,
      scratchDirectory: "/env",
    });
    expect(
      readMemorySettings(
        { PARTITA_MEMORY_LIMIT: "1G", PARTITA_SCRATCH_DIR: "/env" },
        { memoryLimit: "512M", scratchDirectory: "/flag" },
      ),
    ).toMatchObject({ limitBytes: 512 * MIB, scratchDirectory: "/flag" });
  });

  it("name where a bad size came from", () => {
    const optionOf = (run: () => unknown) => {
      try {
        run();
      } catch (error) {
        if (error instanceof AnalysisInputError) return error.option;
      }
      return "accepted";
    };
    expect(optionOf(() => readMemorySettings({ PARTITA_MEMORY_LIMIT: "lots" }))).toBe(
      "PARTITA_MEMORY_LIMIT",
    );
    expect(
      optionOf(() => readMemorySettings({ PARTITA_MEMORY_LIMIT: "1G" }, { memoryLimit: "0" })),
    ).toBe("--memory-limit");
  });
});

describe("the rows' share of the limit", () => {
  it("gives, for rows of b bytes, the smallest limit whose row budget holds them", () => {
    for (const bytes of [1, 2, 3, 7, 400, 401, 1000, 123_457, 858_993_459, 858_993_460, 10 ** 12]) {
      const limit = measureLimitForRows(bytes);
      expect({ bytes, fits: measureRowBudget(settings(limit)) >= bytes }).toEqual({
        bytes,
        fits: true,
      });
      expect({ bytes, below: measureRowBudget(settings(limit - 1)) < bytes }).toEqual({
        bytes,
        below: true,
      });
    }
  });

  it("is 40% of the limit, in whole bytes", () => {
    expect(measureRowBudget(settings(1000))).toBe(400);
    expect(measureRowBudget(settings(2 * GIB))).toBe(858_993_459);
  });
});

describe("scratch-file blocks", () => {
  it("hold whole Gram tasks of 1/32 of the limit, within 1 MiB and 64 MiB", () => {
    const cases: [number, number, number][] = [
      // limit, width, rows: 64 MiB / (8 · 8) = 2²⁰ rows = 64 tasks.
      [2 * GIB, 8, 2 ** 20],
      // 1/32 of 64 MiB is 2 MiB: 2 MiB / 64 = 32 768 rows.
      [64 * MIB, 8, 32_768],
      // 1/32 of 4 GiB is 128 MiB, cut to 64 MiB.
      [4 * GIB, 8, 2 ** 20],
      // 1/32 of 1 KiB is raised to 1 MiB: 16 384 rows of 8 numbers.
      [1024, 8, TASK_ROWS],
      // 1 MiB / (8 · 3) = 43 690 rows, cut down to 2 whole tasks.
      [1024, 3, 2 * TASK_ROWS],
      // Wide rows: 1 MiB holds 131 rows of 1000 numbers, less than a task; one task all the same.
      [1024, 1000, TASK_ROWS],
    ];
    for (const [limit, width, rows] of cases) {
      expect({ limit, width, rows: chooseBlockRows(settings(limit), width) }).toEqual({
        limit,
        width,
        rows,
      });
    }
  });
});
