// Growable lists of numbers kept in chunks (chunked-arrays.ts): what comes out is what went in, in
// order, across chunk borders, with Int32Array's conversion of what it stores (ECMAScript ToInt32).
import { describe, expect, it } from "vitest";
import { CHUNK_LENGTH, ChunkedFloat64, ChunkedInt32 } from "@/lib/analysis/chunked-arrays";

const COUNTS = [
  0,
  1,
  CHUNK_LENGTH - 1,
  CHUNK_LENGTH,
  CHUNK_LENGTH + 1,
  2 * CHUNK_LENGTH,
  2 * CHUNK_LENGTH + 5,
];

describe("ChunkedFloat64", () => {
  it("gives back every value in order, whatever the count", () => {
    for (const count of COUNTS) {
      const list = new ChunkedFloat64();
      const expected = Float64Array.from({ length: count }, (_, i) => i * 0.5 - 7);
      for (const value of expected) list.push(value);
      expect(list.length).toBe(count);
      const out = list.toArray();
      expect({
        count,
        same: out.length === count && out.every((v, i) => Object.is(v, expected[i])),
      }).toEqual({
        count,
        same: true,
      });
    }
  });

  it("keeps NaN and −0 as they are", () => {
    const list = new ChunkedFloat64();
    list.push(Number.NaN);
    list.push(-0);
    const [nan, negativeZero] = list.toArray();
    expect(nan).toBeNaN();
    expect(Object.is(negativeZero, -0)).toBe(true);
  });

  it("lets go of its values when released", () => {
    const list = new ChunkedFloat64();
    for (let i = 0; i < CHUNK_LENGTH + 3; i++) list.push(i);
    list.release();
    expect(list.toArray().every((value) => value === 0)).toBe(true);
  });
});

describe("ChunkedInt32", () => {
  it("gives back every value in order, whole or as views of at most one chunk each", () => {
    for (const count of COUNTS) {
      const list = new ChunkedInt32();
      const expected = Int32Array.from({ length: count }, (_, i) => ((i * 7919) % 1000) - 500);
      for (const value of expected) list.push(value);
      const whole = list.toArray();
      const views = list.views();
      const joined = views.flatMap((view) => Array.from(view));
      expect({ count, whole: Array.from(whole), joined }).toEqual({
        count,
        whole: Array.from(expected),
        joined: Array.from(expected),
      });
      // Full chunks, the last holding what is left (a last chunk just filled is not followed by
      // an empty view; no values give one empty view).
      const full = Math.max(0, Math.ceil(count / CHUNK_LENGTH) - 1);
      expect(views.map((view) => view.length)).toEqual([
        ...Array.from({ length: full }, () => CHUNK_LENGTH),
        count - full * CHUNK_LENGTH,
      ]);
    }
  });

  it("stores as Int32Array does (ToInt32: 2³¹ wraps to −2³¹)", () => {
    const list = new ChunkedInt32();
    for (const value of [2 ** 31, -1, 3.7]) list.push(value);
    expect(Array.from(list.toArray())).toEqual(Array.from(Int32Array.from([2 ** 31, -1, 3.7])));
  });

  it("lets go of its values when released", () => {
    const list = new ChunkedInt32();
    for (let i = 0; i < CHUNK_LENGTH + 3; i++) list.push(i + 1);
    list.release();
    expect(list.views().flatMap((view) => Array.from(view))).toEqual([]);
  });
});
