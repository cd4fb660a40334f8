/**
 * Small seeded pseudo-random generators for reproducible simulated spectra.
 *
 * Uniform numbers come from mulberry32 (a 32-bit generator by Tommy Ettinger, public domain;
 * common practice for seeded test data); Gaussian numbers from the Box–Muller transform.
 * Neither is for cryptography.
 */

/**
 * A uniform generator on [0, 1) from a 32-bit seed (mulberry32).
 *
 * @param seed - any finite number; it is reduced to an unsigned 32-bit integer
 * @returns a function giving the next number in [0, 1) each call
 * @example
 * const random = createRandom(42);
 * random(); // the same value on every run
 */
export function createRandom(seed: number): () => number {
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
 * A standard normal generator (mean 0, SD 1) by the Box–Muller transform over
 * {@link createRandom}.
 *
 * @param seed - 32-bit seed
 * @returns a function giving the next normal deviate each call
 */
export function createGaussian(seed: number): () => number {
  const random = createRandom(seed);
  let spare: number | undefined;
  return () => {
    if (spare !== undefined) {
      const value = spare;
      spare = undefined;
      return value;
    }
    // 1 − u keeps the logarithm's argument in (0, 1].
    const radius = Math.sqrt(-2 * Math.log(1 - random()));
    const angle = 2 * Math.PI * random();
    spare = radius * Math.sin(angle);
    return radius * Math.cos(angle);
  };
}

/**
 * A 32-bit seed from text (FNV-1a hash), so fixed patterns can be tied to a name.
 *
 * @param text - any string
 * @returns an unsigned 32-bit integer
 */
export function seedFromText(text: string): number {
  let hash = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    hash ^= text.charCodeAt(i);
    hash = Math.imul(hash, 0x01000193) >>> 0;
  }
  return hash >>> 0;
}
