/**
 * Seeded pseudo-random numbers for Monte Carlo, reproducible across platforms (32-bit integer arithmetic).
 *
 * - mulberry32: a 32-bit generator by Tommy Ettinger (public domain, 2017), as widely reproduced, e.g.
 *   https://github.com/bryc/code/blob/master/jshash/PRNGs.md#mulberry32 (from memory). Period 2³².
 * - Per-stream seeds from a 32-bit integer hash (the "lowbias32" finaliser of Chris Wellons' hash-prospector,
 *   https://github.com/skeeto/hash-prospector — from memory), so virtual patient i always gets stream
 *   hash(seed, i): any split of patients into chunks gives the identical answer.
 * - Normal deviates by the Box–Muller transform (Box GEP, Muller ME. Ann Math Stat 1958;29:610–611).
 */

/** 32-bit integer hash (lowbias32). @example hash32(0) // => 0 */
export function hash32(x: number): number {
  let h = x >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x7feb352d) >>> 0;
  h ^= h >>> 15;
  h = Math.imul(h, 0x846ca68b) >>> 0;
  h ^= h >>> 16;
  return h >>> 0;
}

/** Seed of stream `index` under master `seed`. */
export function streamSeed(seed: number, index: number): number {
  return hash32((hash32(seed >>> 0) ^ Math.imul((index >>> 0) + 1, 0x9e3779b9)) >>> 0);
}

/** A uniform generator on [0, 1) (mulberry32). @example mulberry32(1)() // => 0.6270739405881613 */
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

/** Fill `out` with independent standard normal deviates from `uniform` (Box–Muller, both deviates used). */
export function fillStandardNormals(uniform: () => number, out: number[]): number[] {
  for (let i = 0; i < out.length; i += 2) {
    let u1 = uniform();
    while (u1 <= 0) u1 = uniform();
    const u2 = uniform();
    const r = Math.sqrt(-2 * Math.log(u1));
    out[i] = r * Math.cos(2 * Math.PI * u2);
    if (i + 1 < out.length) out[i + 1] = r * Math.sin(2 * Math.PI * u2);
  }
  return out;
}
