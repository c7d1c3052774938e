/**
 * Compares strings by Unicode code point, the order methods.md §1 fixes for shards, classes and
 * one-hot levels. JavaScript's default string comparison uses UTF-16 code units, which puts
 * characters above U+FFFF (surrogate pairs) before U+E000–U+FFFF; code-point order does not.
 *
 * Example: ["b", "a", "B"] sorts to ["B", "a", "b"]; "\u{1F600}" sorts after "\uFFFD".
 */
export function compareCodePoints(a: string, b: string): number {
  const length = Math.min(a.length, b.length);
  for (let index = 0; index < length; index++) {
    const left = a.codePointAt(index) as number;
    const right = b.codePointAt(index) as number;
    if (left !== right) return left - right;
    if (left > 0xffff) index++;
  }
  return a.length - b.length;
}

/** Returns the strings sorted by code point (a new array). */
export function sortByCodePoint(values: Iterable<string>): string[] {
  return [...values].sort(compareCodePoints);
}
