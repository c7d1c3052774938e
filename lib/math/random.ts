/**
 * Partita's one seedable pseudo-random generator: xoshiro128** (Blackman & Vigna, "Scrambled linear
 * pseudorandom number generators", ACM TOMS 47(4), 2021), its 128-bit state filled from the seed by
 * splitmix32. 32-bit integer arithmetic only, so the same seed gives the same stream on every
 * machine and every JavaScript engine, and a draw allocates nothing.
 *
 * Example: `const random = new SeededRandom(7); random.uniform()` returns the same number in
 * [0, 1) on every run; `new SeededRandom(8)` starts a different stream.
 */
export class SeededRandom {
  /**
   * The four 32-bit state words. Typed-array slots hold any 32-bit value in place, where object
   * fields holding values beyond the engine's small-integer range would box each new value.
   */
  private readonly state = new Int32Array(4);
  private spareNormal = Number.NaN;

  constructor(seed: number) {
    let state = seed >>> 0;
    // splitmix32 (a 32-bit variant of Steele, Lea & Flood's SplitMix, from memory): decorrelates
    // nearby seeds so seeds 1, 2, 3 … give unrelated streams.
    const next = () => {
      state = (state + 0x9e3779b9) >>> 0;
      let z = state;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      return (z ^ (z >>> 16)) >>> 0;
    };
    const words = this.state;
    for (let k = 0; k < 4; k++) words[k] = next();
    // The all-zero state is the generator's one fixed point; splitmix32 never yields it for all four
    // words, but guard anyway so the invariant is local.
    if ((words[0] | words[1] | words[2] | words[3]) === 0) words[0] = 1;
  }

  /** Next 32 random bits as an unsigned integer (xoshiro128**). */
  nextUint32(): number {
    // Words a, b, c, d of the reference implementation are state[0 … 3].
    const s = this.state;
    const result = Math.imul(rotateLeft(Math.imul(s[1], 5), 7), 9) >>> 0;
    const t = s[1] << 9;
    s[2] ^= s[0];
    s[3] ^= s[1];
    s[1] ^= s[2];
    s[0] ^= s[3];
    s[2] ^= t;
    s[3] = rotateLeft(s[3], 11);
    return result;
  }

  /** Uniform in [0, 1) with 53 random bits (two draws). */
  uniform(): number {
    const high = this.nextUint32() >>> 5; // 27 bits
    const low = this.nextUint32() >>> 6; // 26 bits
    return (high * 67108864 + low) / 9007199254740992;
  }

  /** Uniform integer in [0, n), without modulo bias (Lemire-style rejection on 32 bits). */
  integer(n: number): number {
    if (!(n >= 1 && n <= 2 ** 32)) throw new RangeError(`integer(n) needs 1 ≤ n ≤ 2³², got ${n}`);
    const limit = 2 ** 32 - (2 ** 32 % n);
    for (;;) {
      const draw = this.nextUint32();
      if (draw < limit) return draw % n;
    }
  }

  /** Standard normal by the polar Box–Muller method (Marsaglia & Bray, 1964); pairs are cached. */
  normal(): number {
    if (!Number.isNaN(this.spareNormal)) {
      const value = this.spareNormal;
      this.spareNormal = Number.NaN;
      return value;
    }
    for (;;) {
      const u = 2 * this.uniform() - 1;
      const v = 2 * this.uniform() - 1;
      const s = u * u + v * v;
      if (s > 0 && s < 1) {
        const factor = Math.sqrt((-2 * Math.log(s)) / s);
        this.spareNormal = v * factor;
        return u * factor;
      }
    }
  }

  /** Gamma(shape, 1) by Marsaglia & Tsang (ACM TOMS 26(3), 2000), boosted for shape < 1. */
  gamma(shape: number): number {
    if (!(shape > 0)) throw new RangeError(`gamma(shape) needs shape > 0, got ${shape}`);
    if (shape < 1) {
      return this.gamma(shape + 1) * Math.pow(this.uniform() || Number.MIN_VALUE, 1 / shape);
    }
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

  /** A draw from Dirichlet(concentrations) via normalized gammas, written into `out`. */
  dirichlet(concentrations: readonly number[], out: Float64Array): Float64Array {
    let total = 0;
    for (let k = 0; k < concentrations.length; k++) {
      out[k] = this.gamma(concentrations[k]);
      total += out[k];
    }
    for (let k = 0; k < concentrations.length; k++) out[k] /= total;
    return out;
  }
}

function rotateLeft(value: number, bits: number): number {
  return ((value << bits) | (value >>> (32 - bits))) >>> 0;
}
