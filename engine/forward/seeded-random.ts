/**
 * Seeded pseudo-random numbers for synthetic lines, so the same seed always gives the same
 * noise and the same dead traces (the engine never calls Math.random).
 *
 * Uniform numbers: mulberry32, a 32-bit generator with a single 32-bit state (Tommy
 * Ettinger, public domain, 2017; from memory). Plenty for pick noise; not for cryptography.
 * Gaussian numbers: the Box–Muller transform (Box & Muller, Ann. Math. Statist. 29, 1958):
 * z = √(−2 ln u1)·cos(2π u2) for independent uniform u1 ∈ (0, 1], u2 ∈ [0, 1).
 */

/** A function returning uniform numbers in [0, 1). */
export type UniformSource = () => number;

/** Uniform generator from a seed (any number; its low 32 bits are used). */
export function seededUniform(seed: number): UniformSource {
  let state = (Math.trunc(seed) >>> 0) | 0;
  return () => {
    state = (state + 0x6d2b79f5) | 0;
    let r = Math.imul(state ^ (state >>> 15), 1 | state);
    r = (r + Math.imul(r ^ (r >>> 7), 61 | r)) ^ r;
    return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviate (mean 0, standard deviation 1) from a uniform source. */
export function standardNormal(uniform: UniformSource): number {
  const u1 = 1 - uniform(); // (0, 1]: keeps the logarithm finite
  const u2 = uniform();
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}
