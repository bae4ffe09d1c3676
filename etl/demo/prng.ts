/**
 * A small seeded pseudo-random generator for the demo world: xoshiro128** (Blackman & Vigna, 2018), seeded
 * through splitmix32 so that any 32-bit seed gives a well-mixed state. Pure: no global state, no Math.random.
 * Independent streams (one per shop, one per machine, ...) are derived from (seed, label, index) so that
 * changing one machine's draws never shifts another's.
 */

function splitmix32(state: number): [number, number] {
  const next = (state + 0x9e3779b9) | 0;
  let z = next;
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
  z ^= z >>> 16;
  return [next, z >>> 0];
}

/** 32-bit FNV-1a hash of a string, used to turn stream labels into seed material. */
export function hashLabel(label: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < label.length; i++) {
    h ^= label.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

export class Rng {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spareNormal: number | null = null;

  constructor(seed: number) {
    let st = seed | 0;
    const words: number[] = [0, 0, 0, 0];
    for (let i = 0; i < 4; i++) {
      const [next, out] = splitmix32(st);
      st = next;
      words[i] = out;
    }
    if (!words.some((w) => w !== 0)) words[0] = 1;
    [this.s0, this.s1, this.s2, this.s3] = words as [number, number, number, number];
  }

  /** Next raw 32-bit unsigned integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5), 7), 9) >>> 0;
    const t = this.s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /** Uniform on [0, 1) with 32 bits of resolution. */
  float(): number {
    return this.nextUint32() / 4294967296;
  }

  /** Uniform on (0, 1): safe for logarithms. */
  floatOpen(): number {
    return (this.nextUint32() + 0.5) / 4294967296;
  }

  uniform(lo: number, hi: number): number {
    return lo + (hi - lo) * this.float();
  }

  /** Integer uniform on [lo, hi], both inclusive. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.float() * (hi - lo + 1));
  }

  chance(p: number): boolean {
    return this.float() < p;
  }

  pick<T>(items: readonly T[]): T {
    return items[Math.floor(this.float() * items.length)] as T;
  }

  /** Index drawn with probability proportional to weights[i]. */
  weightedIndex(weights: readonly number[]): number {
    let total = 0;
    for (const w of weights) total += w;
    let u = this.float() * total;
    for (let i = 0; i < weights.length; i++) {
      u -= weights[i]!;
      if (u < 0) return i;
    }
    return weights.length - 1;
  }

  /** Standard normal draw (Box–Muller, the second value is kept for the next call). */
  normal(mean = 0, sd = 1): number {
    if (this.spareNormal !== null) {
      const z = this.spareNormal;
      this.spareNormal = null;
      return mean + sd * z;
    }
    const r = Math.sqrt(-2 * Math.log(this.floatOpen()));
    const theta = 2 * Math.PI * this.float();
    this.spareNormal = r * Math.sin(theta);
    return mean + sd * r * Math.cos(theta);
  }

  /** Lognormal given its median and the SD of its logarithm. */
  lognormal(median: number, sigmaLog: number): number {
    return median * Math.exp(sigmaLog * this.normal());
  }

  /** Unit-rate exponential draw, the target of a cumulative hazard. */
  exponential(): number {
    return -Math.log(this.floatOpen());
  }

  /** Weibull(β shape, η scale) by inversion: η·(−ln U)^(1/β). */
  weibull(beta: number, eta: number): number {
    return eta * Math.pow(this.exponential(), 1 / beta);
  }

  /** Log-uniform on [lo, hi]. */
  logUniform(lo: number, hi: number): number {
    return Math.exp(this.uniform(Math.log(lo), Math.log(hi)));
  }

  /** Poisson draw by multiplication of uniforms (fine for the small means used here). */
  poisson(mean: number): number {
    const limit = Math.exp(-mean);
    let k = 0;
    let p = this.float();
    while (p > limit) {
      k++;
      p *= this.float();
    }
    return k;
  }

  /** In-place Fisher–Yates shuffle. */
  shuffle<T>(items: T[]): T[] {
    for (let i = items.length - 1; i > 0; i--) {
      const j = Math.floor(this.float() * (i + 1));
      [items[i], items[j]] = [items[j]!, items[i]!];
    }
    return items;
  }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/** An independent stream for (seed, label, index): e.g. stream(7, "machine", 123). */
export function stream(seed: number, label: string, index = 0): Rng {
  return new Rng(hashLabel(`${seed >>> 0}/${label}/${index}`));
}
