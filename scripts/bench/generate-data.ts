/**
 * Seeded synthetic benchmark data (invented, not a real dataset): class-conditional Gaussians with a
 * Dirichlet label-skewed partition. Shard m draws its class mix qₘ ~ Dir(α·1) and then rows with
 * labels from qₘ and features x ~ N(μ_label, I), μ_c ~ N(0, s²I). Writes one CSV with feature
 * columns f0…f{d−1}, a `label` column and a `shard` column.
 * The generator is Partita's seedable xoshiro128** (lib/math/random.ts), so files are identical on
 * every machine.
 */
import { createWriteStream } from "node:fs";
import { once } from "node:events";
import { SeededRandom } from "../../lib/math/random";

export interface BenchDataSpec {
  rows: number;
  features: number;
  classes: number;
  shards: number;
  alpha: number;
  seed: number;
}

/** Writes the CSV described by `spec` to `file`. */
export async function writeBenchData(file: string, spec: BenchDataSpec): Promise<void> {
  const random = new SeededRandom(spec.seed);
  const separation = 0.6;
  const means = Array.from({ length: spec.classes }, () =>
    Array.from({ length: spec.features }, () => separation * random.normal()),
  );
  const out = createWriteStream(file);
  const header = [...Array.from({ length: spec.features }, (_, j) => `f${j}`), "label", "shard"];
  let buffer = `${header.join(",")}\n`;
  for (let m = 0; m < spec.shards; m++) {
    const shares = Array.from({ length: spec.classes }, () => random.gamma(spec.alpha));
    const total = shares.reduce((a, b) => a + b, 0);
    const cumulative: number[] = [];
    shares.reduce((sum, share, c) => (cumulative[c] = sum + share / total), 0);
    const rowsInShard = Math.floor(spec.rows / spec.shards) + (m < spec.rows % spec.shards ? 1 : 0);
    for (let i = 0; i < rowsInShard; i++) {
      const draw = random.uniform();
      let label = cumulative.findIndex((edge) => draw < edge);
      if (label < 0) label = spec.classes - 1;
      const fields = means[label].map((mean) => (mean + random.normal()).toFixed(4));
      buffer += `${fields.join(",")},c${label},shard${String(m).padStart(3, "0")}\n`;
      if (buffer.length > 1 << 20) {
        if (!out.write(buffer)) await once(out, "drain");
        buffer = "";
      }
    }
  }
  out.end(buffer);
  await once(out, "finish");
}
