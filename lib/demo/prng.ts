// A small seeded pseudo-random generator for the synthetic demo data: the same seed
// gives the same sequence on every platform (32-bit integer arithmetic only).

/** mulberry32 (Tommy Ettinger, 2017, public domain) [trade]: 32-bit state, period 2^32. */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** 32-bit FNV-1a hash of a string (Fowler, Noll & Vo) [trade], to derive sub-seeds. */
export function hash32(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

/** A seeded random source with the few helpers the generator needs. */
export class Rng {
  private readonly next: () => number;
  constructor(seed: number) {
    this.next = mulberry32(seed);
  }
  /** A generator for a named sub-stream: independent of how much this one was used. */
  static derive(seed: number, name: string): Rng {
    return new Rng((hash32(name) ^ Math.imul(seed >>> 0, 0x9e3779b1)) >>> 0);
  }
  /** Uniform in [0, 1). */
  random(): number {
    return this.next();
  }
  /** Uniform in [lo, hi). */
  uniform(lo: number, hi: number): number {
    return lo + (hi - lo) * this.next();
  }
  /** Integer in [lo, hi] inclusive. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.next() * (hi - lo + 1));
  }
  /** True with probability p. */
  chance(p: number): boolean {
    return this.next() < p;
  }
  /** Standard normal deviate (Box–Muller 1958, Ann. Math. Stat. 29:610) [trade]. */
  normal(mean = 0, sd = 1): number {
    let u = this.next();
    while (u <= 1e-12) u = this.next();
    const v = this.next();
    return mean + sd * Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  }
  pick<T>(items: readonly T[]): T {
    return items[Math.floor(this.next() * items.length)];
  }
  /** Fisher–Yates shuffle of a copy [trade]. */
  shuffle<T>(items: readonly T[]): T[] {
    const a = items.slice();
    for (let i = a.length - 1; i > 0; i--) {
      const j = Math.floor(this.next() * (i + 1));
      [a[i], a[j]] = [a[j], a[i]];
    }
    return a;
  }
}
