const LINE_FEED = 10;
const CARRIAGE_RETURN = 13;
const QUOTE = 34;

/**
 * Counts the data rows of whole lines of CSV text fed in chunks, as the reader sees them: lines
 * that are not empty (a line of nothing but a carriage return is empty too, papaparse skipping
 * empty lines), without parsing them. Also tells whether any quote appeared, since a quoted field
 * may hold a line break, and the count is then not the reader's.
 */
export class RowCounter {
  rows = 0;
  quoted = false;
  private lineLength = 0;
  private lastByte = -1;

  add(bytes: Uint8Array): void {
    if (!this.quoted && bytes.includes(QUOTE)) this.quoted = true;
    let lineStart = 0;
    for (;;) {
      const lineEnd = bytes.indexOf(LINE_FEED, lineStart);
      if (lineEnd < 0) break;
      const length = this.lineLength + lineEnd - lineStart;
      const last = lineEnd > lineStart ? bytes[lineEnd - 1] : this.lastByte;
      if (length > 1 || (length === 1 && last !== CARRIAGE_RETURN)) this.rows++;
      this.lineLength = 0;
      this.lastByte = -1;
      lineStart = lineEnd + 1;
    }
    if (lineStart < bytes.length) {
      this.lineLength += bytes.length - lineStart;
      this.lastByte = bytes[bytes.length - 1];
    }
  }

  /** The rows once every chunk was added (a last line without its line end counts too). */
  finish(): { rows: number; quoted: boolean } {
    const { lineLength, lastByte } = this;
    const rows =
      lineLength > 1 || (lineLength === 1 && lastByte !== CARRIAGE_RETURN)
        ? this.rows + 1
        : this.rows;
    return { rows, quoted: this.quoted };
  }
}

/** The data rows of a stream of whole CSV lines (see RowCounter). */
export async function countRows(
  chunks: AsyncIterable<Uint8Array>,
): Promise<{ rows: number; quoted: boolean }> {
  const counter = new RowCounter();
  for await (const chunk of chunks) counter.add(chunk);
  return counter.finish();
}
