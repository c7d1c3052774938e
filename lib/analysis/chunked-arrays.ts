/** Values per chunk: row r of a column read in chunks is at offset r % CHUNK_LENGTH of chunk ⌊r / CHUNK_LENGTH⌋. */
export const CHUNK_LENGTH = 1 << 16;

/**
 * A growable list of numbers kept in fixed-size typed-array chunks, so reading a file of unknown
 * length never copies what was already read (doubling a single array would briefly hold twice the
 * memory) and a column can be released chunk by chunk.
 */
export class ChunkedFloat64 {
  private chunks: Float64Array[] = [];
  private current = new Float64Array(CHUNK_LENGTH);
  private used = 0;
  length = 0;

  push(value: number): void {
    if (this.used === CHUNK_LENGTH) {
      this.chunks.push(this.current);
      this.current = new Float64Array(CHUNK_LENGTH);
      this.used = 0;
    }
    this.current[this.used++] = value;
    this.length++;
  }

  /** Copies all values into one array. */
  toArray(): Float64Array {
    const out = new Float64Array(this.length);
    let offset = 0;
    for (const chunk of this.chunks) {
      out.set(chunk, offset);
      offset += chunk.length;
    }
    out.set(this.current.subarray(0, this.used), offset);
    return out;
  }

  /** Drops the stored values so the memory can be reclaimed. */
  release(): void {
    this.chunks = [];
    this.current = new Float64Array(0);
    this.used = 0;
  }
}

/** Same as ChunkedFloat64 for 32-bit integer codes. */
export class ChunkedInt32 {
  private chunks: Int32Array[] = [];
  private current = new Int32Array(CHUNK_LENGTH);
  private used = 0;
  length = 0;

  push(value: number): void {
    if (this.used === CHUNK_LENGTH) {
      this.chunks.push(this.current);
      this.current = new Int32Array(CHUNK_LENGTH);
      this.used = 0;
    }
    this.current[this.used++] = value;
    this.length++;
  }

  /** The values as consecutive arrays, without copying (views; only the last may be shorter). */
  views(): Int32Array[] {
    return [...this.chunks, this.current.subarray(0, this.used)];
  }

  toArray(): Int32Array {
    const out = new Int32Array(this.length);
    let offset = 0;
    for (const chunk of this.chunks) {
      out.set(chunk, offset);
      offset += chunk.length;
    }
    out.set(this.current.subarray(0, this.used), offset);
    return out;
  }

  release(): void {
    this.chunks = [];
    this.current = new Int32Array(0);
    this.used = 0;
  }
}
