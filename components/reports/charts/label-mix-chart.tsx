"use client";

import { ResponsiveBar } from "@nivo/bar";
import type { LabelMixBar } from "@/lib/reports/report-view";
import { CATEGORY_COLOURS, CHART_THEME, PALETTE, rampColours, shortenLabel } from "./chart-style";

const BAR_HEIGHT = 22;

/**
 * Each shard's label mix as one 100 % bar, the pooled mix on top, categories in a shared legend.
 * Ordered categories (a regression target's decile bins) get a ramp instead of distinct hues.
 */
export function LabelMixChart({
  bars,
  categories,
  ordered = false,
  label,
}: {
  bars: LabelMixBar[];
  categories: string[];
  ordered?: boolean;
  label: string;
}) {
  const keys = categories.map((_, index) => `c${index}`);
  const nameOf = new Map(bars.map((bar) => [bar.key, bar.name]));
  const palette = ordered ? rampColours(categories.length) : CATEGORY_COLOURS;
  const colourOf = (key: string | number) => palette[Number(String(key).slice(1)) % palette.length];
  return (
    <div>
      <div style={{ height: 56 + bars.length * BAR_HEIGHT }} className="w-full">
        <ResponsiveBar
          data={[...bars].reverse()}
          keys={keys}
          indexBy="key"
          layout="horizontal"
          groupMode="stacked"
          valueScale={{ type: "linear", min: 0, max: 1 }}
          margin={{ top: 8, right: 16, bottom: 40, left: 120 }}
          padding={0.25}
          colors={(datum) => colourOf(datum.id)}
          borderColor={PALETTE.paper}
          borderWidth={0.5}
          enableLabel={false}
          enableGridY={false}
          enableGridX
          gridXValues={[0, 0.25, 0.5, 0.75, 1]}
          axisBottom={{
            tickValues: [0, 0.25, 0.5, 0.75, 1],
            format: (value: number) => `${Math.round(value * 100)} %`,
            legend: "Share of the shard's rows",
            legendPosition: "middle",
            legendOffset: 32,
          }}
          axisLeft={{
            tickSize: 0,
            tickPadding: 8,
            format: (key: string) => shortenLabel(nameOf.get(key) ?? key, 16),
          }}
          theme={CHART_THEME}
          animate={false}
          role="img"
          ariaLabel={label}
          tooltip={({ id, value, indexValue, data }) => (
            <div className="rounded bg-white px-2 py-1 text-xs whitespace-nowrap shadow">
              <strong>{nameOf.get(String(indexValue))}</strong>:{" "}
              {categories[Number(String(id).slice(1))]} {(value * 100).toFixed(1)} % (about{" "}
              {Math.round(value * data.rows)} of {data.rows} rows)
            </div>
          )}
        />
      </div>
      <ul
        className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft"
        aria-label="Label categories"
      >
        {categories.map((category, index) => (
          <li key={category} className="flex items-center gap-1.5">
            <span
              aria-hidden
              className="inline-block h-3 w-3 rounded-sm"
              style={{ background: colourOf(`c${index}`) }}
            />
            {category}
          </li>
        ))}
      </ul>
    </div>
  );
}
