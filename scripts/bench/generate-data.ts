/**
 * Seeded synthetic benchmark data (invented, not a real dataset): class-conditional Gaussians with a
 * Dirichlet label-skewed partition. Shard m draws its class mix qₘ ~ Dir(α·1) and then rows with
 * labels from qₘ and features x ~ N(μ_label, I), μ_c ~ N(0, s²I). Writes one CSV with feature
 * columns f0…f{d−1}, a `label` column and a `shard` column.
 * The generator is a xorshift128+ (Vigna, 2014), seeded through splitmix64, so files are identical
 * on every machine.
 */
import { createWriteStream } from "node:fs";
import { once } from "node:events";

export interface BenchDataSpec {
  rows: number;
  features: number;
  classes: number;
  shards: number;
  alpha: number;
  seed: number;
}

class SeededRandom {
  private s0: bigint;
  private s1: bigint;
  private spare: number | null = null;

  constructor(seed: number) {
    let state = BigInt(seed);
    const next = () => {
      state = (state + 0x9e3779b97f4a7c15n) & 0xffffffffffffffffn;
      let z = state;
      z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & 0xffffffffffffffffn;
      z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & 0xffffffffffffffffn;
      return z ^ (z >> 31n);
    };
    this.s0 = next();
    this.s1 = next();
  }

  /** Uniform in [0, 1) with 53 random bits. */
  uniform(): number {
    let x = this.s0;
    const y = this.s1;
    this.s0 = y;
    x = (x ^ (x << 23n)) & 0xffffffffffffffffn;
    this.s1 = x ^ y ^ (x >> 17n) ^ (y >> 26n);
    return Number(((this.s1 + y) & 0xffffffffffffffffn) >> 11n) / 2 ** 53;
  }

  /** Standard normal by the polar Box–Muller method. */
  normal(): number {
    if (this.spare !== null) {
      const value = this.spare;
      this.spare = null;
      return value;
    }
    for (;;) {
      const u = 2 * this.uniform() - 1;
      const v = 2 * this.uniform() - 1;
      const s = u * u + v * v;
      if (s > 0 && s < 1) {
        const factor = Math.sqrt((-2 * Math.log(s)) / s);
        this.spare = v * factor;
        return u * factor;
      }
    }
  }

  /** Gamma(shape, 1) by Marsaglia & Tsang (ACM TOMS 26(3), 2000), boosted for shape < 1. */
  gamma(shape: number): number {
    if (shape < 1)
      return this.gamma(shape + 1) * Math.pow(this.uniform() || Number.MIN_VALUE, 1 / shape);
    const d = shape - 1 / 3;
    const c = 1 / Math.sqrt(9 * d);
    for (;;) {
      const x = this.normal();
      const v = (1 + c * x) ** 3;
      if (v <= 0) continue;
      const u = this.uniform();
      if (Math.log(u) < 0.5 * x * x + d - d * v + d * Math.log(v)) return d * v;
    }
  }
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
