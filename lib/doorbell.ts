/**
 * A wake-up that cannot be missed between a look and a wait: a ring while nobody waits is kept, so
 * the next `wait` returns at once. A loop looks (reads the rows it waits for), and when it finds
 * nothing waits; a ring that came during the look sends it straight back to look again.
 */
export class Doorbell {
  private rung = false;
  private wake: (() => void) | null = null;

  ring(): void {
    this.rung = true;
    this.wake?.();
  }

  /** True when rung since the last wait returned; false after `ms` or once `signal` aborts. */
  async wait(ms: number, signal: AbortSignal): Promise<boolean> {
    if (!this.rung && !signal.aborted) {
      await new Promise<void>((resolve) => {
        const done = () => {
          clearTimeout(timer);
          signal.removeEventListener("abort", done);
          this.wake = null;
          resolve();
        };
        const timer = setTimeout(done, ms);
        signal.addEventListener("abort", done, { once: true });
        this.wake = done;
      });
    }
    const rung = this.rung;
    this.rung = false;
    return rung;
  }
}
