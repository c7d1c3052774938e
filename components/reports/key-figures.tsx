import type { PartitionSummary } from "@/lib/analysis/summary";
import { formatFigure } from "@/lib/reports/report-view";

/** α̂ is searched in [1e-3, 1e6] (methods.md §4); at the top it means "indistinguishable from IID". */
const ALPHA_CEILING = 1e6;

/** The handful of numbers a reader checks first, each with its symbol and a few words. */
export function KeyFigures({ summary }: { summary: PartitionSummary }) {
  const { dataset, heterogeneity, labelSkew, quantitySkew, model } = summary;
  const alpha = labelSkew.dirichletAlpha;
  const figures: { name: string; value: string; hint: string }[] = [
    {
      name: "Rows · shards",
      value: `${dataset.rows.toLocaleString("en-US")} · ${summary.shards.length.toLocaleString("en-US")}`,
      hint: `${dataset.features} encoded features, ${dataset.classes === null ? "regression" : `${dataset.classes} classes`}`,
    },
    {
      name: "ζ² at the reference",
      value: formatFigure(heterogeneity.zeta2),
      hint: "weighted gradient dissimilarity",
    },
    {
      name: "ζ² max on the path",
      value: formatFigure(heterogeneity.zeta2Max),
      hint: "used by the local SGD bound",
    },
    { name: "σ²", value: formatFigure(heterogeneity.sigma2), hint: "within-shard gradient noise" },
    { name: "H", value: formatFigure(heterogeneity.smoothness), hint: "smoothness bound" },
    { name: "B", value: formatFigure(model.distance), hint: "distance ‖W* − W₀‖ to the optimum" },
    {
      name: "Label skew",
      value: `TV ${formatFigure(labelSkew.tv)}`,
      hint: `weighted mean; largest ${formatFigure(labelSkew.max.tv)}`,
    },
    {
      name: "Dirichlet α̂",
      value: alpha >= ALPHA_CEILING * 0.999 ? "≈ IID" : formatFigure(alpha),
      hint: "small α̂ means skewed label mixes",
    },
    {
      name: "Quantity skew",
      value: `Gini ${formatFigure(quantitySkew.gini)}`,
      hint: `CV ${formatFigure(quantitySkew.cv)}; ${quantitySkew.min}–${quantitySkew.max} rows per shard`,
    },
  ];
  return (
    <section aria-label="Key figures" className="print:break-inside-avoid">
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-3 print:grid-cols-3">
        {figures.map((figure) => (
          <div key={figure.name} className="rounded-md border border-ink/10 bg-white px-3 py-2">
            <dt className="text-xs text-ink-soft">{figure.name}</dt>
            <dd className="text-lg font-semibold tabular-nums text-ink">{figure.value}</dd>
            <dd className="text-xs text-ink-faint">{figure.hint}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}
