/**
 * Waits `ms`, or less if `signal` aborts first; never rejects, so a loop that pauses between tries
 * simply checks the signal afterwards (node:timers/promises' setTimeout rejects on abort instead).
 */
export function pause(ms: number, signal: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    const timer = setTimeout(done, ms);
    function done() {
      clearTimeout(timer);
      signal.removeEventListener("abort", done);
      resolve();
    }
    signal.addEventListener("abort", done, { once: true });
  });
}
