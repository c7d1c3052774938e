import type { FederatedStatus } from "@/lib/federated";

const REFERENCE_LABELS: Record<FederatedStatus["reference"], string> = {
  optimum: "Pooled optimum W* (clients stay connected during the fit)",
  zero: "Zero",
  weights: "Supplied weights (the team's current model)",
};

/** What every client measures and the plan advised on, as the analysis was created. */
export function FederatedOptions({ status }: { status: FederatedStatus }) {
  const { plan } = status;
  const rows: [string, string][] = [
    ["Label column", status.labelColumn],
    [
      "Features",
      status.features ? status.features.join(", ") : "All columns but label, id and shard",
    ],
    ["Task", status.task ?? "Detected from the label"],
    ["λ", String(status.lambda)],
    ["Reference point", REFERENCE_LABELS[status.reference]],
    [
      "Plan",
      `${plan.participants === undefined ? "all shards" : `M = ${plan.participants}`}, K = ${plan.localSteps}, R = ${plan.rounds}, b = ${plan.batchSize}`,
    ],
    ["Minimum rows per shard", String(status.minimumShardRows)],
    ["Encoding", status.encodingHash ? `SHA-256 ${status.encodingHash}` : "Not yet (round 1)"],
  ];
  return (
    <section aria-labelledby="options-heading" className="space-y-2">
      <h2 id="options-heading" className="text-lg font-semibold">
        Options
      </h2>
      <dl className="grid gap-x-6 gap-y-1 rounded-lg border border-ink/10 bg-white p-4 text-sm sm:grid-cols-[max-content_1fr]">
        {rows.map(([term, value]) => (
          <div key={term} className="contents">
            <dt className="text-ink-soft">{term}</dt>
            <dd className="break-all">{value}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}
