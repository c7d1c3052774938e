"use client";

import { ResponsiveBar } from "@nivo/bar";
import { useId, useState } from "react";
import { DIVERGENCE_NAMES, type DivergenceMetric } from "@/lib/reports/report-view";
import { CHART_THEME, PALETTE, shortenLabel } from "./chart-style";

export type DivergenceBar = { name: string; tv: number; js: number };

const BAR_HEIGHT = 20;

/**
 * How far each shard's label mix is from the pooled mix, largest first, with the rows-weighted mean
 * marked. The reader picks total variation (a share of rows, 0–1) or Jensen–Shannon (nats).
 */
export function DivergenceChart({
  shards,
  weightedMean,
  cap,
  label,
}: {
  shards: DivergenceBar[];
  weightedMean: Record<DivergenceMetric, number>;
  cap: number;
  label: string;
}) {
  const [metric, setMetric] = useState<DivergenceMetric>("tv");
  const groupName = useId();
  const ranked = shards
    .map((shard, index) => ({ key: `shard-${index}`, name: shard.name, value: shard[metric] }))
    .sort((a, b) => b.value - a.value)
    .slice(0, cap);
  const nameOf = new Map(ranked.map((bar) => [bar.key, bar.name]));
  const maximum = metric === "tv" ? 1 : Math.log(2);
  return (
    <div>
      <fieldset className="no-print mb-2 flex gap-4 text-sm">
        <legend className="sr-only">Divergence measure</legend>
        {(Object.keys(DIVERGENCE_NAMES) as DivergenceMetric[]).map((option) => (
          <label key={option} className="flex items-center gap-1.5">
            <input
              type="radio"
              name={groupName}
              value={option}
              checked={metric === option}
              onChange={() => setMetric(option)}
              className="accent-ink"
            />
            {DIVERGENCE_NAMES[option]}
          </label>
        ))}
      </fieldset>
      <p className="mb-1 hidden text-xs text-ink-soft print:block">
        Measure shown: {DIVERGENCE_NAMES[metric]}.
      </p>
      <div style={{ height: 60 + ranked.length * BAR_HEIGHT }} className="w-full">
        <ResponsiveBar
          data={[...ranked].reverse()}
          keys={["value"]}
          indexBy="key"
          layout="horizontal"
          valueScale={{ type: "linear", min: 0, max: maximum }}
          margin={{ top: 8, right: 16, bottom: 40, left: 120 }}
          padding={0.3}
          colors={PALETTE.cadmium}
          enableLabel={false}
          enableGridY={false}
          enableGridX
          axisBottom={{
            tickValues: 5,
            legend: DIVERGENCE_NAMES[metric],
            legendPosition: "middle",
            legendOffset: 32,
          }}
          axisLeft={{
            tickSize: 0,
            tickPadding: 8,
            format: (key: string) => shortenLabel(nameOf.get(key) ?? key, 16),
          }}
          markers={[
            {
              axis: "x",
              value: weightedMean[metric],
              lineStyle: { stroke: PALETTE.ink, strokeWidth: 1.5, strokeDasharray: "4 3" },
            },
          ]}
          theme={CHART_THEME}
          animate={false}
          role="img"
          ariaLabel={`${label} Measure: ${DIVERGENCE_NAMES[metric]}.`}
          tooltip={({ indexValue, value }) => (
            <div className="rounded bg-white px-2 py-1 text-xs whitespace-nowrap shadow">
              <strong>{nameOf.get(String(indexValue))}</strong>: {value.toPrecision(3)}
            </div>
          )}
        />
      </div>
      <p className="mt-1 flex items-center gap-1.5 text-xs text-ink-soft">
        <span aria-hidden className="inline-block w-5 border-t-2 border-dashed border-ink" />
        Weighted mean: {weightedMean[metric].toPrecision(3)}
      </p>
    </div>
  );
}
