/** A seeded source of uniform and normal random numbers. */
export interface SeededRandom {
  /** Uniform in [0, 1). */
  uniform(): number;
  /** Standard normal N(0, 1). */
  normal(): number;
}

/**
 * Reproducible pseudo-random numbers: Mulberry32 (32-bit state) for uniforms and the Box–Muller
 * transform z = √(−2 ln u₁)·cos(2π u₂) for normals. The same seed gives the same sequence on every
 * JavaScript engine (only 32-bit integer arithmetic and IEEE doubles are used).
 *
 * Units: none. Reference: Box G.E.P. & Muller M.E. (1958) Ann. Math. Stat. 29, 610; Mulberry32
 * (public-domain generator by T. Ettinger, 2017).
 *
 * @param seed any integer
 * @example
 * const rng = seededRandom(42); rng.normal(); // the same number every run
 */
export function seededRandom(seed: number): SeededRandom {
  let state = seed >>> 0;
  let spare: number | null = null;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = (): number => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u1 = uniform();
    while (u1 <= 0) u1 = uniform();
    const u2 = uniform();
    const r = Math.sqrt(-2 * Math.log(u1));
    spare = r * Math.sin(2 * Math.PI * u2);
    return r * Math.cos(2 * Math.PI * u2);
  };
  return { uniform, normal };
}
