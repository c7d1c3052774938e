"use client";

import { ResponsiveScatterPlot } from "@nivo/scatterplot";
import { CHART_THEME, PALETTE } from "@/components/reports/charts/chart-style";
import type { Verdict } from "@/lib/analysis/browser";
import type { ComparisonRow } from "@/lib/layout-plans/comparison-view";
import { formatFigure, VERDICT_LABELS } from "@/lib/reports/report-view";

/** The verdicts' colours of the report (verdigris: local updates, indigo: minibatches). */
const VERDICT_COLOURS: Record<Verdict, string> = {
  "local-updates": PALETTE.verdigris,
  "large-minibatch": PALETTE.indigo,
  "no-clear-winner": PALETTE.inkFaint,
};

interface Point {
  x: number;
  y: number;
  name: string;
}

/**
 * ρ against weighted JS, one point per candidate, coloured by verdict: how the label skew of a
 * split moves the advice. ρ spans decades, so its axis is logarithmic when every ρ is positive.
 */
export function CandidateScatter({ rows }: { rows: ComparisonRow[] }) {
  const plotted = rows.filter((row) => row.ratio !== null && Number.isFinite(row.ratio));
  const logarithmic = plotted.every((row) => (row.ratio as number) > 0);
  const series = (Object.keys(VERDICT_LABELS) as Verdict[])
    .map((verdict) => ({
      id: VERDICT_LABELS[verdict],
      verdict,
      data: plotted
        .filter((row) => row.verdict === verdict)
        .map((row): Point => ({ x: row.js, y: row.ratio as number, name: row.name })),
    }))
    .filter((serie) => serie.data.length > 0);
  const colourOf = new Map(series.map((serie) => [serie.id, VERDICT_COLOURS[serie.verdict]]));
  return (
    <div
      className="h-80 w-full"
      role="img"
      aria-label={`ρ against weighted JS for ${plotted.length} candidates: ${plotted
        .map((row) => `${row.name} JS ${formatFigure(row.js)}, ρ ${formatFigure(row.ratio)}`)
        .join("; ")}`}
    >
      <ResponsiveScatterPlot<Point>
        data={series.map(({ id, data }) => ({ id, data }))}
        margin={{ top: 16, right: 24, bottom: 64, left: 72 }}
        xScale={{ type: "linear", min: 0, max: "auto" }}
        yScale={
          logarithmic ? { type: "log", base: 10, min: "auto", max: "auto" } : { type: "linear" }
        }
        colors={({ serieId }) => colourOf.get(String(serieId)) ?? PALETTE.ink}
        nodeSize={12}
        axisBottom={{
          legend: "Weighted Jensen–Shannon divergence of the label mixes",
          legendPosition: "middle",
          legendOffset: 40,
          format: (value: number) => formatFigure(value),
        }}
        axisLeft={{
          legend: "ρ = local / minibatch bound",
          legendPosition: "middle",
          legendOffset: -60,
          format: (value: number) => formatFigure(value, 2),
        }}
        tooltip={({ node }) => (
          <div className="rounded bg-white px-2 py-1 text-xs shadow">
            <span className="font-mono font-medium">{node.data.name}</span>: JS{" "}
            {formatFigure(node.data.x)}, ρ {formatFigure(node.data.y)} ({node.serieId})
          </div>
        )}
        legends={[
          {
            anchor: "bottom",
            direction: "row",
            translateY: 60,
            itemWidth: 140,
            itemHeight: 16,
            symbolSize: 10,
            symbolShape: "circle",
          },
        ]}
        theme={CHART_THEME}
        animate={false}
      />
    </div>
  );
}
