import type { PartitionSummary } from "@/lib/analysis/browser";
import {
  computeBarrierThreshold,
  formatFigure,
  VERDICT_LABELS,
  VERDICT_MEANINGS,
} from "@/lib/reports/report-view";
import { RatioRuler } from "./ratio-ruler";

const PANEL_TONES = {
  "local-updates": "border-verdigris/40 bg-verdigris-soft/50",
  "large-minibatch": "border-indigo/40 bg-indigo-soft/50",
  "no-clear-winner": "border-ink/15 bg-white",
} as const;

const HEADLINE_TONES = {
  "local-updates": "text-verdigris",
  "large-minibatch": "text-indigo",
  "no-clear-winner": "text-ink",
} as const;

/** Why the third bound is on the page although ρ ignores it. */
const ACCELERATED_NOTE =
  "The accelerated minibatch bound shows what minibatch SGD could reach with acceleration (momentum-style steps). It does not enter ρ or the verdict, which compare the two plain algorithms a team usually chooses between, each without acceleration.";

/** Which ζ² the barrier uses, and what the path chart's other values are for. */
const BARRIER_WHICH_ZETA = (zeta2Max: number) =>
  `The barrier uses ζ*² only, the ringed point at t = 1 in the path chart; the larger values earlier on the path (up to ζ² max = ${formatFigure(zeta2Max)}) enter the local SGD bound, not the barrier.`;

/** The answer first: the verdict, ρ against its thresholds, the barrier flag and the caveats. */
export function VerdictPanel({ summary }: { summary: PartitionSummary }) {
  const { advice, heterogeneity } = summary;
  const threshold = computeBarrierThreshold(summary);
  return (
    <section
      aria-labelledby="verdict-heading"
      className={`rounded-lg border p-6 print:break-inside-avoid ${PANEL_TONES[advice.verdict]}`}
    >
      <p className="text-xs font-semibold tracking-wide text-ink-soft uppercase">Verdict</p>
      <h2
        id="verdict-heading"
        className={`mt-1 text-3xl font-semibold tracking-tight ${HEADLINE_TONES[advice.verdict]}`}
      >
        {VERDICT_LABELS[advice.verdict]}
      </h2>
      <p className="mt-2 max-w-prose text-ink">{VERDICT_MEANINGS[advice.verdict]}</p>

      <div className="mt-5 grid gap-6 md:grid-cols-[minmax(0,520px)_1fr] print:grid-cols-1">
        <div>
          <p className="text-sm text-ink">
            <strong>
              ρ = local SGD bound / minibatch SGD bound = {formatFigure(advice.ratio)}
            </strong>{" "}
            for the plan of M = {advice.participants} participants per round, K ={" "}
            {advice.localSteps} local steps, R = {advice.rounds} rounds and batch size b ={" "}
            {advice.batchSize}.
          </p>
          <div className="mt-3">
            <RatioRuler ratio={advice.ratio} />
          </div>
        </div>
        <dl className="grid grid-cols-[auto_auto] justify-start gap-x-6 gap-y-1 self-start text-sm">
          <dt className="text-ink-soft">Local SGD bound</dt>
          <dd className="tabular-nums">{formatFigure(advice.local)}</dd>
          <dt className="text-ink-soft">Minibatch SGD bound</dt>
          <dd className="tabular-nums">{formatFigure(advice.minibatch)}</dd>
          <dt className="text-ink-soft">Accelerated minibatch</dt>
          <dd className="tabular-nums">{formatFigure(advice.acceleratedMinibatch)}</dd>
          <dt className="text-ink-soft">Crossover</dt>
          <dd>
            {advice.crossoverLocalSteps === null
              ? "none up to K = 4096"
              : `local SGD wins from K = ${advice.crossoverLocalSteps}`}
          </dd>
          <dd className="col-span-2 mt-2 max-w-xs text-xs text-ink-soft">{ACCELERATED_NOTE}</dd>
        </dl>
      </div>

      {advice.heterogeneityBarrier ? (
        <div
          role="note"
          className="mt-5 rounded-md border border-cadmium/50 bg-cadmium-soft px-4 py-3 text-sm text-ink"
        >
          <strong className="text-cadmium">Heterogeneity barrier.</strong> ζ*² ={" "}
          {formatFigure(heterogeneity.zeta2Star)}, the shards&apos; disagreement at the optimum, is
          at least H²B²/R = {formatFigure(threshold)}: with shards this different, local SGD cannot
          beat minibatch SGD order-wise for R = {advice.rounds}, however many local steps it takes.{" "}
          {BARRIER_WHICH_ZETA(heterogeneity.zeta2Max)}
        </div>
      ) : (
        <p className="mt-5 text-sm text-ink-soft">
          No heterogeneity barrier: ζ*² = {formatFigure(heterogeneity.zeta2Star)}, the shards&apos;
          disagreement at the optimum, is below H²B²/R = {formatFigure(threshold)} for R ={" "}
          {advice.rounds}. {BARRIER_WHICH_ZETA(heterogeneity.zeta2Max)}
        </p>
      )}

      <div className="mt-5">
        <h3 className="text-sm font-semibold text-ink">Caveats</h3>
        <ul className="mt-1 list-disc space-y-0.5 pl-5 text-sm text-ink-soft">
          {advice.caveats.map((caveat) => (
            <li key={caveat}>{caveat}</li>
          ))}
        </ul>
      </div>
    </section>
  );
}
