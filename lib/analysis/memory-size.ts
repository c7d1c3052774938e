import { AnalysisInputError } from "./errors";

const UNITS: Record<string, number> = { "": 1, k: 2 ** 10, m: 2 ** 20, g: 2 ** 30, t: 2 ** 40 };

/**
 * A memory size as people write it: bytes, or a number with K, M, G or T (powers of 1024, as
 * memory is counted; "B" and "iB" may follow), e.g. `2G`, `1.5GB`, `512MiB`. `source` names the
 * flag or variable in messages.
 *
 * Example: parseMemorySize("1.5G", "--memory-limit") is 1 610 612 736.
 */
export function parseMemorySize(text: string, source: string): number {
  const match = /^\s*(\d+(?:\.\d+)?)\s*([kmgt]?)(?:i?b)?\s*$/i.exec(text);
  const bytes = match ? Math.floor(Number(match[1]) * UNITS[match[2].toLowerCase()]) : Number.NaN;
  if (!(bytes > 0)) {
    throw new AnalysisInputError(`is ${JSON.stringify(text)}`, {
      option: source,
      expected: "a positive size such as 2G, 1.5GB, 512M or a number of bytes",
    });
  }
  return bytes;
}
