import type { Advice } from "./advise-plan";
import type { OmittedColumn, Task } from "./design";
import type { SimulationSummary } from "./simulation/simulate-plan";
import type { CsvFormat } from "./text-format";

/**
 * The machine-readable report of methods.md §6. The keys §6 lists have exactly its meanings; the
 * others add detail for the report page. Shards are in code-point order of their ids.
 */
export interface PartitionSummary {
  engineVersion: string;
  dataset: {
    /** Rows kept (label present, assigned to a shard). */
    rows: number;
    /** d, encoded features (bias excluded). */
    features: number;
    /** Number of classes C; null for regression. */
    classes: number | null;
    task: Task;
    /** Class names in code-point order; null for regression. */
    classNames: string[] | null;
  };
  shards: ShardSummary[];
  labelSkew: {
    tv: number;
    hellinger: number;
    js: number;
    kl: number;
    dirichletAlpha: number;
    max: { tv: number; hellinger: number; js: number; kl: number };
    /** Names of the label-skew categories: the classes, or decile bins for regression. */
    categories: string[];
    /** Pooled proportions p over `categories`. */
    pooled: number[];
    /**
     * Regression read from the rows: each decile bin's smallest and largest label value, in the
     * label's units, in the order of `categories`. Absent for classification, and for regression
     * from client digests, whose bins come from a histogram.
     */
    binRanges?: [number, number][];
  };
  quantitySkew: { gini: number; cv: number; min: number; max: number };
  model: {
    lambda: number;
    /** F at the reference point. */
    loss: number;
    /** ‖∇F‖ at the reference point. */
    gradNorm: number;
    /** B = ‖W* − W₀‖_F with W₀ = 0. */
    distance: number;
    reference: "optimum" | "zero" | "given";
    /** W*, in the format accepted as given reference weights. */
    optimum: { classes: string[] | null; features: string[]; weights: number[][] };
    optimizer: {
      converged: boolean;
      iterations: number;
      evaluations: number;
      /** ‖∇F(W*)‖ reached, and the threshold 1e-8·max(1, ‖∇F(0)‖). */
      gradNorm: number;
      tolerance: number;
    };
  };
  heterogeneity: {
    /** Weighted ζ² at the reference point. */
    zeta2: number;
    zeta2Uniform: number;
    /** Max of weighted ζ² over W_t = t·W*, t ∈ {0, ¼, ½, ¾, 1}. */
    zeta2Max: number;
    /** Weighted ζ² at W* (ζ*²). */
    zeta2Star: number;
    sigma2: number;
    sigma2Pooled: number;
    /** H from the curvature bound (methods.md §3). */
    smoothness: number;
    /** B(W) at the reference point; null where ∇F vanishes. */
    dissimilarity: number | null;
    path: { t: number; zeta2: number; dissimilarity: number | null; loss: number }[];
    /** Cosine of gₘ(W₀), gₖ(W₀) for every pair of shards; null above 200 shards. */
    gradientAgreement: (number | null)[][] | null;
  };
  advice: Advice;
  preprocessing: {
    /** Data rows in the file. */
    totalRows: number;
    droppedRowsMissingLabel: number;
    droppedRowsUnassigned: number;
    /** The encoding, delimiter and decimal mark a text dataset was read with (methods.md §1); null for Parquet. */
    format: CsvFormat | null;
    /** Per numeric column with bad values, how many were counted as missing by the user's choice. */
    badNumbersCountedMissing: { column: string; count: number }[];
    featureNames: string[];
    omittedColumns: OmittedColumn[];
    warnings: string[];
  };
  /** The simulation of methods.md §7, when one was asked for. */
  simulation?: SimulationSummary;
  /** Present when the report was built from client digests (methods.md §9), not from rows. */
  digests?: DigestProvenance;
}

/** What a report built from client digests was built from (methods.md §9). */
export interface DigestProvenance {
  /** SHA-256 of the encoding every digest quoted. */
  encodingHash: string;
  /** Per client: its shards and kept rows (what it sent: counts and sums, never a row). */
  clients: { client: string; shards: string[]; rows: number }[];
  /** Clients the analyst expected but closed the roster without. */
  missingClients: string[];
  /** Whether W* was fitted from the clients' evaluations (else the supplied point stands in). */
  fitted: boolean;
  /** Regression label skew comes from a 4096-cell histogram of the target (methods.md §9). */
  labelSkewFromHistogram: boolean;
}

export interface ShardSummary {
  id: string;
  rows: number;
  tv: number;
  hellinger: number;
  js: number;
  kl: number;
  /** ‖gₘ(ref)‖². */
  gradNorm2: number;
  /** σₘ² at the reference point. */
  sigma2: number;
  /** Fₘ at the reference point. */
  loss: number;
  classesPresent: number;
  effectiveClasses: number;
  featureShift: number;
  /** Rows per label-skew category. */
  labelCounts: number[];
}

export type AnalysisStage = "reading" | "encoding" | "fitting" | "measuring" | "advising";

export interface AnalysisProgress {
  stage: AnalysisStage;
  /** Progress within the stage, 0 to 1. */
  fraction: number;
}
