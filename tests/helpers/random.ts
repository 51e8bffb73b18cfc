/**
 * Seeded pseudo-random numbers for tests: reproducible noise on synthetic picks.
 * Never use Math.random in tests or engine code; a failing case must replay exactly.
 */

/**
 * Mulberry32: a 32-bit-state generator returning uniform numbers in [0, 1).
 * Small and fast; good enough for test noise (not for cryptography).
 * @example const rng = mulberry32(42); rng(); // same value on every run
 */
export function mulberry32(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * One standard normal deviate (mean 0, standard deviation 1) from a uniform generator,
 * by the Box–Muller transform (Box & Muller, Ann. Math. Stat. 29, 1958).
 */
export function gaussian(rng: () => number): number {
  // 1 − u keeps the logarithm's argument in (0, 1], never log(0).
  const u1 = 1 - rng();
  const u2 = rng();
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}
