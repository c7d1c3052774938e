// Heat-map tick spacing. The identity checked: two kept labels are at least a label plus a gap
// apart (centre to centre), and labelling one more cell would break that.
import { describe, expect, it } from "vitest";
import { ROUND_CHOICES } from "@/lib/analysis/advise-plan";
import { formatCountTick, labelWidth, spacedTicks } from "@/lib/reports/axis-ticks";

describe("axis ticks of equal cells", () => {
  it("keeps every label apart, and no fewer than needed, at phone and desktop widths", () => {
    const keys = ROUND_CHOICES.map((rounds) => `R${rounds}`);
    const label = labelWidth(Math.max(...ROUND_CHOICES.map((r) => formatCountTick(r).length)));
    for (const cell of [9, 18, 25, 60]) {
      const kept = spacedTicks(keys, cell, label);
      const positions = kept.map((key) => keys.indexOf(key) * cell);
      expect(kept[0]).toBe("R1");
      for (let i = 1; i < positions.length; i++) {
        expect(positions[i] - positions[i - 1]).toBeGreaterThanOrEqual(label + 4);
      }
      const step = positions.length > 1 ? (positions[1] - positions[0]) / cell : keys.length;
      if (step > 1) expect((step - 1) * cell).toBeLessThan(label + 4);
    }
    // Wide cells label everything; an unmeasured chart (0 px) too, until it is measured.
    expect(spacedTicks(keys, 60, label)).toEqual(keys);
    expect(spacedTicks(keys, 0, label)).toEqual(keys);
  });

  it("writes whole thousands of rounds as k", () => {
    expect(ROUND_CHOICES.map(formatCountTick)).toEqual([
      "1",
      "2",
      "5",
      "10",
      "20",
      "50",
      "100",
      "200",
      "500",
      "1k",
      "2k",
      "5k",
      "10k",
    ]);
    expect(formatCountTick(2500)).toBe("2500");
  });
});
