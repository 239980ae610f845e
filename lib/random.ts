/**
 * Deterministic pseudo-random numbers for the demo seed, benchmarks and tests, so the same seed gives
 * the same data on every machine and a failing test fails every time. Not for secrets.
 */

/** mulberry32 (T. Ettinger, public domain): uniform numbers in [0, 1). */
export function mulberry32(seed: number): () => number {
  let t = seed >>> 0;
  return () => {
    t = (t + 0x6d2b79f5) >>> 0;
    let r = Math.imul(t ^ (t >>> 15), 1 | t);
    r = (r + Math.imul(r ^ (r >>> 7), 61 | r)) ^ r;
    return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
  };
}

/** A standard normal deviate by the Box–Muller transform from two uniforms of `random`. */
export function gaussian(random: () => number): number {
  const u = Math.max(random(), 1e-12);
  const v = random();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}
