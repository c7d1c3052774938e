import { randomBytes } from "node:crypto";
import { closeSync, openSync, readSync, unlinkSync, writeSync } from "node:fs";
import path from "node:path";

/**
 * A local file of numbers that only this process can reach: it is removed from its folder the moment
 * it is opened and lives on through the open descriptor, so the system reclaims its space when the
 * descriptor is closed or the process ends in any way (a crash or a kill included) and no file is
 * ever left behind.
 */
export class ScratchFile {
  /** Where the file was created (it is already unlinked; for diagnostics and messages). */
  readonly path: string;
  private descriptor: number | null;

  constructor(directory: string) {
    this.path = path.join(directory, `partita-rows-${randomBytes(6).toString("hex")}.f64`);
    this.descriptor = openSync(this.path, "wx+", 0o600);
    unlinkSync(this.path);
  }

  /** Writes the values at byte `position`. */
  write(values: Float64Array, position: number): void {
    const bytes = new Uint8Array(values.buffer, values.byteOffset, values.byteLength);
    for (let done = 0; done < bytes.length;) {
      done += writeSync(this.open(), bytes, done, bytes.length - done, position + done);
    }
  }

  /** Fills `into` with the values stored from byte `position`. */
  read(into: Float64Array, position: number): void {
    const bytes = new Uint8Array(into.buffer, into.byteOffset, into.byteLength);
    for (let done = 0; done < bytes.length;) {
      const read = readSync(this.open(), bytes, done, bytes.length - done, position + done);
      if (read === 0) throw new Error(`scratch file ${this.path} ended early`);
      done += read;
    }
  }

  /** Gives the space back (idempotent). */
  close(): void {
    if (this.descriptor === null) return;
    closeSync(this.descriptor);
    this.descriptor = null;
  }

  private open(): number {
    if (this.descriptor === null) throw new Error(`scratch file ${this.path} is closed`);
    return this.descriptor;
  }
}
