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
 * decimal data and are rejected. With a decimal comma ("17,5") a point is not a number.
 */
export function parseNumberToken(trimmed: string, decimalMark: "." | "," = "."): number {
  let text = trimmed;
  if (decimalMark === ",") {
    if (text.includes(".")) return Number.NaN;
    text = text.replace(",", ".");
  }
  const value = +text;
  if (value === value && trimmed.length > 1 && trimmed.charCodeAt(0) === 48) {
    const second = trimmed.charCodeAt(1) | 32;
    if (second === 120 || second === 98 || second === 111) return Number.NaN;
  }
  return value;
}

/** 10^k for k = 0…15: exact doubles. */
const POWERS_OF_TEN = Array.from({ length: 16 }, (_, k) => 10 ** k);
/** Up to 15 decimal digits, the mantissa is an integer below 2^53 and so exact. */
const MAX_FAST_DIGITS = 15;

/**
 * The value of a plain decimal token — optional sign, digits, optional point and digits, at most 15
 * digits, no white space or exponent — or NaN for any other token (which `parseNumberToken` then
 * handles). Same result as Number(token), found faster: the digits form an exact integer m < 2^53
 * and 10^k (k ≤ 15) is exact, so the single IEEE division m / 10^k is the correctly rounded value
 * of the decimal (Clinger's fast path, "How to read floating point numbers accurately", PLDI 1990;
 * from memory). Reading a large CSV spends most of its time converting tokens to numbers.
 *
 * `pointCode` is the decimal mark's character code: 46 for ".", 44 for a decimal comma.
 *
 * Example: "-12.50" gives −12.5; "1e3", " 7" and "0x1F" give NaN; ("-12,50", 44) gives −12.5.
 */
export function parseSimpleDecimal(token: string, pointCode = 46): number {
  const length = token.length;
  let index = 0;
  let negative = false;
  const first = token.charCodeAt(0);
  if (first === 45 || first === 43) {
    negative = first === 45;
    index = 1;
  }
  let mantissa = 0;
  let digits = 0;
  let fractionDigits = 0;
  let pointSeen = false;
  for (; index < length; index++) {
    const code = token.charCodeAt(index);
    const digit = code - 48;
    if (digit >= 0 && digit <= 9) {
      mantissa = mantissa * 10 + digit;
      digits++;
      if (pointSeen) fractionDigits++;
    } else if (code === pointCode && !pointSeen) {
      pointSeen = true;
    } else {
      return Number.NaN;
    }
  }
  if (digits === 0 || digits > MAX_FAST_DIGITS) return Number.NaN;
  const magnitude = mantissa / POWERS_OF_TEN[fractionDigits];
  return negative ? -magnitude : magnitude;
}
