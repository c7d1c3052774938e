import type { PartitionSummary } from "@/lib/analysis/browser";
import type { ReportInput } from "@/db/schema/analyses";
import { formatBytes } from "@/lib/uploads/file-rules";
import { formatFigure, VERDICT_LABELS } from "./report-view";

export type ComparedReport = {
  summary: PartitionSummary;
  inputs: ReportInput[];
  shardCount: number;
};

export interface ComparisonRow {
  group: "Verdict" | "Plan" | "Heterogeneity" | "Skew" | "Data";
  label: string;
  a: string;
  b: string;
  /** The two reports show different values at the precision the page shows them. */
  differs: boolean;
}

type Figure = [ComparisonRow["group"], string, (report: ComparedReport) => string];

const describeInputs = (report: ComparedReport, kind: ReportInput["kind"]) => {
  const input = report.inputs.find((candidate) => candidate.kind === kind);
  return input
    ? `${input.name} (${formatBytes(input.sizeBytes)}), SHA-256 ${input.sha256.slice(0, 12)}…`
    : "—";
};

const FIGURES: Figure[] = [
  ["Verdict", "Verdict", ({ summary }) => VERDICT_LABELS[summary.advice.verdict]],
  ["Verdict", "ρ = local / minibatch", ({ summary }) => formatFigure(summary.advice.ratio)],
  ["Verdict", "Local SGD bound", ({ summary }) => formatFigure(summary.advice.local)],
  ["Verdict", "Minibatch SGD bound", ({ summary }) => formatFigure(summary.advice.minibatch)],
  [
    "Verdict",
    "Crossover K",
    ({ summary }) => String(summary.advice.crossoverLocalSteps ?? "none up to 4096"),
  ],
  [
    "Verdict",
    "Heterogeneity barrier",
    ({ summary }) => (summary.advice.heterogeneityBarrier ? "yes" : "no"),
  ],
  ["Plan", "Participants M", ({ summary }) => String(summary.advice.participants)],
  ["Plan", "Local steps K", ({ summary }) => String(summary.advice.localSteps)],
  ["Plan", "Rounds R", ({ summary }) => String(summary.advice.rounds)],
  ["Plan", "Batch size b", ({ summary }) => String(summary.advice.batchSize)],
  [
    "Heterogeneity",
    "ζ² at the reference",
    ({ summary }) => formatFigure(summary.heterogeneity.zeta2),
  ],
  [
    "Heterogeneity",
    "ζ² max on the path",
    ({ summary }) => formatFigure(summary.heterogeneity.zeta2Max),
  ],
  [
    "Heterogeneity",
    "ζ*² at the optimum",
    ({ summary }) => formatFigure(summary.heterogeneity.zeta2Star),
  ],
  ["Heterogeneity", "σ²", ({ summary }) => formatFigure(summary.heterogeneity.sigma2)],
  ["Heterogeneity", "H", ({ summary }) => formatFigure(summary.heterogeneity.smoothness)],
  ["Heterogeneity", "B", ({ summary }) => formatFigure(summary.model.distance)],
  ["Skew", "Label skew, TV (weighted mean)", ({ summary }) => formatFigure(summary.labelSkew.tv)],
  ["Skew", "Label skew, JS (weighted mean)", ({ summary }) => formatFigure(summary.labelSkew.js)],
  ["Skew", "Dirichlet α̂ (total)", ({ summary }) => formatFigure(summary.labelSkew.dirichletAlpha)],
  [
    "Skew",
    "Dirichlet α̂ per class (α̂/C)",
    ({ summary }) =>
      formatFigure(
        summary.labelSkew.dirichletAlpha / Math.max(1, summary.labelSkew.categories.length),
      ),
  ],
  ["Skew", "Quantity skew, Gini", ({ summary }) => formatFigure(summary.quantitySkew.gini)],
  ["Skew", "Quantity skew, CV", ({ summary }) => formatFigure(summary.quantitySkew.cv)],
  ["Data", "Rows kept", ({ summary }) => summary.dataset.rows.toLocaleString("en-US")],
  ["Data", "Shards", ({ shardCount }) => shardCount.toLocaleString("en-US")],
  ["Data", "Encoded features", ({ summary }) => String(summary.dataset.features)],
  [
    "Data",
    "Classes",
    ({ summary }) =>
      summary.dataset.classes === null ? "regression" : String(summary.dataset.classes),
  ],
  ["Data", "Dataset", (report) => describeInputs(report, "dataset")],
  ["Data", "Partition map", (report) => describeInputs(report, "layout")],
];

/**
 * The figures a reviewer compares across two reports, each shown as the page shows it, marked
 * where they differ. Comparing the shown text (three significant digits) rather than the raw
 * numbers keeps optimizer-tolerance noise from lighting up every row.
 */
export function compareReports(a: ComparedReport, b: ComparedReport): ComparisonRow[] {
  return FIGURES.map(([group, label, read]) => {
    const left = read(a);
    const right = read(b);
    return { group, label, a: left, b: right, differs: left !== right };
  });
}
