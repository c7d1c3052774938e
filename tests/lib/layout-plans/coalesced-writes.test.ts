// The layout plan's progress writes: coalesced to one per interval per key, never losing the latest
// value, ends written at once. Fake timers stand in for the interval.
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { createCoalescedWrites } from "@/lib/layout-plans/coalesced-writes";

beforeEach(() => vi.useFakeTimers());
afterEach(() => vi.useRealTimers());

function recorder() {
  const written: string[] = [];
  const writes = createCoalescedWrites(500, (error) => {
    throw error;
  });
  const write = (key: string, value: string, always = false) =>
    writes.enqueue(key, async () => written.push(`${key}=${value}`), always);
  return { written, writes, write };
}

describe("coalesced progress writes", () => {
  it("writes the first value at once and the latest one when the interval ends", async () => {
    const { written, writes, write } = recorder();
    write("plan", "0.1");
    await vi.advanceTimersByTimeAsync(10);
    write("plan", "0.2");
    write("plan", "0.3");
    expect(written).toEqual(["plan=0.1"]);
    await vi.advanceTimersByTimeAsync(500);
    // 0.2 was replaced by 0.3 while it waited; 0.3 is written, not dropped.
    expect(written).toEqual(["plan=0.1", "plan=0.3"]);
    await vi.advanceTimersByTimeAsync(1000);
    expect(written).toEqual(["plan=0.1", "plan=0.3"]);
    await writes.flush();
  });

  it("keeps keys apart and writes an end at once, dropping its key's waiting progress", async () => {
    const { written, writes, write } = recorder();
    write("candidate 0", "0.1");
    write("candidate 1", "0.1");
    write("candidate 0", "0.5");
    write("candidate 0", "done", true);
    await vi.advanceTimersByTimeAsync(0);
    expect(written).toEqual(["candidate 0=0.1", "candidate 1=0.1", "candidate 0=done"]);
    await vi.advanceTimersByTimeAsync(2000);
    expect(written).toHaveLength(3);
    await writes.flush();
  });

  it("flush writes what is still waiting and waits for every write", async () => {
    const { written, writes, write } = recorder();
    write("plan", "0.1");
    write("plan", "0.9");
    await writes.flush();
    expect(written).toEqual(["plan=0.1", "plan=0.9"]);
    // Nothing is left scheduled.
    expect(vi.getTimerCount()).toBe(0);
  });

  it("goes on after a failed write, handing the error over", async () => {
    const errors: unknown[] = [];
    const written: string[] = [];
    const writes = createCoalescedWrites(500, (error) => errors.push(error));
    writes.enqueue("a", () => Promise.reject(new Error("database down")));
    writes.enqueue("b", async () => written.push("b"));
    await writes.flush();
    expect(errors).toEqual([new Error("database down")]);
    expect(written).toEqual(["b"]);
  });
});
