"use client";

import { ResponsiveHeatMap, type CustomLayerProps } from "@nivo/heatmap";
import type { Verdict } from "@/lib/analysis/browser";
import {
  formatCountTick,
  labelWidth,
  spacedTicks,
  TICK_FONT_PX,
} from "@/lib/reports/axis-ticks";
import { classifyRegimeCell, type RegimeMap } from "@/lib/reports/regime-map";
import { formatFigure, VERDICT_LABELS } from "@/lib/reports/report-view";
import { CHART_THEME, mixColours, PALETTE } from "./chart-style";
import { useContainerWidth } from "./use-container-width";

/** How far past its threshold (in decades of ρ) a cell reaches its band's full colour. */
const FULL_STRENGTH = 1;

const BAND_COLOURS: Record<Verdict, [string, string]> = {
  "local-updates": [PALETTE.verdigrisSoft, PALETTE.verdigris],
  "large-minibatch": [PALETTE.indigoSoft, PALETTE.indigo],
  "no-clear-winner": [PALETTE.paperDeep, PALETTE.paperDeep],
};

/**
 * A cell's colour says which verdict it stands for (the thresholds ρ ≤ ½ and ρ ≥ 2); its depth says
 * by how much, so the bands never blur into each other the way a continuous scale would.
 */
function colourCell(value: number | null): string {
  if (value === null) return PALETTE.paper;
  const [soft, strong] = BAND_COLOURS[classifyRegimeCell(value)];
  const strength = Math.min(1, Math.max(0, (Math.abs(value) - Math.log10(2)) / FULL_STRENGTH));
  return mixColours(soft, strong, strength);
}

type RegimeDatum = { x: string; y: number | null };

const rowKey = (localSteps: number) => `K${localSteps}`;
const columnKey = (rounds: number) => `R${rounds}`;
const countOfKey = (key: string) => formatCountTick(Number(key.slice(1)));

const HEIGHT = 380;
const MARGIN = { top: 44, right: 16, bottom: 16, left: 64 };
/** The narrowest cell that holds the word "plan" in the 10 px bold type it is drawn in. */
const PLAN_WORD_MIN_CELL = 28;

/** log₁₀ ρ over local steps K (rows, largest on top) and rounds R (columns), the plan outlined. */
export function RegimeMapChart({ map, label }: { map: RegimeMap; label: string }) {
  const [box, width] = useContainerWidth<HTMLDivElement>();
  const cellWidth = (width - MARGIN.left - MARGIN.right) / map.rounds.length;
  const cellHeight = (HEIGHT - MARGIN.top - MARGIN.bottom) / map.localSteps.length;
  const widestColumnLabel = Math.max(...map.rounds.map((rounds) => formatCountTick(rounds).length));
  // On a phone the columns are narrower than their labels: every second or third is labelled.
  const columnTicks = spacedTicks(
    map.rounds.map(columnKey),
    cellWidth,
    labelWidth(widestColumnLabel),
  );
  const rowTicks = spacedTicks(map.localSteps.map(rowKey).reverse(), cellHeight, TICK_FONT_PX);
  const data: { id: string; data: RegimeDatum[] }[] = map.localSteps
    .map((localSteps, row) => ({
      id: rowKey(localSteps),
      data: map.rounds.map((rounds, column) => ({
        x: columnKey(rounds),
        y: map.log10Ratio[row][column],
      })),
    }))
    .reverse();
  const planCell = `${rowKey(map.plan.localSteps)}.${columnKey(map.plan.rounds)}`;
  const PlanOutline = ({ cells }: CustomLayerProps<RegimeDatum>) => {
    const cell = cells.find((candidate) => candidate.id === planCell);
    if (!cell) return null;
    return (
      <g pointerEvents="none">
        <rect
          x={cell.x - cell.width / 2}
          y={cell.y - cell.height / 2}
          width={cell.width}
          height={cell.height}
          fill="none"
          stroke={PALETTE.ink}
          strokeWidth={2.5}
        />
        {cell.width < PLAN_WORD_MIN_CELL ? null : (
          <text
          x={cell.x}
          y={cell.y}
          textAnchor="middle"
          dominantBaseline="central"
          fontSize={10}
          fontWeight={700}
          fill={PALETTE.ink}
        >
          plan
        </text>
        )}
      </g>
    );
  };
  return (
    <div>
      <div ref={box} className="w-full" style={{ height: HEIGHT }}>
        <ResponsiveHeatMap
          data={data}
          margin={MARGIN}
          colors={(cell) => colourCell(cell.value)}
          xInnerPadding={0.04}
          yInnerPadding={0.04}
          enableLabels={false}
          axisTop={{
            tickSize: 0,
            tickPadding: 6,
            tickValues: columnTicks,
            format: countOfKey,
            legend: "Rounds R",
            legendPosition: "middle",
            legendOffset: -34,
          }}
          axisLeft={{
            tickSize: 0,
            tickPadding: 6,
            tickValues: rowTicks,
            format: countOfKey,
            legend: "Local steps K",
            legendPosition: "middle",
            legendOffset: -52,
          }}
          layers={["grid", "axes", "cells", PlanOutline]}
          hoverTarget="cell"
          theme={CHART_THEME}
          animate={false}
          role="img"
          ariaLabel={label}
          tooltip={({ cell }) => (
            <div className="rounded bg-white px-2 py-1 text-xs whitespace-nowrap shadow">
              K = {cell.serieId.slice(1)}, R = {String(cell.data.x).slice(1)}: ρ ={" "}
              {cell.value === null ? "—" : formatFigure(10 ** cell.value, 3)} (
              {VERDICT_LABELS[classifyRegimeCell(cell.value)].toLowerCase()})
            </div>
          )}
        />
      </div>
      <ul className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft" aria-label="Key">
        {(
          [
            ["local-updates", "ρ ≤ ½: local updates"],
            ["no-clear-winner", "½ < ρ < 2: no clear winner"],
            ["large-minibatch", "ρ ≥ 2: large minibatches"],
          ] as const
        ).map(([verdict, text]) => (
          <li key={verdict} className="flex items-center gap-1.5">
            <span
              aria-hidden
              className="inline-block h-3 w-6 rounded-sm"
              style={{
                background: `linear-gradient(to right, ${BAND_COLOURS[verdict][0]}, ${BAND_COLOURS[verdict][1]})`,
              }}
            />
            {text}
          </li>
        ))}
        <li>darker = more decisive</li>
        <li>outlined: your plan</li>
      </ul>
    </div>
  );
}
