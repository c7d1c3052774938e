"use client";

import { ResponsiveHeatMap, ResponsiveHeatMapCanvas } from "@nivo/heatmap";
import { labelWidth, spacedTicks, TICK_FONT_PX } from "@/lib/reports/axis-ticks";
import { CHART_THEME, PALETTE, shortenLabel } from "./chart-style";
import { useContainerWidth } from "./use-container-width";

/** Above this many shards the names no longer fit beside the cells, which are then drawn on a canvas. */
const SVG_LIMIT = 24;
/** Characters of a shard name beside a cell; the tooltip gives the whole name. */
const LABEL_LENGTH = 12;
/** On a phone (a chart narrower than this) names are cut shorter, leaving the cells more room. */
const NARROW_WIDTH = 480;
const NARROW_LABEL_LENGTH = 8;
/** The chart's right and bottom margins. */
const EDGE = 16;

/**
 * Cosine similarity of every pair of shard gradients at the training start: agreement shades dark,
 * opposition shades warm, orthogonal gradients stay pale; the key below gives the scale.
 */
export function AgreementHeatmap({
  names,
  matrix,
  label,
}: {
  names: string[];
  matrix: (number | null)[][];
  label: string;
}) {
  const keys = names.map((_, index) => `s${index}`);
  const nameOf = new Map(keys.map((key, index) => [key, names[index]]));
  const data = matrix.map((row, rowIndex) => ({
    id: keys[rowIndex],
    data: row.map((value, column) => ({ x: keys[column], y: value })),
  }));
  const named = names.length <= SVG_LIMIT;
  const [box, width] = useContainerWidth<HTMLDivElement>();
  const labelLength = width > 0 && width < NARROW_WIDTH ? NARROW_LABEL_LENGTH : LABEL_LENGTH;
  // Column names stand upright (rotated a quarter turn); the margins fit the longest shortened name.
  const longest = Math.max(...names.map((name) => shortenLabel(name, labelLength).length));
  const labelRoom = labelWidth(longest) + 12;
  const margin = named
    ? { top: labelRoom, right: EDGE, bottom: EDGE, left: labelRoom }
    : { top: EDGE, right: EDGE, bottom: EDGE, left: EDGE };
  // Square cells in a square box: where they are thinner than a line of type, every k-th is named.
  const cellSize = (width - labelRoom - EDGE) / names.length;
  const ticks = spacedTicks(keys, cellSize, TICK_FONT_PX);
  const axis = named
    ? {
        tickSize: 0,
        tickPadding: 6,
        tickValues: ticks,
        format: (key: string) => shortenLabel(nameOf.get(key) ?? key, labelLength),
      }
    : null;
  const common = {
    data,
    margin,
    forceSquare: true,
    colors: {
      type: "diverging" as const,
      colors: [PALETTE.cadmium, PALETTE.paper, PALETTE.inkSoft] as [string, string, string],
      minValue: -1,
      maxValue: 1,
      divergeAt: 0.5,
    },
    emptyColor: PALETTE.paperDeep,
    enableLabels: names.length <= 8,
    valueFormat: ">-.2f",
    labelTextColor: PALETTE.ink,
    axisTop: axis ? { ...axis, tickRotation: -90 } : null,
    axisLeft: axis,
    theme: CHART_THEME,
    hoverTarget: "cell" as const,
    animate: false,
    ariaLabel: label,
    tooltip: ({
      cell,
    }: {
      cell: { serieId: string; data: { x: string | number }; formattedValue: string | null };
    }) => (
      <div className="rounded bg-white px-2 py-1 text-xs whitespace-nowrap shadow">
        <strong>{nameOf.get(cell.serieId)}</strong> and{" "}
        <strong>{nameOf.get(String(cell.data.x))}</strong>: cosine {cell.formattedValue ?? "—"}
      </div>
    ),
  };
  return (
    <div>
      <div ref={box} className="aspect-square w-full max-w-[560px]">
        {named ? <ResponsiveHeatMap {...common} /> : <ResponsiveHeatMapCanvas {...common} />}
      </div>
      <GradientKey />
    </div>
  );
}

function GradientKey() {
  return (
    <div className="mt-2 flex items-center gap-2 text-xs text-ink-soft" aria-hidden>
      <span>−1 opposed</span>
      <span
        className="inline-block h-2.5 w-40 rounded-sm"
        style={{
          background: `linear-gradient(to right, ${PALETTE.cadmium}, ${PALETTE.paper}, ${PALETTE.inkSoft})`,
        }}
      />
      <span>+1 aligned</span>
    </div>
  );
}
