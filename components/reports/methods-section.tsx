import type { PartitionSummary } from "@/lib/analysis/browser";
import { formatFigure } from "@/lib/reports/report-view";

type Method = { quantity: string; definition: string; source: string };

/**
 * Full citations as a reader can look them up. Titles, venues and years are methods.md's; the
 * author lists were completed from memory (from memory), and methods.md marks the Woodworth et al.
 * statements, Böhning's bound, Lin's definition and the bound constants as recalled rather than
 * checked in print (from memory) — those marks live here and in the tests, not on the page.
 */
const SOURCES = {
  woodworthHeterogeneous:
    'B. Woodworth, K. K. Patel, N. Srebro, "Minibatch vs Local SGD for Heterogeneous Distributed Learning", Advances in Neural Information Processing Systems (NeurIPS), 2020',
  woodworthLocal:
    'B. Woodworth, K. K. Patel, S. U. Stich, Z. Dai, B. Bullins, H. B. McMahan, O. Shamir, N. Srebro, "Is Local SGD Better than Minibatch SGD?", International Conference on Machine Learning (ICML), 2020',
  scaffold:
    'S. P. Karimireddy, S. Kale, M. Mohri, S. J. Reddi, S. U. Stich, A. T. Suresh, "SCAFFOLD: Stochastic Controlled Averaging for Federated Learning", International Conference on Machine Learning (ICML), 2020',
  fedprox:
    'T. Li, A. K. Sahu, M. Zaheer, M. Sanjabi, A. Talwalkar, V. Smith, "Federated Optimization in Heterogeneous Networks", Proceedings of Machine Learning and Systems (MLSys), 2020',
  bohning:
    'D. Böhning, "Multinomial logistic regression algorithm", Annals of the Institute of Statistical Mathematics 44(1), 1992',
  lin: 'J. Lin, "Divergence measures based on the Shannon entropy", IEEE Transactions on Information Theory 37(1), 1991',
  kullback: 'S. Kullback, "Information Theory and Statistics", Wiley, 1959',
  hsu: 'T.-M. H. Hsu, H. Qi, M. Brown, "Measuring the Effects of Non-Identical Data Distribution for Federated Visual Classification", arXiv:1909.06335, 2019',
  minka: 'T. P. Minka, "Estimating a Dirichlet distribution", technical report, 2000',
} as const;

/** The formulas and sources of methods.md, worded for a reader of one report. */
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
    source: SOURCES.woodworthHeterogeneous,
  },
  {
    quantity: "ζ² max",
    definition:
      "Largest weighted ζ² on the path W_t = t·W*, t ∈ {0, ¼, ½, ¾, 1}: an empirical lower estimate of the uniform bound.",
    source: `${SOURCES.scaffold}, assumption A1`,
  },
  {
    quantity: "Dissimilarity B(W)",
    definition: "√(Σₘ wₘ‖gₘ‖² / ‖∇F‖²); undefined where ∇F = 0.",
    source: `${SOURCES.fedprox}, Definition 3`,
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
    source: `${SOURCES.bohning}: diag(p) − ppᵀ ⪯ ½ I`,
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
    source: `Standard; Jensen–Shannon: ${SOURCES.lin}; KL: ${SOURCES.kullback}`,
  },
  {
    quantity: "Dirichlet α̂",
    definition:
      "Maximizes Σₘ log DirMult(countsₘ | nₘ, α·p) over α ∈ [1e-3, 1e6]; α̂ near 1e6 is indistinguishable from an IID split. α̂ is the total concentration; α̂/C, per class, is comparable with a split made as Dirichlet(β) per class (α = β·C).",
    source: `Partition model: ${SOURCES.hsu}; likelihood: ${SOURCES.minka}`,
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
    source: `${SOURCES.woodworthLocal}; ${SOURCES.woodworthHeterogeneous}`,
  },
  {
    quantity: "Verdict",
    definition:
      "ρ = local / minibatch bound: ρ ≤ ½ local updates, ρ ≥ 2 large minibatches, otherwise no clear winner (nothing finer than a factor of two is claimed). The accelerated bound is shown for reference and does not enter ρ. Heterogeneity barrier: ζ*² (at the optimum, not ζ² max) ≥ H²B²/R, where local SGD cannot beat minibatch SGD order-wise.",
    source: SOURCES.woodworthHeterogeneous,
  },
];

/** Listed only in reports that simulated the plan (methods.md §7). */
const SIMULATION_METHOD: Method = {
  quantity: "Simulation",
  definition:
    "On F with the report's preprocessing, λ and shards, from W₀ = 0: each round M shards drawn without replacement, minibatches of b rows drawn with replacement, weights wₘ renormalized. Minibatch SGD: one gradient on K·b rows per participant at the server point. Local SGD: K local steps, then the weighted average. Drift-corrected: SCAFFOLD option II with size-weighted control variates. Step size: the lowest final F over η = 2⁻ᵏ/H, k = 0…7, on one seed (diverged runs discarded), re-run on S seeds. ρ_sim = local / minibatch final F − F*, with the verdict's thresholds.",
  source: `${SOURCES.scaffold}, Algorithm 1 (which weights clients equally; here by shard size)`,
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
