import { InputError } from "./errors.js";
/**
 * Seeded pseudo-random generator: xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom
 * number generators", 2018), seeded through splitmix32 so that any 32-bit seed gives a well-mixed
 * state. The library has no unseeded randomness: every stage that needs randomness takes an Rng.
 */
export class Rng {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spare = NaN;
  /** The seed this generator was created with (for provenance records). */
  readonly seed: number;

  constructor(seed: number) {
    if (!Number.isFinite(seed)) throw new InputError(`seed=${seed} should be a finite number`);
    this.seed = seed;
    let x = (Math.trunc(seed) ^ 0x9e3779b9) >>> 0;
    const next = (): number => {
      // splitmix32
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  /** Next unsigned 32-bit integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (this.s1 << 9) >>> 0;
    this.s2 = (this.s2 ^ this.s0) >>> 0;
    this.s3 = (this.s3 ^ this.s1) >>> 0;
    this.s1 = (this.s1 ^ this.s2) >>> 0;
    this.s0 = (this.s0 ^ this.s3) >>> 0;
    this.s2 = (this.s2 ^ t) >>> 0;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /** Uniform float in [0, 1) with 53 random bits. */
  float(): number {
    const hi = this.nextUint32() >>> 5; // 27 bits
    const lo = this.nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  }

  /** Uniform float in [lo, hi). */
  uniform(lo: number, hi: number): number {
    return lo + (hi - lo) * this.float();
  }

  /** Uniform integer in [0, n). Unbiased (rejection sampling). */
  int(n: number): number {
    if (!(n >= 1) || !Number.isInteger(n)) throw new InputError(`n=${n} should be an integer >= 1`);
    if (n <= 0x100000000) {
      const limit = Math.floor(0x100000000 / n) * n;
      for (;;) {
        const r = this.nextUint32();
        if (r < limit) return r % n;
      }
    }
    return Math.floor(this.float() * n);
  }

  /** Standard normal deviate (Box–Muller, polar form of Marsaglia & Bray 1964). */
  normal(mean = 0, sd = 1): number {
    if (!Number.isNaN(this.spare)) {
      const v = this.spare;
      this.spare = NaN;
      return mean + sd * v;
    }
    let u: number, v: number, s: number;
    do {
      u = 2 * this.float() - 1;
      v = 2 * this.float() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const m = Math.sqrt((-2 * Math.log(s)) / s);
    this.spare = v * m;
    return mean + sd * u * m;
  }

  /** Exponential deviate with the given rate. */
  exponential(rate: number): number {
    return -Math.log(1 - this.float()) / rate;
  }

  /**
   * An independent generator derived from this one's seed and a label, so that adding draws in one
   * part of a computation does not shift the numbers another part sees.
   */
  fork(label: string | number): Rng {
    let h = 2166136261 >>> 0; // FNV-1a over the label, mixed with the seed
    const text = `${this.seed}/${label}`;
    for (let i = 0; i < text.length; i++) {
      h ^= text.charCodeAt(i);
      h = Math.imul(h, 16777619) >>> 0;
    }
    return new Rng(h);
  }

  /** Fisher–Yates shuffle in place. */
  shuffle<T>(items: T[] | Int32Array | Float64Array | Uint32Array): void {
    for (let i = items.length - 1; i > 0; i--) {
      const j = this.int(i + 1);
      const tmp = items[i]!;
      items[i] = items[j]!;
      items[j] = tmp;
    }
  }

  /** k distinct indices from [0, n), in increasing order (Floyd's algorithm when k is small). */
  sampleIndices(n: number, k: number): Int32Array {
    if (k >= n) return Int32Array.from({ length: n }, (_, i) => i);
    const chosen = new Set<number>();
    for (let j = n - k; j < n; j++) {
      const t = this.int(j + 1);
      chosen.add(chosen.has(t) ? j : t);
    }
    return Int32Array.from([...chosen].sort((a, b) => a - b));
  }

  /** A plain () => number function for libraries that take one (umap-js). */
  asFunction(): () => number {
    return () => this.float();
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
