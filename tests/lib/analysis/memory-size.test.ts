// Memory sizes as people write them (memory-size.ts): K, M, G and T are powers of 1024, as memory is
// counted (IEC 80000-13's binary prefixes KiB, MiB, GiB, TiB; the bare letters used for them is
// common practice, as in `free -h` and the JVM's -Xmx).
import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis";
import { parseMemorySize } from "@/lib/analysis/memory-size";

describe("parseMemorySize", () => {
  it("reads bytes and the binary prefixes in any case, with B or iB after them", () => {
    const cases: [string, number][] = [
      ["100", 100],
      ["1", 1],
      ["4k", 4 * 1024],
      ["4K", 4 * 1024],
      ["4KiB", 4 * 1024],
      ["512M", 512 * 1024 ** 2],
      ["512MiB", 512 * 1024 ** 2],
      ["512mb", 512 * 1024 ** 2],
      ["2G", 2 * 1024 ** 3],
      ["1.5GB", 1_610_612_736],
      ["1t", 1024 ** 4],
      ["100B", 100],
      [" 2 G ", 2 * 1024 ** 3],
      ["\t3\tm\n", 3 * 1024 ** 2],
      // A fraction of a byte is dropped: 1.5 bytes are 1.
      ["1.5", 1],
      ["0.75k", 768],
    ];
    for (const [text, bytes] of cases) {
      expect({ text, bytes: parseMemorySize(text, "--memory-limit") }).toEqual({ text, bytes });
    }
  });

  it("refuses what is not a positive size, naming the option and what it takes", () => {
    for (const text of [
      "",
      "0",
      "0.4",
      "-1G",
      "abc",
      "G",
      "2X",
      "1e3",
      "1.5.G",
      "x2G",
      "2Gx",
      "2 GiBs",
      ".5G",
      "2.G",
      "2GG",
    ]) {
      let error: unknown;
      try {
        parseMemorySize(text, "PARTITA_MEMORY");
      } catch (caught) {
        error = caught;
      }
      expect(error, text).toBeInstanceOf(AnalysisInputError);
      const inputError = error as AnalysisInputError;
      expect(inputError.option).toBe("PARTITA_MEMORY");
      expect(inputError.problem).toBe(`is ${JSON.stringify(text)}`);
      expect(inputError.expected).toBe(
        "a positive size such as 2G, 1.5GB, 512M or a number of bytes",
      );
    }
  });
});
