import { describe, expect, it } from "vitest";
import { createMatrix, matrixFromValues } from "@/lib/math/matrix";

// The shape contract stated on lib/math/matrix.ts: row-major, rows × cols values, shapes of
// non-negative integers, shared memory on request.
describe("createMatrix", () => {
  it("allocates rows × cols zeros, in shared memory on request", () => {
    const plain = createMatrix(2, 3);
    expect(plain.data).toEqual(new Float64Array(6));
    expect(plain.data.buffer).toBeInstanceOf(ArrayBuffer);
    const shared = createMatrix(3, 2, { shared: true });
    expect(shared.data.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(shared.data.length).toBe(6);
    expect(shared.data.buffer.byteLength).toBe(6 * Float64Array.BYTES_PER_ELEMENT);
  });

  it("accepts empty shapes and refuses negative or fractional ones, naming the shape", () => {
    expect(createMatrix(0, 4).data.length).toBe(0);
    expect(createMatrix(4, 0).data.length).toBe(0);
    const refused: [number, number][] = [
      [-1, 2],
      [2, -1],
      [1.5, 2],
      [2, 0.5],
    ];
    for (const [rows, cols] of refused) {
      expect(() => createMatrix(rows, cols)).toThrow(
        `matrix shape must be non-negative integers, got ${rows} × ${cols}`,
      );
    }
  });
});

describe("matrixFromValues", () => {
  it("wraps a Float64Array without copying and copies other arrays", () => {
    const values = Float64Array.of(1, 2, 3, 4, 5, 6);
    const wrapped = matrixFromValues(2, 3, values);
    expect(wrapped.data).toBe(values);
    expect(wrapped).toMatchObject({ rows: 2, cols: 3 });
    expect(matrixFromValues(3, 2, [1, 2, 3, 4, 5, 6]).data).toEqual(values);
  });

  it("refuses a count of values that is not rows × cols, naming both", () => {
    expect(() => matrixFromValues(2, 3, [1, 2, 3, 4])).toThrow(
      "expected 6 values for a 2 × 3 matrix, got 4",
    );
  });
});
