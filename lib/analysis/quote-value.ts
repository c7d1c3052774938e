/** Longest value quoted back to the user whole; longer ones are cut with an ellipsis. */
export const MAX_QUOTED_CHARACTERS = 60;

/**
 * Makes a value taken from a user's file safe to print inside a message: control characters
 * (C0, DEL, C1, the Unicode line and paragraph separators and the bidirectional overrides, which
 * reorder what follows them) become visible escapes such as \x1b or
 * \u2028, so a crafted header cannot move the cursor or retitle a terminal, and a value longer than
 * MAX_QUOTED_CHARACTERS is cut (by code point, so no surrogate pair is split) with "…".
 *
 * Example: showValue("ab\u001b]0;x\u0007") gives "ab\\x1b]0;x\\x07".
 */
export function showValue(value: string): string {
  const codePoints = Array.from(value);
  const kept =
    codePoints.length > MAX_QUOTED_CHARACTERS
      ? codePoints.slice(0, MAX_QUOTED_CHARACTERS)
      : codePoints;
  const escaped = kept.map(escapeControl).join("");
  return kept.length < codePoints.length ? `${escaped}…` : escaped;
}

/** showValue between double quotes, the form every message uses for a value from the data. */
export function quoteValue(value: string): string {
  return `"${showValue(value)}"`;
}

function escapeControl(character: string): string {
  const code = character.codePointAt(0) as number;
  const isControl =
    code < 0x20 ||
    (code >= 0x7f && code < 0xa0) ||
    code === 0x2028 ||
    code === 0x2029 ||
    (code >= 0x202a && code <= 0x202e) ||
    (code >= 0x2066 && code <= 0x2069);
  if (!isControl) return character;
  return code <= 0xff ? `\\x${code.toString(16).padStart(2, "0")}` : `\\u${code.toString(16)}`;
}
