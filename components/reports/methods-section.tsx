import type { PartitionSummary } from "@/lib/analysis/summary";
import { formatFigure } from "@/lib/reports/report-view";

type Method = { quantity: string; definition: string; source: string };

/**
 * The formulas and sources of methods.md, worded for a reader of one report. "(from memory)" marks
 * what methods.md recalls rather than checked in the printed source; it stays next to the source.
 */
const METHODS: Method[] = [
  {
    quantity: "Reference model",
    definition:
      "Multinomial logistic regression (least squares for regression) on standardized features with a bias; F_S(W) = (1/|S|) Σ ℓᵢ(W) + (λ/2)‖W without bias‖². Shard m has weight wₘ = nₘ/N, so F = Σ wₘ Fₘ. W* is solved to ‖∇F(W*)‖ ≤ 1e-8·max(1, ‖∇F(0)‖); B = ‖W* − W₀‖ with W₀ = 0.",
    source: "Standard; optimum checked against scikit-learn in Partita's tests",
  },
  {
    quantity: "ζ² (gradient dissimilarity)",
    definition:
      "Σₘ wₘ‖gₘ − ∇F‖² with gₘ = ∇Fₘ at the reference point; ζ*² is its value at W*. The uniform variant weights shards equally.",
    source:
      'Woodworth et al., "Minibatch vs Local SGD for Heterogeneous Distributed Learning", NeurIPS 2020 (from memory)',
  },
  {
    quantity: "ζ² max",
    definition:
      "Largest weighted ζ² on the path W_t = t·W*, t ∈ {0, ¼, ½, ¾, 1}: an empirical lower estimate of the uniform bound.",
    source: 'Karimireddy et al., "SCAFFOLD", ICML 2020, assumption A1',
  },
  {
    quantity: "Dissimilarity B(W)",
    definition: "√(Σₘ wₘ‖gₘ‖² / ‖∇F‖²); undefined where ∇F = 0.",
    source:
      'Li et al., "Federated Optimization in Heterogeneous Networks", MLSys 2020, Definition 3',
  },
  {
    quantity: "σ² (gradient noise)",
    definition:
      "Σₘ wₘ σₘ², σₘ² the population variance of per-row gradients on shard m; σ²_pooled = σ² + ζ² (law of total variance) is checked.",
    source: "Standard",
  },
  {
    quantity: "Smoothness H",
    definition: "Softmax: ½ λ_max(X̃ᵀX̃/N) + λ; least squares: λ_max(X̃ᵀX̃/N) + λ.",
    source: "Böhning, Ann. Inst. Stat. Math. 1992, diag(p) − ppᵀ ⪯ ½ I (from memory)",
  },
  {
    quantity: "Gradient agreement",
    definition:
      "Cosine similarity of gₘ(W₀) and gₖ(W₀) for every pair of shards (up to 200 shards).",
    source: "Standard",
  },
  {
    quantity: "Label skew",
    definition:
      "Per shard, against the pooled mix p: total variation ½Σ|q − p|; Hellinger √(1 − Σ√(qp)); Jensen–Shannon ½KL(q‖m) + ½KL(p‖m), m = (q + p)/2, in nats; KL(q‖p). Report level: rows-weighted means and maxima.",
    source:
      "Standard; Jensen–Shannon: Lin, IEEE Trans. Inf. Theory 37(1), 1991 (from memory); KL: Kullback 1959",
  },
  {
    quantity: "Dirichlet α̂",
    definition:
      "Maximizes Σₘ log DirMult(countsₘ | nₘ, α·p) over α ∈ [1e-3, 1e6]; α̂ near 1e6 is indistinguishable from an IID split.",
    source:
      'Partition model: Hsu et al., arXiv:1909.06335, 2019; likelihood: Minka, "Estimating a Dirichlet distribution", 2000',
  },
  {
    quantity: "Quantity skew",
    definition:
      "Gini of the shard sizes and their coefficient of variation (population std / mean).",
    source: "Standard",
  },
  {
    quantity: "Bounds",
    definition:
      "With σ_b² = σ²/b — minibatch SGD: HB²/R + σ_b B/√(MKR); accelerated minibatch SGD: HB²/R² + σ_b B/√(MKR); local SGD: HB²/(KR) + σ_b B/√(MKR) + (Hσ_b²B⁴)^⅓/(K^⅓R^⅔) + (Hζ²max B⁴)^⅓/R^⅔. Convex rates; constants and log factors dropped.",
    source:
      'Woodworth et al., "Is Local SGD Better than Minibatch SGD?", ICML 2020, and the NeurIPS 2020 heterogeneous follow-up (both from memory)',
  },
  {
    quantity: "Verdict",
    definition:
      "ρ = local / minibatch bound: ρ ≤ ½ local updates, ρ ≥ 2 large minibatches, otherwise no clear winner (nothing finer than a factor of two is claimed). Heterogeneity barrier: ζ*² ≥ H²B²/R, where local SGD cannot beat minibatch SGD order-wise.",
    source: "Woodworth et al., NeurIPS 2020 (from memory)",
  },
];

/** Listed only in reports that simulated the plan (methods.md §7). */
const SIMULATION_METHOD: Method = {
  quantity: "Simulation",
  definition:
    "On F with the report's preprocessing, λ and shards, from W₀ = 0: each round M shards drawn without replacement, minibatches of b rows drawn with replacement, weights wₘ renormalized. Minibatch SGD: one gradient on K·b rows per participant at the server point. Local SGD: K local steps, then the weighted average. Drift-corrected: SCAFFOLD option II with size-weighted control variates. Step size: the lowest final F over η = 2⁻ᵏ/H, k = 0…7, on one seed (diverged runs discarded), re-run on S seeds. ρ_sim = local / minibatch final F − F*, with the verdict's thresholds.",
  source:
    'Karimireddy et al., "SCAFFOLD", ICML 2020, Algorithm 1 (which weights clients equally; here by shard size)',
};

/** How every number was computed, with its source, and the checks a reviewer can read off. */
export function MethodsSection({ summary }: { summary: PartitionSummary }) {
  const { optimizer } = summary.model;
  const methods = summary.simulation ? [...METHODS, SIMULATION_METHOD] : METHODS;
  const { sigma2, zeta2, sigma2Pooled } = summary.heterogeneity;
  return (
    <section aria-labelledby="methods-heading" className="space-y-4 print:break-before-page">
      <h2 id="methods-heading" className="text-xl font-semibold text-ink">
        Methods and sources
      </h2>
      <div className="overflow-x-auto rounded-md border border-ink/10 bg-white">
        <table className="w-full text-left text-xs">
          <thead className="bg-paper-deep/60">
            <tr>
              <th scope="col" className="px-3 py-2">
                Quantity
              </th>
              <th scope="col" className="px-3 py-2">
                Definition
              </th>
              <th scope="col" className="px-3 py-2">
                Source
              </th>
            </tr>
          </thead>
          <tbody>
            {methods.map((method) => (
              <tr
                key={method.quantity}
                className="border-t border-ink/5 align-top print:break-inside-avoid"
              >
                <th scope="row" className="px-3 py-2 font-semibold whitespace-nowrap">
                  {method.quantity}
                </th>
                <td className="px-3 py-2">{method.definition}</td>
                <td className="px-3 py-2 text-ink-soft">{method.source}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="text-sm text-ink-soft">
        <h3 className="font-semibold text-ink">Checks on this report</h3>
        <ul className="mt-1 list-disc space-y-0.5 pl-5">
          <li>
            Reference fit {optimizer.converged ? "converged" : "did not converge"} in{" "}
            {optimizer.iterations} iterations: ‖∇F(W*)‖ = {formatFigure(optimizer.gradNorm)} against
            the threshold {formatFigure(optimizer.tolerance)}.
          </li>
          <li>
            Law of total variance: σ²_pooled = {formatFigure(sigma2Pooled, 6)}, σ² + ζ² ={" "}
            {formatFigure(sigma2 + zeta2, 6)}.
          </li>
          <li>
            λ = {formatFigure(summary.model.lambda)}; reference point: {summary.model.reference}.
          </li>
        </ul>
      </div>
    </section>
  );
}
