import type { PartitionSummary } from "@/lib/analysis/browser";
import { DIGEST_CAUTION } from "@/lib/federated/digest-caution";

const OMISSION_REASONS = {
  constant: "constant after standardizing",
  "too-many-levels": "more than 32 distinct text values",
  "all-missing": "no values",
};

/** What happened to the data before the model saw it: dropped rows, left-out columns, warnings. */
export function PreprocessingNotes({ summary }: { summary: PartitionSummary }) {
  const { preprocessing, dataset } = summary;
  // The summary carries the digests' caution for readers of its JSON; the page shows it among
  // its cautions, so not again here.
  const warnings = preprocessing.warnings.filter((warning) => warning !== DIGEST_CAUTION);
  return (
    <section
      aria-labelledby="preprocessing-heading"
      className="space-y-2 text-sm print:break-inside-avoid"
    >
      <h2 id="preprocessing-heading" className="text-xl font-semibold text-ink">
        Preprocessing
      </h2>
      <ul className="list-disc space-y-1 pl-5 text-ink-soft">
        <li>
          {preprocessing.totalRows.toLocaleString("en-US")} data rows read;{" "}
          {dataset.rows.toLocaleString("en-US")} kept.{" "}
          {preprocessing.droppedRowsMissingLabel > 0
            ? `${preprocessing.droppedRowsMissingLabel.toLocaleString("en-US")} dropped for a missing label. `
            : "No row lacked a label. "}
          {preprocessing.droppedRowsUnassigned > 0
            ? `${preprocessing.droppedRowsUnassigned.toLocaleString("en-US")} dropped because the partition map did not assign them.`
            : ""}
        </li>
        <li>
          {preprocessing.featureNames.length} encoded features:{" "}
          {preprocessing.featureNames.join(", ")}.
        </li>
        {preprocessing.omittedColumns.length > 0 ? (
          <li>
            Left out:{" "}
            {preprocessing.omittedColumns
              .map((column) => `${column.column} (${OMISSION_REASONS[column.reason]})`)
              .join("; ")}
            .
          </li>
        ) : (
          <li>No column was left out.</li>
        )}
      </ul>
      {warnings.length > 0 ? (
        <div className="rounded-md border border-cadmium/40 bg-cadmium-soft px-4 py-3">
          <h3 className="font-semibold text-ink">Warnings</h3>
          <ul className="mt-1 list-disc space-y-0.5 pl-5">
            {warnings.map((warning) => (
              <li key={warning}>{warning}</li>
            ))}
          </ul>
        </div>
      ) : null}
    </section>
  );
}
