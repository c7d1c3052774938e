import type { PartitionSummary } from "@/lib/analysis/browser";
import { readKeyFigures } from "@/lib/reports/figure-readings";

/**
 * The numbers a reader checks first, each with what it is and where this split sits on its scale,
 * so the page explains itself to someone who did not run the analysis.
 */
export function KeyFigures({
  summary,
  shardCount,
}: {
  summary: PartitionSummary;
  shardCount: number;
}) {
  return (
    <section aria-label="Key figures" className="print:break-inside-avoid">
      <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3 print:grid-cols-2">
        {readKeyFigures(summary, shardCount).map((figure) => (
          <div
            key={figure.name}
            className="rounded-md border border-ink/10 bg-white px-3 py-2 print:break-inside-avoid"
          >
            <dt className="text-xs font-medium text-ink-soft">{figure.name}</dt>
            <dd className="text-lg font-semibold text-ink tabular-nums">{figure.value}</dd>
            <dd className="text-xs text-ink">{figure.what}</dd>
            <dd className="mt-1 text-xs text-ink-soft">{figure.scale}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}
