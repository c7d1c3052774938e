"use client";

import { ResponsiveLine } from "@nivo/line";
import type { BoundCurvePoint } from "@/lib/reports/bound-curves";
import { formatDecade, spanDecades } from "@/lib/reports/report-view";
import { CHART_THEME, PALETTE } from "./chart-style";
import { LineLegend, makeSliceTooltip } from "./line-chart-parts";

const LocalStepsTooltip = makeSliceTooltip((x) => `K = ${x}`);

const SERIES = [
  { id: "Local SGD", key: "local", colour: PALETTE.verdigris },
  { id: "Minibatch SGD", key: "minibatch", colour: PALETTE.indigo },
  { id: "Accelerated minibatch SGD", key: "acceleratedMinibatch", colour: PALETTE.inkFaint },
] as const;

/**
 * The three bounds against local steps K on log–log axes, the plan's K (dashed) and the crossover
 * (solid) marked by vertical lines that the key below names.
 */
export function BoundCurvesChart({
  points,
  planLocalSteps,
  crossoverLocalSteps,
  label,
}: {
  points: BoundCurvePoint[];
  planLocalSteps: number;
  crossoverLocalSteps: number | null;
  label: string;
}) {
  const markerLine = (colour: string) => ({ stroke: colour, strokeWidth: 1.5 });
  const decades = spanDecades(
    points.flatMap((point) => [point.local, point.minibatch, point.acceleratedMinibatch]),
  );
  return (
    <div>
      <div className="h-[320px] w-full">
        <ResponsiveLine
          data={SERIES.map((series) => ({
            id: series.id,
            data: points.map((point) => ({ x: point.localSteps, y: point[series.key] })),
          }))}
          colors={SERIES.map((series) => series.colour)}
          xScale={{ type: "log", base: 2, min: 1, max: 4096 }}
          yScale={{ type: "log", base: 10, min: decades[0], max: decades[decades.length - 1] }}
          gridYValues={decades}
          margin={{ top: 24, right: 24, bottom: 48, left: 72 }}
          lineWidth={2}
          pointSize={0}
          enableGridX={false}
          axisBottom={{
            tickValues: [1, 4, 16, 64, 256, 1024, 4096],
            legend: "Local steps per round, K",
            legendPosition: "middle",
            legendOffset: 38,
          }}
          axisLeft={{
            tickValues: decades,
            format: formatDecade,
            legend: "Bound (constants dropped)",
            legendPosition: "middle",
            legendOffset: -62,
          }}
          markers={[
            {
              axis: "x",
              value: planLocalSteps,
              lineStyle: { ...markerLine(PALETTE.ink), strokeDasharray: "4 3" },
            },
            ...(crossoverLocalSteps === null
              ? []
              : [
                  {
                    axis: "x" as const,
                    value: crossoverLocalSteps,
                    lineStyle: markerLine(PALETTE.verdigris),
                  },
                ]),
          ]}
          useMesh
          enableSlices="x"
          sliceTooltip={LocalStepsTooltip}
          theme={CHART_THEME}
          animate={false}
          role="img"
          ariaLabel={label}
        />
      </div>
      {/* The vertical lines are named in the key, not on the plot, where names ran into curves. */}
      <LineLegend entries={SERIES.map((series) => ({ label: series.id, colour: series.colour }))}>
        <li className="flex items-center gap-1.5">
          <span
            aria-hidden
            className="inline-block h-3 border-l-[1.5px] border-dashed border-ink"
          />
          your plan, K = {planLocalSteps}
        </li>
        {crossoverLocalSteps === null ? null : (
          <li className="flex items-center gap-1.5">
            <span aria-hidden className="inline-block h-3 border-l-[1.5px] border-verdigris" />
            crossover, K = {crossoverLocalSteps}
          </li>
        )}
      </LineLegend>
    </div>
  );
}
