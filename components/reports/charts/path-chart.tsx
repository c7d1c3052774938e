"use client";

import { ResponsiveLine } from "@nivo/line";
import { formatDecade, formatFigure, spanDecades } from "@/lib/reports/report-view";
import { CHART_THEME, PALETTE } from "./chart-style";

/**
 * ζ² at W_t = t·W* from the training start (t = 0) to the optimum (t = 1), with the heterogeneity
 * barrier H²B²/R drawn across: ζ² at t = 1 on or above the line means the barrier holds.
 */
export function PathChart({
  points,
  barrierThreshold,
  label,
}: {
  points: { t: number; zeta2: number }[];
  barrierThreshold: number;
  label: string;
}) {
  const values = [...points.map((point) => point.zeta2), barrierThreshold];
  const logScale = values.every((value) => value > 0 && Number.isFinite(value));
  const decades = spanDecades(values);
  return (
    <div className="h-[300px] w-full">
      <ResponsiveLine
        data={[{ id: "ζ²", data: points.map((point) => ({ x: point.t, y: point.zeta2 })) }]}
        xScale={{ type: "linear", min: 0, max: 1 }}
        yScale={
          logScale
            ? { type: "log", base: 10, min: decades[0], max: decades[decades.length - 1] }
            : { type: "linear", min: 0, max: "auto" }
        }
        margin={{ top: 16, right: 24, bottom: 48, left: 72 }}
        colors={[PALETTE.ink]}
        lineWidth={2}
        pointSize={8}
        pointColor={PALETTE.ink}
        enableGridX={false}
        gridYValues={logScale ? decades : undefined}
        axisBottom={{
          tickValues: [0, 0.25, 0.5, 0.75, 1],
          format: (t: number) => (t === 0 ? "0 (start)" : t === 1 ? "1 (W*)" : String(t)),
          legend: "t, position on the path W_t = t·W*",
          legendPosition: "middle",
          legendOffset: 38,
        }}
        axisLeft={{
          tickValues: logScale ? decades : 5,
          format: (value: number) => (logScale ? formatDecade(value) : formatFigure(value, 2)),
          legend: "ζ² (weighted)",
          legendPosition: "middle",
          legendOffset: -62,
        }}
        markers={[
          {
            axis: "y",
            value: barrierThreshold,
            lineStyle: { stroke: PALETTE.cadmium, strokeWidth: 1.5, strokeDasharray: "5 4" },
            legend: "barrier H²B²/R",
            legendPosition: "top-right",
            textStyle: { fontSize: 11, fill: PALETTE.cadmium },
          },
        ]}
        useMesh
        theme={CHART_THEME}
        animate={false}
        role="img"
        ariaLabel={label}
        tooltip={({ point }) => (
          <div className="rounded bg-white px-2 py-1 text-xs shadow">
            t = {String(point.data.x)}: ζ² = {formatFigure(Number(point.data.y), 4)}
          </div>
        )}
      />
    </div>
  );
}
