"use client";

import { ResponsiveLine } from "@nivo/line";
import type { BoundCurvePoint } from "@/lib/reports/bound-curves";
import { formatDecade, formatFigure, spanDecades } from "@/lib/reports/report-view";
import { CHART_THEME, PALETTE } from "./chart-style";

const SERIES = [
  { id: "Local SGD", key: "local", colour: PALETTE.verdigris },
  { id: "Minibatch SGD", key: "minibatch", colour: PALETTE.indigo },
  { id: "Accelerated minibatch SGD", key: "acceleratedMinibatch", colour: PALETTE.inkFaint },
] as const;

/** The three bounds against local steps K on log–log axes, the plan's K and the crossover marked. */
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
              legend: `your plan, K = ${planLocalSteps}`,
              legendPosition: "top-left",
              textStyle: { fontSize: 11, fill: PALETTE.ink },
            },
            ...(crossoverLocalSteps === null
              ? []
              : [
                  {
                    axis: "x" as const,
                    value: crossoverLocalSteps,
                    lineStyle: markerLine(PALETTE.verdigris),
                    legend: `crossover, K = ${crossoverLocalSteps}`,
                    legendPosition: "bottom-right" as const,
                    textStyle: { fontSize: 11, fill: PALETTE.verdigris },
                  },
                ]),
          ]}
          useMesh
          enableSlices="x"
          sliceTooltip={({ slice }) => (
            <div className="rounded bg-white px-2 py-1 text-xs shadow">
              <div className="font-semibold">K = {String(slice.points[0]?.data.x)}</div>
              {slice.points.map((point) => (
                <div key={point.id} style={{ color: point.seriesColor }}>
                  {point.seriesId}: {formatFigure(Number(point.data.y), 3)}
                </div>
              ))}
            </div>
          )}
          theme={CHART_THEME}
          animate={false}
          role="img"
          ariaLabel={label}
        />
      </div>
      <ul className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft" aria-label="Curves">
        {SERIES.map((series) => (
          <li key={series.id} className="flex items-center gap-1.5">
            <span
              aria-hidden
              className="inline-block h-0.5 w-5"
              style={{ background: series.colour }}
            />
            {series.id}
          </li>
        ))}
      </ul>
    </div>
  );
}
