/**
 * A small seeded pseudo-random generator (mulberry32 core) with uniform and normal draws.
 * Deterministic across runs and platforms for the same seed.
 *
 * ## Method
 * 32-bit state advanced by the golden-ratio increment 0x6D2B79F5 and mixed by two multiply-xorshift
 * rounds (the public-domain "mulberry32" generator); normal draws by the Box–Muller transform.
 *
 * ## References
 * G. E. P. Box, M. E. Muller, "A note on the generation of random normal deviates", Ann. Math.
 * Statist. 29(2):610–611, 1958, doi:10.1214/aoms/1177706645.
 *
 * @param seed - any finite number (its low 32 bits are used)
 * @returns `{ uniform(): number in [0, 1), normal(): number ~ N(0, 1) }`
 * @example
 * const rng = createRandom(42);
 * rng.uniform(); // same value on every run
 */
export function createRandom(seed: number): { uniform: () => number; normal: () => number } {
  let a = (seed >>> 0) ^ 0x9e3779b9;
  const uniform = (): number => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  let spare = NaN;
  const normal = (): number => {
    if (!Number.isNaN(spare)) {
      const s = spare;
      spare = NaN;
      return s;
    }
    let u = uniform();
    while (u === 0) u = uniform();
    const v = uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
  return { uniform, normal };
}
