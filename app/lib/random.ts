// Seeded randomness, the same draws for the same seed: the simulator's weather and the projection's
// resampling of its own errors are repeatable run to run.

/** mulberry32 (Tommy Ettinger's 32-bit generator): uniform draws in [0, 1) from a seed. */
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
