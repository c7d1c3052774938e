/**
 * Token rules of methods.md §1: missing-value tokens and what counts as a number.
 */

const MISSING_TOKENS = new Set(["", "na", "n/a", "nan", "null", "none"]);

/** Trims a field only when it has leading or trailing white space, to avoid copying every token. */
export function trimToken(token: string): string {
  if (token.length === 0) return token;
  const first = token.charCodeAt(0);
  const last = token.charCodeAt(token.length - 1);
  return first <= 32 || last <= 32 || first === 0xfeff ? token.trim() : token;
}

/** True for the missing-value tokens of methods.md §1 (case-insensitive, already trimmed). */
export function isMissingToken(trimmed: string): boolean {
  return trimmed.length <= 4 && MISSING_TOKENS.has(trimmed.toLowerCase());
}

/**
 * Parses a trimmed, non-missing token as a decimal number. Returns NaN when it is not a number;
 * ±Infinity when it is written as a number but overflows (e.g. "1e999") or spelled "Infinity".
 * JavaScript's Number() also accepts hexadecimal, binary and octal literals ("0x1F"); those are not
 * decimal data and are rejected.
 */
export function parseNumberToken(trimmed: string): number {
  const value = +trimmed;
  if (value === value && trimmed.length > 1 && trimmed.charCodeAt(0) === 48) {
    const second = trimmed.charCodeAt(1) | 32;
    if (second === 120 || second === 98 || second === 111) return Number.NaN;
  }
  return value;
}
