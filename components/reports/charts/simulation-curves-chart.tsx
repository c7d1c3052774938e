"use client";

import { ResponsiveLine, type LineCustomSvgLayerProps } from "@nivo/line";
import type { AlgorithmName } from "@/lib/analysis/browser";
import { formatDecade, spanDecades } from "@/lib/reports/report-view";
import type { CurvePoint } from "@/lib/reports/simulation-view";
import { CHART_THEME, PALETTE } from "./chart-style";
import { LineLegend, makeSliceTooltip } from "./line-chart-parts";

const RoundTooltip = makeSliceTooltip((x) => `Round ${x}`);

/** Local SGD and minibatch SGD keep the colours of their verdicts and bound curves. */
const ALGORITHM_COLOURS: Record<AlgorithmName, string> = {
  minibatch: PALETTE.indigo,
  local: PALETTE.verdigris,
  scaffold: PALETTE.ink,
};

export interface SimulationSeries {
  name: AlgorithmName;
  label: string;
  /** Already clamped to the log scale's floor. */
  points: CurvePoint[];
}

type LineSeries = { id: string; data: { x: number; y: number }[] };

/**
 * Mean suboptimality F(W_r) − F(W*) against rounds on a logarithmic scale, one line per algorithm,
 * with the seeds' min–max band shaded behind it.
 */
export function SimulationCurvesChart({
  series,
  rounds,
  label,
}: {
  series: SimulationSeries[];
  rounds: number;
  label: string;
}) {
  const drawn = series.filter((entry) => entry.points.length > 0);
  const decades = spanDecades(
    drawn.flatMap((entry) => entry.points.flatMap((point) => [point.min, point.max, point.mean])),
  );
  // nivo passes its scales to custom layers; the bands are drawn from the same points as the lines.
  const SeedBands = ({ xScale, yScale }: LineCustomSvgLayerProps<LineSeries>) => (
    <g pointerEvents="none">
      {drawn.map((entry) => {
        const upper = entry.points.map((point) => `${xScale(point.round)},${yScale(point.max)}`);
        const lower = [...entry.points]
          .reverse()
          .map((point) => `${xScale(point.round)},${yScale(point.min)}`);
        return (
          <g key={entry.name}>
            <path
              d={`M${[...upper, ...lower].join("L")}Z`}
              fill={ALGORITHM_COLOURS[entry.name]}
              fillOpacity={0.28}
              stroke="none"
            />
            {/* Dashed edges keep a thin band visible where the seeds nearly agree. */}
            {[upper, lower].map((edge, index) => (
              <path
                key={index}
                d={`M${edge.join("L")}`}
                fill="none"
                stroke={ALGORITHM_COLOURS[entry.name]}
                strokeOpacity={0.7}
                strokeWidth={1}
                strokeDasharray="3 3"
              />
            ))}
          </g>
        );
      })}
    </g>
  );
  return (
    <div>
      <div className="h-[360px] w-full">
        <ResponsiveLine<LineSeries>
          data={drawn.map((entry) => ({
            id: entry.label,
            data: entry.points.map((point) => ({ x: point.round, y: point.mean })),
          }))}
          colors={drawn.map((entry) => ALGORITHM_COLOURS[entry.name])}
          xScale={{ type: "linear", min: 0, max: rounds }}
          yScale={{ type: "log", base: 10, min: decades[0], max: decades[decades.length - 1] }}
          gridYValues={decades}
          margin={{ top: 16, right: 24, bottom: 48, left: 72 }}
          lineWidth={2}
          pointSize={0}
          enableGridX={false}
          axisBottom={{
            tickValues: 5,
            legend: "Rounds",
            legendPosition: "middle",
            legendOffset: 38,
          }}
          axisLeft={{
            tickValues: decades,
            format: formatDecade,
            legend: "F(W) − F(W*)",
            legendPosition: "middle",
            legendOffset: -62,
          }}
          layers={["grid", "axes", SeedBands, "lines", "slices"]}
          enableSlices="x"
          sliceTooltip={RoundTooltip}
          theme={CHART_THEME}
          animate={false}
          role="img"
          ariaLabel={label}
        />
      </div>
      <LineLegend
        entries={drawn.map((entry) => ({
          label: entry.label,
          colour: ALGORITHM_COLOURS[entry.name],
        }))}
      >
        <li className="flex items-center gap-1.5">
          <span aria-hidden className="inline-block h-2.5 w-5 rounded-sm bg-ink/15" />
          shaded: lowest to highest over the seeds
        </li>
      </LineLegend>
    </div>
  );
}
