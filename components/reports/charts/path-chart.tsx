"use client";

import { ResponsiveLine, type LineCustomSvgLayerProps } from "@nivo/line";
import { formatDecade, formatFigure, spanDecades } from "@/lib/reports/report-view";
import { CHART_THEME, PALETTE } from "./chart-style";

type PathSeries = { id: string; data: { x: number; y: number }[] };

/**
 * ζ² at W_t = t·W* from the training start (t = 0) to the optimum (t = 1), with the heterogeneity
 * barrier H²B²/R drawn across. Only the point at t = 1 (ζ*²) is compared with the line, so it is
 * ringed and named; the others inform ζ² max, which the local SGD bound uses.
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
      <ResponsiveLine<PathSeries>
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
            legend: "barrier H²B²/R (compared with ζ*² at t = 1)",
            legendPosition: "top-right",
            textStyle: { fontSize: 11, fill: PALETTE.cadmium },
          },
        ]}
        layers={["grid", "markers", "axes", "lines", "points", OptimumRing, "mesh"]}
        useMesh
        theme={CHART_THEME}
        animate={false}
        role="img"
        ariaLabel={label}
        tooltip={({ point }) => (
          <div className="rounded bg-white px-2 py-1 text-xs whitespace-nowrap shadow">
            t = {String(point.data.x)}: {point.data.x === 1 ? "ζ*²" : "ζ²"} ={" "}
            {formatFigure(Number(point.data.y), 4)}
          </div>
        )}
      />
    </div>
  );
}

/** A ring and a name around the point at the optimum: the one value the barrier is about. */
function OptimumRing({ points }: Pick<LineCustomSvgLayerProps<PathSeries>, "points">) {
  const optimum = points.find((point) => point.data.x === 1);
  if (!optimum) return null;
  return (
    <g aria-hidden>
      <circle
        cx={optimum.x}
        cy={optimum.y}
        r={9}
        fill="none"
        stroke={PALETTE.ink}
        strokeWidth={1.5}
      />
      <text x={optimum.x - 12} y={optimum.y - 14} textAnchor="end" fontSize={11} fill={PALETTE.ink}>
        ζ*²
      </text>
    </g>
  );
}
