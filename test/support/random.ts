// Seeded pseudo-random numbers for property tests: the same seed gives the
// same cases on every run, so a failure can be reproduced from its seed.

/** Increment of mulberry32's 32-bit Weyl sequence (part of the generator's definition). */
const MULBERRY_INCREMENT = 0x6d2b79f5;
/** 2^32: turns a 32-bit unsigned integer into a float in [0, 1). */
const UINT32_RANGE = 4294967296;

export class Random {
  private state: number;

  constructor(readonly seed: number) {
    this.state = seed >>> 0;
  }

  /** Uniform float in [0, 1) (mulberry32). */
  next(): number {
    this.state = (this.state + MULBERRY_INCREMENT) >>> 0;
    let t = this.state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / UINT32_RANGE;
  }

  /** Uniform integer in [min, max], both inclusive. */
  int(min: number, max: number): number {
    return min + Math.floor(this.next() * (max - min + 1));
  }

  /** True with the given probability. */
  chance(probability: number): boolean {
    return this.next() < probability;
  }

  pick<T>(items: readonly T[]): T {
    return items[this.int(0, items.length - 1)];
  }

  /** `count` distinct items in random order (count is capped at items.length). */
  sample<T>(items: readonly T[], count: number): T[] {
    const pool = [...items];
    const out: T[] = [];
    while (out.length < count && pool.length > 0) out.push(pool.splice(this.int(0, pool.length - 1), 1)[0]);
    return out;
  }
}
