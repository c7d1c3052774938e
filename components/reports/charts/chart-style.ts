import type { BarCommonProps, BarDatum } from "@nivo/bar";

// @nivo/theming is not a direct dependency; its theme type is reachable through the bar package.
type ChartTheme = BarCommonProps<BarDatum>["theme"];

/** The palette of tailwind.config.ts as values, for chart libraries that need colours, not classes. */
export const PALETTE = {
  paper: "#f6f4ee",
  paperDeep: "#ece8dc",
  ink: "#1c2230",
  inkSoft: "#4a5266",
  inkFaint: "#8a90a0",
  cadmium: "#d9652b",
  cadmiumSoft: "#f6dccb",
  verdigris: "#2f8f83",
  verdigrisSoft: "#d3ece8",
  indigo: "#3d4a9e",
  indigoSoft: "#dcdff3",
} as const;

/**
 * Colours for label categories. None is a signal colour of the palette (verdigris and indigo mean
 * local updates and minibatches in a report), so a class never looks like a verdict. Twenty is the
 * most a classification report has (methods.md §1); regression has ten decile bins.
 */
export const CATEGORY_COLOURS = [
  "#5b6bbf",
  "#e0a33a",
  "#7a9e4d",
  "#b8577a",
  "#4f9bb8",
  "#8c6bb1",
  "#c97b4a",
  "#5e8c7a",
  "#a3a04a",
  "#6d7486",
  "#a9b2e3",
  "#f0cf8f",
  "#b9d39a",
  "#e3a6bd",
  "#a4d0e0",
  "#c6b2db",
  "#e8b894",
  "#a9c9bb",
  "#d6d39a",
  "#b5b9c4",
];

export const CHART_THEME: ChartTheme = {
  text: { fontFamily: "inherit", fontSize: 11, fill: PALETTE.inkSoft },
  axis: {
    domain: { line: { stroke: PALETTE.inkFaint, strokeWidth: 1 } },
    ticks: { line: { stroke: PALETTE.inkFaint, strokeWidth: 1 } },
    legend: { text: { fontSize: 12, fill: PALETTE.ink, fontWeight: 600 } },
  },
  grid: { line: { stroke: PALETTE.paperDeep, strokeWidth: 1 } },
  tooltip: {
    container: {
      background: "#ffffff",
      color: PALETTE.ink,
      fontSize: 12,
      borderRadius: 6,
      boxShadow: "0 2px 8px rgba(28, 34, 48, 0.15)",
    },
  },
};

/**
 * Shortens long user-given names (shard ids, class names) on an axis; tooltips and the per-shard
 * table show them whole. Keeps both ends, since shard names often share a prefix and differ only
 * at the end ("north-valley-orchard-07" vs "…-12").
 */
export function shortenLabel(label: string, length = 14): string {
  if (label.length <= length) return label;
  const tail = Math.max(3, Math.floor((length - 1) / 3));
  return `${label.slice(0, length - 1 - tail)}…${label.slice(-tail)}`;
}

/** A colour `weight` of the way from `from` to `to` (both #rrggbb), mixed channel by channel. */
export function mixColours(from: string, to: string, weight: number): string {
  const channel = (hex: string, index: number) =>
    parseInt(hex.slice(1 + index * 2, 3 + index * 2), 16);
  const mixed = [0, 1, 2].map((index) =>
    Math.round(channel(from, index) * (1 - weight) + channel(to, index) * weight)
      .toString(16)
      .padStart(2, "0"),
  );
  return `#${mixed.join("")}`;
}

/**
 * Colours for ordered categories (the decile bins of a regression target): a light-to-dark ramp,
 * so neighbouring bins look alike and the order reads at a glance.
 */
export function rampColours(count: number): string[] {
  return Array.from({ length: count }, (_, index) =>
    mixColours("#d4dcec", "#243056", count === 1 ? 1 : index / (count - 1)),
  );
}
