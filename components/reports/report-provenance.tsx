import type { ReportDetail } from "@/db/queries/reports";
import { formatFigure } from "@/lib/reports/report-view";
import { formatBytes } from "@/lib/uploads/file-rules";

const INPUT_KINDS = { dataset: "Dataset", layout: "Partition map", weights: "Reference weights" };
const LISTED_FEATURES = 8;

function describeFeatures(features: string[] | undefined): string {
  if (!features) return "all usable columns";
  const listed = features.slice(0, LISTED_FEATURES).join(", ");
  const more = features.length - LISTED_FEATURES;
  return more > 0 ? `${listed} and ${more} more` : listed;
}

/** What was analysed and how: each input with its size and SHA-256, and the parameters. */
export function ReportProvenance({
  report,
}: {
  report: Pick<ReportDetail, "inputs" | "parameters" | "summary" | "engineVersion">;
}) {
  const { parameters } = report;
  const reference =
    typeof parameters.reference === "object"
      ? "given weights"
      : (parameters.reference ?? "optimum");
  const parameterRows: [string, string][] = [
    ["Label column", parameters.labelColumn],
    [
      "Shards from",
      report.summary.digests
        ? "each client's own data"
        : parameters.shardColumn
          ? `column ${parameters.shardColumn}`
          : "the partition map",
    ],
    ...(parameters.idColumn ? [["Id column", parameters.idColumn] as [string, string]] : []),
    ["Features", describeFeatures(parameters.features)],
    ["Task", report.summary.dataset.task],
    ["λ", formatFigure(report.summary.model.lambda)],
    ["Reference point", reference],
    ["Engine", `Partita engine ${report.engineVersion}`],
  ];
  return (
    <div className="grid gap-6 md:grid-cols-2 print:grid-cols-2 print:break-inside-avoid">
      <section aria-labelledby="inputs-heading" className="text-sm">
        <h2 id="inputs-heading" className="mb-1 font-semibold text-ink">
          Inputs as analysed
        </h2>
        {report.summary.digests ? (
          <p className="text-ink-soft">
            No file: the clients&apos; digests (see “Built from client digests”).
          </p>
        ) : null}
        <ul className="space-y-2">
          {report.inputs.map((input) => (
            <li key={input.objectKey}>
              <span className="text-ink-soft">{INPUT_KINDS[input.kind]}:</span>{" "}
              <span className="font-medium">{input.name}</span>{" "}
              <span className="text-ink-soft">({formatBytes(input.sizeBytes)})</span>
              <div className="font-mono text-[11px] break-all text-ink-soft">
                SHA-256 {input.sha256}
              </div>
            </li>
          ))}
        </ul>
      </section>
      <section aria-labelledby="parameters-heading" className="text-sm">
        <h2 id="parameters-heading" className="mb-1 font-semibold text-ink">
          Parameters
        </h2>
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5">
          {parameterRows.map(([name, value]) => (
            <div key={name} className="contents">
              <dt className="text-ink-soft">{name}</dt>
              <dd className="break-words">{value}</dd>
            </div>
          ))}
        </dl>
      </section>
    </div>
  );
}
