import type { SliceTooltipProps } from "@nivo/line";
import type { ReactNode } from "react";
import { formatFigure } from "@/lib/reports/report-view";

type AnySeries = { id: string | number; data: readonly { x: number; y: number }[] };

/**
 * The tooltip of a line chart with slices: the x value under `heading`, then each line's y in its
 * colour. Shared so every line chart of a report reads the same.
 */
export function makeSliceTooltip(heading: (x: string) => string) {
  return function SliceTooltip<Series extends AnySeries>({ slice }: SliceTooltipProps<Series>) {
    return (
      <div className="rounded bg-white px-2 py-1 text-xs whitespace-nowrap shadow">
        <div className="font-semibold">{heading(String(slice.points[0]?.data.x))}</div>
        {slice.points.map((point) => (
          <div key={point.id} style={{ color: point.seriesColor }}>
            {point.seriesId}: {formatFigure(Number(point.data.y), 3)}
          </div>
        ))}
      </div>
    );
  };
}

/** The key under a line chart: a short stroke in each line's colour and its name, then any extra keys. */
export function LineLegend({
  entries,
  children,
}: {
  entries: { label: string; colour: string }[];
  children?: ReactNode;
}) {
  return (
    <ul className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft" aria-label="Curves">
      {entries.map((entry) => (
        <li key={entry.label} className="flex items-center gap-1.5">
          <span
            aria-hidden
            className="inline-block h-0.5 w-5"
            style={{ background: entry.colour }}
          />
          {entry.label}
        </li>
      ))}
      {children}
    </ul>
  );
}
