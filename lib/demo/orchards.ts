import { SeededRandom } from "@/lib/math/random";

/**
 * The shipped demo: an invented cooperative of 24 orchards whose leaf sensors report a dozen
 * readings, each labelled with one of five canopy conditions. Four invented valleys differ in
 * climate, which shifts both the readings and how often each condition occurs, so partitioning by
 * orchard skews the label mix while a shuffled layout is close to IID. Demo only — no real
 * cooperative, place or dataset.
 */

export const CANOPY_CONDITIONS = [
  "healthy",
  "water-stressed",
  "nutrient-deficient",
  "fungal-spot",
  "frost-damaged",
] as const;

export const SENSOR_READINGS = [
  "leaf_temp_c",
  "leaf_humidity_pct",
  "chlorophyll_index",
  "nitrogen_index",
  "leaf_wetness_h",
  "stomatal_conductance",
  "canopy_ndvi",
  "sap_flow",
  "leaf_thickness_mm",
  "spore_count",
  "soil_moisture_pct",
  "light_par",
] as const;

/** Typical reading (centre, spread) on a healthy leaf. */
const BASELINE: readonly [number, number][] = [
  [22, 3],
  [65, 8],
  [42, 5],
  [3.1, 0.4],
  [4, 1.5],
  [0.32, 0.06],
  [0.72, 0.06],
  [18, 4],
  [0.28, 0.03],
  [120, 40],
  [31, 5],
  [1400, 250],
];

/** How each condition moves the readings, in units of their spread. */
const CONDITION_SHIFT: Record<(typeof CANOPY_CONDITIONS)[number], number[]> = {
  healthy: [0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0],
  "water-stressed": [1.2, -1.4, -0.4, 0, -0.8, -1.6, -0.9, -1.5, -0.6, -0.2, -1.8, 0.3],
  "nutrient-deficient": [0, 0, -1.7, -1.9, 0, -0.3, -0.8, -0.2, -0.4, 0, 0, 0],
  "fungal-spot": [-0.2, 1.1, -0.6, 0, 1.7, -0.2, -0.5, 0, 0.2, 2.2, 0.6, -0.3],
  "frost-damaged": [-1.9, 0.4, -0.9, -0.2, 0.6, -0.7, -1.1, -0.8, -1.2, 0.1, 0.2, -0.6],
};

/** Invented valleys: their climate shift (in spreads) and how common each condition is there. */
const VALLEYS = [
  {
    name: "alder-vale",
    climate: [1, -0.8, 0, 0, -0.5, 0, 0, 0, 0, 0, -0.9, 0.8],
    mix: [0.45, 0.4, 0.08, 0.05, 0.02],
  },
  {
    name: "brook-hollow",
    climate: [-0.3, 0.9, 0, 0, 0.8, 0, 0, 0, 0, 0.5, 0.7, -0.4],
    mix: [0.35, 0.03, 0.12, 0.48, 0.02],
  },
  {
    name: "cedar-basin",
    climate: [-1, 0.2, 0, 0, 0.2, 0, 0, 0, 0, 0, 0.2, -0.2],
    mix: [0.3, 0.05, 0.1, 0.1, 0.45],
  },
  {
    name: "dune-terrace",
    climate: [0.4, -0.4, -0.3, -0.6, 0, 0, 0, 0, 0, 0, -0.3, 0.5],
    mix: [0.3, 0.15, 0.45, 0.05, 0.05],
  },
] as const;

const ORCHARDS_PER_VALLEY = 6;
const SEED = 20261201;

export type DemoFiles = {
  /** row_id, the twelve readings, condition. */
  dataset: string;
  /** Partition map by orchard: row_id,shard. */
  byOrchard: string;
  /** The same rows dealt at random to 24 shards: row_id,shard. */
  shuffled: string;
};

/** Builds the demo's three CSV files; the same bytes on every machine. */
export function generateOrchardDemo(): DemoFiles {
  const random = new SeededRandom(SEED);
  const datasetLines = [["row_id", ...SENSOR_READINGS, "condition"].join(",")];
  const orchardLines = ["row_id,shard"];
  const rowIds: string[] = [];
  const mix = new Float64Array(CANOPY_CONDITIONS.length);
  let orchardNumber = 0;
  for (const valley of VALLEYS) {
    for (let local = 0; local < ORCHARDS_PER_VALLEY; local++) {
      orchardNumber += 1;
      const orchard = `orchard-${String(orchardNumber).padStart(2, "0")}-${valley.name}`;
      // Orchards in a valley share its tendencies but each has its own mix and size.
      random.dirichlet(
        valley.mix.map((share) => 1.5 * share + 0.02),
        mix,
      );
      const rows = 400 + random.integer(800);
      for (let row = 0; row < rows; row++) {
        const condition = pickIndex(mix, random.uniform());
        const readings = BASELINE.map(([centre, spread], feature) => {
          const shift =
            CONDITION_SHIFT[CANOPY_CONDITIONS[condition]][feature] + 2 * valley.climate[feature];
          const value = centre + spread * (shift + random.normal());
          // Every reading but temperature is a physical amount that cannot go below zero.
          return formatReading(feature === 0 ? value : Math.max(0, value));
        });
        const rowId = `r${String(rowIds.length + 1).padStart(5, "0")}`;
        rowIds.push(rowId);
        datasetLines.push([rowId, ...readings, CANOPY_CONDITIONS[condition]].join(","));
        orchardLines.push(`${rowId},${orchard}`);
      }
    }
  }
  const shuffledLines = ["row_id,shard"];
  for (const rowId of rowIds) {
    shuffledLines.push(`${rowId},shard-${String(1 + random.integer(24)).padStart(2, "0")}`);
  }
  return {
    dataset: `${datasetLines.join("\n")}\n`,
    byOrchard: `${orchardLines.join("\n")}\n`,
    shuffled: `${shuffledLines.join("\n")}\n`,
  };
}

function pickIndex(shares: Float64Array, draw: number): number {
  let cumulative = 0;
  for (let index = 0; index < shares.length; index++) {
    cumulative += shares[index];
    if (draw < cumulative) return index;
  }
  return shares.length - 1;
}

function formatReading(value: number): string {
  return Math.abs(value) >= 100 ? value.toFixed(1) : value.toPrecision(4);
}

/**
 * The plan both demo reports use: all 24 orchards each round, 100 local steps, 500 rounds, batches
 * of 256. Under it the orchard layout's heterogeneity makes large minibatches the better bet while
 * the shuffled layout favours local updates — the contrast the demo exists to show.
 */
export const DEMO_PLAN = { localSteps: 100, rounds: 500, batchSize: 256 } as const;
