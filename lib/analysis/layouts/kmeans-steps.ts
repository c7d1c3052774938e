/**
 * The per-point work of the clusters generator's k-means (split-clusters.ts, lloyd-iterations.ts),
 * as steps over a range of points that any thread can run (pass-jobs.ts): the pass pool splits
 * the points into chunks and its threads share them, while the sums over all points stay with the
 * caller, in point order. A step writes only its own points' entries, and writes the same values
 * when run twice (as the pool does when a thread is slow to finish a chunk), so the centres are
 * the same bit for bit on any number of threads.
 */
import type { Matrix } from "../../math/matrix";

/**
 * Relative margin of every bound test: far above the rounding the bounds gather, so a distance is
 * skipped only when measuring it could not change the outcome.
 */
export const BOUND_MARGIN = 1e-9;

/** Per point, the squared distance to its nearest centre and that centre's index. */
export interface NearestCentres {
  distance: Float64Array;
  centre: Int32Array;
}

/** Per point, its centre, the squared distance to it as last measured, and an upper bound on it. */
export interface PointBounds {
  assigned: Int32Array;
  ownDistance: Float64Array;
  upper: Float64Array;
}

export type KMeansStep =
  | {
      /**
       * k-means++'s distances to the trial centres of a round (points `trials` of the rows),
       * `placed` centres placed so far at squared distances `centreToCentre` from them (trial t's
       * from t·k on): per point and trial the nearer of its nearest centre so far and the trial,
       * written to the trial's `into` (as many trials as `into` has).
       */
      kind: "seed-distances";
      trials: Int32Array;
      placed: number;
      centreToCentre: Float64Array;
      nearest: NearestCentres;
      into: NearestCentres[];
    }
  | {
      /** Lloyd's first assignment: every distance measured, each a lower bound for later. */
      kind: "first-assignment";
      centres: Float64Array;
      lowerPlusTravel: Float64Array;
      into: PointBounds;
    }
  | {
      /**
       * A later assignment with Elkan's bounds (see lloyd-iterations.ts), read from `from` and
       * written to `into`, so a chunk run twice starts from the same bounds.
       */
      kind: "bounded-assignment";
      centres: Float64Array;
      halfGaps: Float64Array;
      travelled: Float64Array;
      slack: number;
      lowerPlusTravel: Float64Array;
      from: PointBounds;
      into: PointBounds;
    }
  | {
      /** Every row of the design (bias last) to its nearest centre, ties to the lower index. */
      kind: "nearest-centre";
      centres: Float64Array;
      shards: Int32Array;
    };

/** Rows the steps run over, on one thread or shared by a pass pool's threads. */
export interface KMeansRows {
  run(step: KMeansStep): void;
}

/** Makes rows ready for the steps (the pass pool's `shareKMeansRows`, or `onThisThread`). */
export type ShareKMeansRows = (rows: Matrix) => KMeansRows;

/** The steps on the calling thread alone. */
export const onThisThread: ShareKMeansRows = (rows) => ({
  run: (step) => runKMeansStep(step, rows, 0, rows.rows),
});

export function sharedDoubles(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * Float64Array.BYTES_PER_ELEMENT));
}

export function sharedIntegers(length: number): Int32Array {
  return new Int32Array(new SharedArrayBuffer(length * Int32Array.BYTES_PER_ELEMENT));
}

export function createPointBounds(count: number): PointBounds {
  return {
    assigned: sharedIntegers(count),
    ownDistance: sharedDoubles(count),
    upper: sharedDoubles(count),
  };
}

/** Runs `step` over points `start` … `end` of `rows` (the centres' width: the rows' for k-means). */
export function runKMeansStep(step: KMeansStep, rows: Matrix, start: number, end: number): void {
  switch (step.kind) {
    case "seed-distances":
      return measureSeedDistances(step, rows, start, end);
    case "first-assignment":
      return assignFirst(step, rows, start, end);
    case "bounded-assignment":
      return assignWithBounds(step, rows, start, end);
    case "nearest-centre":
      return assignNearest(step, rows, start, end);
  }
}

/**
 * A trial centre at more than twice a point's distance from the point's nearest centre cannot be
 * nearer (triangle inequality), so that distance is not measured.
 */
function measureSeedDistances(
  step: Extract<KMeansStep, { kind: "seed-distances" }>,
  { data: values, cols: width }: Matrix,
  start: number,
  end: number,
): void {
  const { trials, placed, centreToCentre, nearest, into } = step;
  const k = centreToCentre.length / trials.length;
  for (let other = start; other < end; other++) {
    const known = nearest.distance[other];
    const knownCentre = nearest.centre[other];
    for (let trial = 0; trial < into.length; trial++) {
      const { distance: intoDistance, centre: intoCentre } = into[trial];
      if (placed > 0 && centreToCentre[trial * k + knownCentre] > 4 * known * (1 + BOUND_MARGIN)) {
        intoDistance[other] = known;
        intoCentre[other] = knownCentre;
        continue;
      }
      let distance = 0;
      for (let j = 0, o = other * width, at = trials[trial] * width; j < width; j++, o++, at++) {
        const difference = values[o] - values[at];
        distance += difference * difference;
      }
      const closer = distance < known;
      intoDistance[other] = closer ? distance : known;
      intoCentre[other] = closer ? placed : knownCentre;
    }
  }
}

/** Squared distance of point `point` to centre `centre`, summed as ml-kmeans sums it. */
function squaredDistance(
  values: Float64Array,
  centres: Float64Array,
  width: number,
  point: number,
  centre: number,
): number {
  let distance = 0;
  for (let j = 0, p = point * width, c = centre * width; j < width; j++, p++, c++) {
    distance += (values[p] - centres[c]) * (values[p] - centres[c]);
  }
  return distance;
}

function assignFirst(
  { centres, lowerPlusTravel, into }: Extract<KMeansStep, { kind: "first-assignment" }>,
  { data: values, cols: width }: Matrix,
  start: number,
  end: number,
): void {
  const k = centres.length / width;
  for (let point = start; point < end; point++) {
    let best = -1;
    let bestDistance = Number.MAX_VALUE;
    for (let centre = 0; centre < k; centre++) {
      const distance = squaredDistance(values, centres, width, point, centre);
      lowerPlusTravel[point * k + centre] = Math.sqrt(distance);
      if (distance < bestDistance) {
        bestDistance = distance;
        best = centre;
      }
    }
    into.assigned[point] = best;
    into.ownDistance[point] = bestDistance;
    into.upper[point] = Math.sqrt(bestDistance);
  }
}

/**
 * A centre is ruled out only with a margin far above the rounding the bounds gather, so every
 * centre not ruled out is measured and the nearest is the one a full scan picks. A lower bound is
 * only ever replaced by a measured distance, so a chunk run by two threads at once reads valid
 * bounds whichever thread wrote them.
 */
function assignWithBounds(
  step: Extract<KMeansStep, { kind: "bounded-assignment" }>,
  { data: values, cols: width }: Matrix,
  start: number,
  end: number,
): void {
  const { centres, halfGaps, travelled, slack, lowerPlusTravel, from, into } = step;
  const k = centres.length / width;
  for (let point = start; point < end; point++) {
    let own = from.assigned[point];
    let ownDistance = from.ownDistance[point];
    let upper = from.upper[point];
    let threshold = upper * (1 + BOUND_MARGIN) + slack;
    let tight = false;
    for (let centre = 0, at = point * k; centre < k; centre++, at++) {
      if (centre === own) continue;
      if (lowerPlusTravel[at] - travelled[centre] > threshold) continue;
      if (halfGaps[own * k + centre] > threshold) continue;
      if (!tight) {
        // The own centre's distance, measured once a centre is not ruled out by the bound.
        tight = true;
        ownDistance = squaredDistance(values, centres, width, point, own);
        upper = Math.sqrt(ownDistance);
        lowerPlusTravel[point * k + own] = upper + travelled[own];
        threshold = upper * (1 + BOUND_MARGIN) + slack;
        if (lowerPlusTravel[at] - travelled[centre] > threshold) continue;
        if (halfGaps[own * k + centre] > threshold) continue;
      }
      const distance = squaredDistance(values, centres, width, point, centre);
      lowerPlusTravel[at] = Math.sqrt(distance) + travelled[centre];
      if (distance < ownDistance || (distance === ownDistance && centre < own)) {
        own = centre;
        ownDistance = distance;
        upper = Math.sqrt(distance);
        threshold = upper * (1 + BOUND_MARGIN) + slack;
      }
    }
    into.assigned[point] = own;
    into.ownDistance[point] = ownDistance;
    into.upper[point] = upper;
  }
}

function assignNearest(
  { centres, shards }: Extract<KMeansStep, { kind: "nearest-centre" }>,
  { data, cols }: Matrix,
  start: number,
  end: number,
): void {
  const width = cols - 1; // the bias is the same for every row
  const k = centres.length / width;
  for (let row = start; row < end; row++) {
    const offset = row * cols;
    let best = 0;
    let bestDistance = Infinity;
    for (let m = 0; m < k; m++) {
      let distance = 0;
      for (let j = 0; j < width; j++) distance += (data[offset + j] - centres[m * width + j]) ** 2;
      if (distance < bestDistance) {
        bestDistance = distance;
        best = m;
      }
    }
    shards[row] = best;
  }
}
