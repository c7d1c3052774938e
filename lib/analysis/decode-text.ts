import { Transform, type Readable } from "node:stream";
import { AnalysisInputError } from "./errors";
import type { TextEncodingName } from "./text-format";

const EXPECTED_TEXT = "a CSV text file (UTF-8, or the encoding chosen for it)";

/**
 * What the first bytes of a file show it to be when it is not text in the chosen encoding, or null
 * when they look like text: compressed or archived data by its signature (gzip 1f 8b, ZIP "PK\3\4" —
 * which is also what an .xlsx or .ods spreadsheet is —, Parquet "PAR1"), UTF-16 by its byte-order mark
 * or by NUL bytes in every other position, and any other NUL byte as binary data. A NUL byte is never
 * part of a CSV's text, so one rule covers the command line and the web.
 */
export function describeNonText(head: Uint8Array, encoding: TextEncodingName): string | null {
  const startsWith = (...bytes: number[]) => bytes.every((byte, i) => head[i] === byte);
  if (startsWith(0x1f, 0x8b)) return "gzip data";
  if (startsWith(0x50, 0x4b, 0x03, 0x04))
    return "a ZIP archive (an .xlsx or .ods spreadsheet is one)";
  if (startsWith(0x50, 0x41, 0x52, 0x31)) return "Parquet data";
  if (encoding === "utf-16") return null;
  if (startsWith(0xff, 0xfe) || startsWith(0xfe, 0xff)) {
    return "UTF-16 text (it starts with a UTF-16 byte-order mark; choose the encoding utf-16)";
  }
  const firstNul = head.indexOf(0);
  if (firstNul < 0) return null;
  let evenNuls = 0;
  let oddNuls = 0;
  const sample = Math.min(head.length, 4096);
  for (let i = 0; i < sample; i++) {
    if (head[i] !== 0) continue;
    if (i % 2 === 0) evenNuls++;
    else oddNuls++;
  }
  const half = sample / 2;
  if (evenNuls >= 0.9 * half || oddNuls >= 0.9 * half) {
    return "UTF-16 text without a byte-order mark (save it as UTF-8, or as UTF-16 with a byte-order mark)";
  }
  return "binary data (it holds NUL bytes)";
}

/** UTF-16's byte order from a byte-order mark, or null without one. */
function utf16Label(head: Uint8Array): "utf-16le" | "utf-16be" | null {
  if (head[0] === 0xff && head[1] === 0xfe) return "utf-16le";
  if (head[0] === 0xfe && head[1] === 0xff) return "utf-16be";
  return null;
}

/**
 * Decodes a byte stream as text in the chosen encoding, strictly: invalid UTF-8 is an
 * AnalysisInputError naming the line and byte offset (methods.md §1) instead of silently becoming
 * U+FFFD, a file that is not text at all says what it looks like ("not a text CSV: gzip data"), and a
 * NUL character anywhere is an error naming its line. The UTF-8 byte-order mark is skipped;
 * UTF-16 needs its byte-order mark, which says the byte order.
 */
export function decodeText(
  source: Readable,
  fileName: string,
  encoding: TextEncodingName,
  /** Where `source` starts in the file when it is a part of it (its lines are then not counted). */
  startByte?: number,
): Readable {
  let decoder: TextDecoder | null = null;
  let bytesBefore = startByte ?? 0;
  let linesBefore = 1;
  /** An unfinished sequence at the end of the previous chunk, which the decoder holds back. */
  let tail: Uint8Array = new Uint8Array(0);

  const failAt = (problem: string, line: number, byteOffset?: number) =>
    new AnalysisInputError(
      // A part of a file does not know its line numbers, only where it starts.
      `${problem}${startByte === undefined ? ` on line ${line}` : ""}${
        byteOffset !== undefined
          ? ` (byte offset ${byteOffset} in the file)`
          : startByte !== undefined
            ? ` (after byte offset ${startByte} in the file)`
            : ""
      }`,
      {
        file: fileName,
        expected:
          encoding === "utf-8"
            ? "UTF-8 text, or the file's encoding chosen (windows-1252, utf-16)"
            : EXPECTED_TEXT,
      },
    );

  const decodeChunk = (bytes: Uint8Array, last: boolean): string => {
    const active = decoder as TextDecoder;
    try {
      return active.decode(bytes, { stream: !last });
    } catch {
      if (encoding !== "utf-8")
        throw failAt("the text is not valid UTF-16", linesBefore, bytesBefore);
      const joined = concatBytes(tail, bytes);
      const index = findInvalidUtf8(joined, last);
      const offset = bytesBefore - tail.length + index;
      const line = linesBefore + countLineFeeds(joined, tail.length, index);
      throw failAt("the text is not valid UTF-8", line, offset);
    }
  };

  const checkNul = (text: string) => {
    const nul = text.indexOf("\u0000");
    if (nul >= 0)
      throw failAt("the text holds a NUL character", linesBefore + countNewlines(text, nul));
  };

  return source.pipe(
    new Transform({
      readableObjectMode: true,
      transform(piece: Buffer | string, _encoding, done) {
        try {
          // A stream of strings (Readable.from(["…"])) is taken as its UTF-8 bytes.
          const chunk = typeof piece === "string" ? Buffer.from(piece, "utf8") : piece;
          if (decoder === null) {
            // A part's file was looked at from its beginning already.
            const nonText = startByte === undefined ? describeNonText(chunk, encoding) : null;
            if (nonText !== null) {
              throw new AnalysisInputError(`not a text CSV: ${nonText}`, {
                file: fileName,
                expected: EXPECTED_TEXT,
              });
            }
            decoder = openDecoder(chunk, encoding, fileName);
          }
          const text = decodeChunk(chunk, false);
          checkNul(text);
          bytesBefore += chunk.length;
          linesBefore += countNewlines(text, text.length);
          tail = unfinishedSequence(chunk.length >= 4 ? chunk : concatBytes(tail, chunk));
          done(null, text.length > 0 ? text : undefined);
        } catch (error) {
          done(error as Error);
        }
      },
      flush(done) {
        try {
          if (decoder === null) return done();
          const text = decodeChunk(new Uint8Array(0), true);
          checkNul(text);
          done(null, text.length > 0 ? text : undefined);
        } catch (error) {
          done(error as Error);
        }
      },
    }),
  );
}

function openDecoder(head: Uint8Array, encoding: TextEncodingName, fileName: string): TextDecoder {
  if (encoding !== "utf-16") return new TextDecoder(encoding, { fatal: true });
  const label = utf16Label(head);
  if (label === null) {
    throw new AnalysisInputError("the file does not start with a UTF-16 byte-order mark", {
      file: fileName,
      expected:
        "UTF-16 text that starts with its byte-order mark (FF FE or FE FF), or another encoding",
    });
  }
  return new TextDecoder(label, { fatal: true });
}

function concatBytes(a: Uint8Array, b: Uint8Array): Uint8Array {
  const joined = new Uint8Array(a.length + b.length);
  joined.set(a);
  joined.set(b, a.length);
  return joined;
}

/** The trailing bytes of `bytes` that begin a UTF-8 sequence the bytes do not finish. */
function unfinishedSequence(bytes: Uint8Array): Uint8Array {
  for (let back = 1; back <= Math.min(3, bytes.length); back++) {
    const byte = bytes[bytes.length - back];
    if (byte < 0x80) break;
    if (byte >= 0xc0) {
      const length = byte >= 0xf0 ? 4 : byte >= 0xe0 ? 3 : 2;
      return length > back ? bytes.slice(bytes.length - back) : new Uint8Array(0);
    }
  }
  return new Uint8Array(0);
}

function countLineFeeds(bytes: Uint8Array, from: number, to: number): number {
  let count = 0;
  for (let i = from; i < to; i++) if (bytes[i] === 10) count++;
  return count;
}

function countNewlines(text: string, end: number): number {
  let count = 0;
  for (let at = text.indexOf("\n"); at >= 0 && at < end; at = text.indexOf("\n", at + 1)) count++;
  return count;
}

/**
 * Index of the first byte that does not start or continue a well-formed UTF-8 sequence (the
 * Unicode Standard, table 3-7: no overlong forms, no surrogates, nothing above U+10FFFF). A sequence
 * cut off by the end of `bytes` counts as invalid only at the end of the file (`atEnd`). Returns
 * bytes.length when everything is well formed. Only called after the native decoder has refused a
 * chunk, to say where.
 *
 * Example: [0x5a, 0xfc, 0x72] ("Z", a Latin-1 ü, "r") gives 1.
 */
export function findInvalidUtf8(bytes: Uint8Array, atEnd: boolean): number {
  let i = 0;
  while (i < bytes.length) {
    const lead = bytes[i];
    if (lead < 0x80) {
      i++;
      continue;
    }
    let length: number;
    let low = 0x80;
    let high = 0xbf;
    if (lead >= 0xc2 && lead <= 0xdf) length = 2;
    else if (lead >= 0xe0 && lead <= 0xef) {
      length = 3;
      if (lead === 0xe0) low = 0xa0;
      if (lead === 0xed) high = 0x9f;
    } else if (lead >= 0xf0 && lead <= 0xf4) {
      length = 4;
      if (lead === 0xf0) low = 0x90;
      if (lead === 0xf4) high = 0x8f;
    } else return i;
    for (let k = 1; k < length; k++) {
      if (i + k >= bytes.length) return atEnd ? i : bytes.length;
      const next = bytes[i + k];
      if (next < (k === 1 ? low : 0x80) || next > (k === 1 ? high : 0xbf)) return i;
    }
    i += length;
  }
  return bytes.length;
}
