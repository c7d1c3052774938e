import type { PartitionSummary } from "@/lib/analysis/browser";
import { computeBoundCurves, readBoundInputs } from "@/lib/reports/bound-curves";
import { TOP_CHART_SHARDS } from "@/lib/reports/chart-shards";
import { computeRegimeMap } from "@/lib/reports/regime-map";
import {
  buildLabelMix,
  computeBarrierThreshold,
  selectDivergenceCandidates,
} from "@/lib/reports/report-view";
import { AgreementHeatmap } from "./charts/agreement-heatmap";
import { BoundCurvesChart } from "./charts/bound-curves-chart";
import { DivergenceChart } from "./charts/divergence-chart";
import { LabelMixChart } from "./charts/label-mix-chart";
import { LabelBinTable } from "./label-bin-table";
import { PathChart } from "./charts/path-chart";
import { RegimeMapChart } from "./charts/regime-map-chart";
import { ChartEmptyState, EvidenceSection } from "./evidence-section";

/** Bars per chart before a chart shows only the most divergent shards (at most TOP_CHART_SHARDS). */
const LABEL_MIX_CAP = 30;
const DIVERGENCE_CAP = TOP_CHART_SHARDS;

/**
 * The charts behind the verdict, in the order a reader checks them. `summary.shards` holds the
 * shards the charts draw (all, or the most divergent: see findReport); `shardCount` counts all.
 */
export function ReportEvidence({
  summary,
  shardCount,
}: {
  summary: PartitionSummary;
  shardCount: number;
}) {
  const { shards, heterogeneity, advice, labelSkew } = summary;
  const labelMix = buildLabelMix(summary, LABEL_MIX_CAP, shardCount);
  const inputs = readBoundInputs(summary);
  const curves = computeBoundCurves(inputs);
  const regimeMap = computeRegimeMap(inputs);
  const agreement = heterogeneity.gradientAgreement;
  return (
    <section aria-labelledby="evidence-heading">
      <h2
        id="evidence-heading"
        className="mb-4 text-xl font-semibold text-ink print:break-after-avoid"
      >
        Evidence
      </h2>
      <div className="grid gap-6 lg:grid-cols-2 print:block print:space-y-6">
        <EvidenceSection
          id="label-mix"
          title="Label mix per shard"
          caption="Each bar is one shard's mix of labels and the top bar is the whole dataset, so a bar that looks unlike the top one holds a skewed share of the labels."
          note={
            labelMix.capped
              ? `Showing the ${labelMix.shownShards} most divergent of ${labelMix.totalShards} shards (by total variation), most divergent first; the table below lists every shard.`
              : undefined
          }
        >
          {shards.length === 0 || labelMix.categories.length === 0 ? (
            <ChartEmptyState>
              This report has no shards or no label categories to show.
            </ChartEmptyState>
          ) : (
            <>
              <LabelMixChart
                bars={labelMix.bars}
                categories={labelMix.categories}
                ordered={summary.dataset.task === "regression"}
                label={`Stacked bars: the label mix of ${labelMix.shownShards} shards beside the pooled mix.`}
              />
              {summary.labelSkew.binRanges ? (
                <LabelBinTable
                  categories={summary.labelSkew.categories}
                  ranges={summary.labelSkew.binRanges}
                  pooled={summary.labelSkew.pooled}
                />
              ) : null}
            </>
          )}
        </EvidenceSection>

        <EvidenceSection
          id="divergence"
          title="Divergence per shard"
          caption="How far each shard's label mix is from the pooled mix, largest first; the dashed line is the average weighted by shard size."
          note={
            shardCount > DIVERGENCE_CAP
              ? `Showing the ${DIVERGENCE_CAP} largest of ${shardCount} shards.`
              : undefined
          }
        >
          {shards.length === 0 ? (
            <ChartEmptyState>This report has no shards.</ChartEmptyState>
          ) : (
            <DivergenceChart
              shards={selectDivergenceCandidates(shards, DIVERGENCE_CAP)}
              weightedMean={{ tv: labelSkew.tv, js: labelSkew.js }}
              cap={DIVERGENCE_CAP}
              label="Bar chart: label-mix divergence of each shard from the pooled mix, largest first."
            />
          )}
        </EvidenceSection>

        <EvidenceSection
          id="agreement"
          title="Gradient agreement between shards"
          caption="Whether two shards' gradients point the same way at the start of training. Each cell is one pair: the darker it is, the more the pair pulls together (cosine near +1); the warmer its tint, the more the pair pulls against each other (near −1); pale cells are unrelated (near 0). The key below the chart gives the scale; hover or tap a cell for its value."
        >
          {agreement === null ? (
            <ChartEmptyState>
              Not computed: with {shardCount} shards (more than 200) the matrix would be too large
              to read. The per-shard table still lists each shard&apos;s gradient norm.
            </ChartEmptyState>
          ) : shards.length < 2 ? (
            <ChartEmptyState>Agreement needs at least two shards.</ChartEmptyState>
          ) : (
            <AgreementHeatmap
              names={shards.map((shard) => shard.id)}
              matrix={agreement}
              label={`Heat map: cosine similarity of the gradients of ${shards.length} shards, pair by pair.`}
            />
          )}
        </EvidenceSection>

        <EvidenceSection
          id="path"
          title="ζ² along the path to the optimum"
          caption="How much the shards' gradients disagree (weighted ζ²) at five points on the straight path from the training start (t = 0) to the optimum (t = 1). The local SGD bound uses the largest of the five (ζ² max). The heterogeneity barrier compares only the last point, ζ*² at the optimum (the ringed point), with the dashed line H²B²/R: earlier points above the line do not make a barrier, they show that shards disagree more on the way than at the end."
        >
          {heterogeneity.path.length === 0 ? (
            <ChartEmptyState>The engine recorded no path for this report.</ChartEmptyState>
          ) : (
            <PathChart
              points={heterogeneity.path.map((point) => ({ t: point.t, zeta2: point.zeta2 }))}
              barrierThreshold={computeBarrierThreshold(summary)}
              label="Line chart: weighted ζ² at five points from the training start to the optimum, with the heterogeneity barrier as a dashed line."
            />
          )}
        </EvidenceSection>

        <EvidenceSection
          id="bounds"
          title="Bounds against local steps"
          caption="The three convergence bounds for your plan as the local steps per round grow; where the local SGD curve drops below minibatch SGD's, local updates start to pay."
        >
          {curves.drawable ? (
            <BoundCurvesChart
              points={curves.points}
              planLocalSteps={advice.localSteps}
              crossoverLocalSteps={curves.crossoverLocalSteps}
              label={`Line chart on logarithmic axes: local, minibatch and accelerated minibatch SGD bounds for K from 1 to 4096; your plan's K = ${advice.localSteps} is marked${curves.crossoverLocalSteps === null ? " and local SGD never crosses below minibatch SGD" : `, and the crossover at K = ${curves.crossoverLocalSteps}`}.`}
            />
          ) : (
            <ChartEmptyState>
              The bounds are zero or undefined for this report (for example when the optimum is the
              training start, B = 0), so there is nothing to draw on a logarithmic scale.
            </ChartEmptyState>
          )}
        </EvidenceSection>

        <EvidenceSection
          id="regime-map"
          title="Regime map"
          caption="The verdict for every combination of local steps and rounds, everything else as in your plan; the outlined cell is your plan."
        >
          {regimeMap.log10Ratio.flat().every((value) => value === null) ? (
            <ChartEmptyState>
              Both bounds vanish everywhere for this report, so ρ is undefined on the whole map.
            </ChartEmptyState>
          ) : (
            <RegimeMapChart
              map={regimeMap}
              label={`Heat map of the verdict over local steps K (rows) and rounds R (columns); your plan K = ${advice.localSteps}, R = ${advice.rounds} is outlined.`}
            />
          )}
        </EvidenceSection>
      </div>
    </section>
  );
}
