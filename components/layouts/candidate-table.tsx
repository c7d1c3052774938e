"use client";

import { useState } from "react";
import { VerdictChip } from "@/components/reports/verdict-chip";
import type { ComparisonRow } from "@/lib/layout-plans/comparison-view";
import { formatFigure } from "@/lib/reports/report-view";
import type { ActionResult } from "@/lib/actions/result";
import { AnalyseLayoutButton } from "./analyse-layout-button";

type SortKey = keyof Pick<
  ComparisonRow,
  | "name"
  | "tv"
  | "tvMax"
  | "js"
  | "jsMax"
  | "alpha"
  | "alphaPerClass"
  | "gini"
  | "zeta2Star"
  | "zeta2Max"
  | "sigma2"
  | "ratio"
>;

/** The sortable figures, in methods.md §8's order. */
const FIGURES: { key: SortKey; label: string; title: string }[] = [
  { key: "tv", label: "TV", title: "Weighted total variation of the label mixes" },
  { key: "tvMax", label: "TV max", title: "Largest total variation of one shard" },
  { key: "js", label: "JS", title: "Weighted Jensen–Shannon divergence" },
  { key: "jsMax", label: "JS max", title: "Largest Jensen–Shannon divergence of one shard" },
  { key: "alpha", label: "α̂", title: "Fitted Dirichlet concentration" },
  { key: "alphaPerClass", label: "α̂/C", title: "Fitted concentration per class" },
  { key: "gini", label: "Gini", title: "Gini coefficient of the shard sizes" },
  { key: "zeta2Star", label: "ζ*²", title: "Gradient heterogeneity at the optimum" },
  { key: "zeta2Max", label: "ζ² max", title: "Largest heterogeneity along the path to W*" },
  { key: "sigma2", label: "σ²", title: "Within-shard gradient noise" },
  {
    key: "ratio",
    label: "ρ",
    title: "Local bound / minibatch bound (lower favours local updates)",
  },
];

/**
 * One row per scored candidate, ranked by ρ then weighted JS until a heading is chosen; each
 * heading is a button (keyboard and screen reader: aria-sort), a second press reverses.
 */
export function CandidateTable({
  rows,
  workspaceId,
  planId,
  analyseCandidate,
}: {
  rows: ComparisonRow[];
  workspaceId: string;
  planId: string;
  /** The route's action that registers a candidate's map for analysis; absent for roles that cannot upload. */
  analyseCandidate?: (ordinal: number) => Promise<ActionResult<unknown>>;
}) {
  const [sort, setSort] = useState<{ key: SortKey | "rank"; descending: boolean }>({
    key: "rank",
    descending: false,
  });
  const ranked = rows.map((row, rank) => ({ row, rank }));
  const sorted =
    sort.key === "rank"
      ? ranked
      : [...ranked].sort((a, b) => {
          const key = sort.key as SortKey;
          const [x, y] = [a.row[key], b.row[key]];
          const order =
            typeof x === "string" || typeof y === "string"
              ? String(x).localeCompare(String(y))
              : (x ?? Infinity) - (y ?? Infinity);
          return sort.descending ? -order : order;
        });
  const sortBy = (key: SortKey | "rank") =>
    setSort((current) => ({
      key,
      descending: current.key === key ? !current.descending : false,
    }));
  const ariaSort = (key: SortKey | "rank") =>
    sort.key === key ? (sort.descending ? "descending" : "ascending") : "none";
  const heading = (key: SortKey | "rank", label: string, title?: string) => (
    <th scope="col" className="px-2 py-2 whitespace-nowrap" aria-sort={ariaSort(key)}>
      <button
        type="button"
        className="font-semibold hover:underline focus:underline"
        title={title}
        onClick={() => sortBy(key)}
      >
        {label}
        {sort.key === key ? (sort.descending ? " ↓" : " ↑") : ""}
      </button>
    </th>
  );

  return (
    <div className="relative overflow-x-auto rounded-lg border border-ink/10 bg-white">
      <table className="w-full text-left text-sm" data-testid="candidate-table">
        <caption className="sr-only">
          Scored candidates; choose a heading to sort by it, again to reverse.
        </caption>
        <thead className="bg-paper-deep/60 text-xs text-ink-soft">
          <tr>
            {heading("rank", "Rank", "By ρ, then by weighted JS")}
            {heading("name", "Candidate")}
            <th scope="col" className="px-2 py-2">
              Parameters
            </th>
            <th scope="col" className="px-2 py-2">
              Seed
            </th>
            {FIGURES.map((figure) => heading(figure.key, figure.label, figure.title))}
            <th scope="col" className="px-2 py-2">
              Verdict
            </th>
            <th scope="col" className="px-2 py-2" title="ζ*² ≥ H²B²/R">
              Barrier
            </th>
            <th scope="col" className="no-print px-2 py-2">
              <span className="sr-only">Downloads and analysis</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {sorted.map(({ row, rank }) => (
            <tr key={row.ordinal} className="border-t border-ink/5">
              <td className="px-2 py-1.5 tabular-nums">{rank + 1}</td>
              <th scope="row" className="px-2 py-1.5 font-mono font-medium whitespace-nowrap">
                {row.generator}
              </th>
              <td className="px-2 py-1.5 whitespace-nowrap">{row.parameters}</td>
              <td className="px-2 py-1.5 tabular-nums">{row.seed}</td>
              {FIGURES.map((figure) => (
                <td key={figure.key} className="px-2 py-1.5 tabular-nums whitespace-nowrap">
                  {formatFigure(row[figure.key] as number | null)}
                </td>
              ))}
              <td className="px-2 py-1.5">
                <VerdictChip verdict={row.verdict} />
              </td>
              <td className="px-2 py-1.5">{row.barrier ? "yes" : "no"}</td>
              <td className="no-print px-2 py-1.5">
                <span className="flex items-center gap-2">
                  <a
                    className="text-xs whitespace-nowrap underline"
                    href={`/api/workspaces/${workspaceId}/layout-plans/${planId}/candidates/${row.ordinal}/map.csv`}
                    download
                  >
                    {row.name}.csv
                  </a>
                  {analyseCandidate ? (
                    <AnalyseLayoutButton
                      analyse={() => analyseCandidate(row.ordinal)}
                      newAnalysisUrl={`/w/${workspaceId}/analyses/new?layoutPlan=${planId}&candidate=${row.ordinal}`}
                      name={row.name}
                    />
                  ) : null}
                </span>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
