/**
 * Small synthetic spectra for model tests (synthetic, known truth): Lorentzian and Gaussian
 * bands on a uniform grid, a seeded normal generator, correlated noise (white noise smoothed by
 * a short triangular kernel, the way apodisation and resampling correlate neighbouring
 * channels), and a toy saturating band (narrow lines, Beer–Lambert on transmittance, then an
 * instrument kernel applied to transmittance). These are shape generators only; physical line
 * lists, partition functions and instrument line shapes belong to `src/simulate/`.
 */
import { createRandom } from '../../src/simulate/random.js';

/** A uniform ascending grid from `start` to `end` (inclusive) with spacing `step`, cm⁻¹. */
export function uniformGrid(start: number, end: number, step: number): Float64Array {
  const count = Math.round((end - start) / step) + 1;
  const grid = new Float64Array(count);
  for (let i = 0; i < count; i++) grid[i] = start + i * step;
  return grid;
}

/** Peak-normalised Lorentzian band: peak / (1 + ((x − centre)/hwhm)²). */
export function lorentzianBand(
  grid: Float64Array,
  band: { centre: number; hwhm: number; peak: number },
): Float64Array {
  const out = new Float64Array(grid.length);
  for (let i = 0; i < grid.length; i++) {
    const u = (grid[i]! - band.centre) / band.hwhm;
    out[i] = band.peak / (1 + u * u);
  }
  return out;
}

/** Peak-normalised Gaussian band: peak · exp(−ln2 ((x − centre)/hwhm)²). */
export function gaussianBand(
  grid: Float64Array,
  band: { centre: number; hwhm: number; peak: number },
): Float64Array {
  const out = new Float64Array(grid.length);
  for (let i = 0; i < grid.length; i++) {
    const u = (grid[i]! - band.centre) / band.hwhm;
    out[i] = band.peak * Math.exp(-Math.LN2 * u * u);
  }
  return out;
}

/** Sum of several spectra with weights: Σ w_k s_k. */
export function combine(
  parts: ReadonlyArray<{ spectrum: ArrayLike<number>; weight: number }>,
  length: number,
): Float64Array {
  const out = new Float64Array(length);
  for (const part of parts) {
    for (let i = 0; i < length; i++) out[i]! += part.weight * part.spectrum[i]!;
  }
  return out;
}

/** Adds offset + slope·(x − x_mid) to a copy of `spectrum`. */
export function withLinearBaseline(
  spectrum: Float64Array,
  grid: Float64Array,
  offset: number,
  slope: number,
): Float64Array {
  const mid = (grid[0]! + grid[grid.length - 1]!) / 2;
  const out = new Float64Array(spectrum.length);
  for (let i = 0; i < spectrum.length; i++) out[i] = spectrum[i]! + offset + slope * (grid[i]! - mid);
  return out;
}

/** A seeded generator of standard normal deviates (mulberry32 uniforms, Box–Muller). */
export function normalGenerator(seed: number): () => number {
  // The project's mulberry32 generator; the Box–Muller pairing below is this helper's own.
  const uniform = createRandom(seed);
  let spare: number | undefined;
  return () => {
    if (spare !== undefined) {
      const value = spare;
      spare = undefined;
      return value;
    }
    let u = 0;
    while (u === 0) u = uniform();
    const v = uniform();
    const radius = Math.sqrt(-2 * Math.log(u));
    spare = radius * Math.sin(2 * Math.PI * v);
    return radius * Math.cos(2 * Math.PI * v);
  };
}

/**
 * Correlated Gaussian noise: white noise convolved with a triangular kernel of half-width
 * `halfWidth` channels, rescaled so each channel's standard deviation is `rms`. halfWidth 0
 * gives white noise.
 */
export function correlatedNoise(
  length: number,
  options: { rms: number; halfWidth: number; normal: () => number },
): Float64Array {
  const { rms, halfWidth, normal } = options;
  const weights: number[] = [];
  for (let k = -halfWidth; k <= halfWidth; k++) weights.push(halfWidth + 1 - Math.abs(k));
  const norm = Math.sqrt(weights.reduce((sum, w) => sum + w * w, 0));
  const white = new Float64Array(length + 2 * halfWidth);
  for (let i = 0; i < white.length; i++) white[i] = normal();
  const out = new Float64Array(length);
  for (let i = 0; i < length; i++) {
    let sum = 0;
    for (let k = 0; k < weights.length; k++) sum += weights[k]! * white[i + k]!;
    out[i] = (rms * sum) / norm;
  }
  return out;
}

/** Adds `noise` to a copy of `spectrum`. */
export function plus(spectrum: ArrayLike<number>, noise: ArrayLike<number>): Float64Array {
  const out = new Float64Array(spectrum.length);
  for (let i = 0; i < spectrum.length; i++) out[i] = spectrum[i]! + noise[i]!;
  return out;
}

/**
 * A toy saturating band: lines much narrower than the instrument resolution, Beer–Lambert on
 * a fine grid (T = exp(−column·Σ s_k L_k(ν)) with unit-area Lorentzians L_k), the instrument
 * kernel (Gaussian, half-width `kernelHwhm`) applied to transmittance, and decadic absorbance
 * −log10 of the smoothed transmittance sampled on `grid`. Because the kernel acts on
 * transmittance, apparent absorbance grows less than linearly with the column amount.
 *
 * @param grid - output grid, cm⁻¹, uniform and ascending
 * @param band - line centres (cm⁻¹) and strengths (natural-log absorbance area per unit column),
 *   Lorentz half-width of every line (cm⁻¹), instrument Gaussian half-width (cm⁻¹), column amount
 */
export function saturatingBand(
  grid: Float64Array,
  band: {
    lines: ReadonlyArray<{ centre: number; strength: number }>;
    lineHwhm: number;
    kernelHwhm: number;
    column: number;
  },
): Float64Array {
  const step = grid[1]! - grid[0]!;
  const oversample = 20;
  const fineStep = step / oversample;
  const margin = Math.ceil((4 * band.kernelHwhm) / fineStep);
  const fineCount = (grid.length - 1) * oversample + 1 + 2 * margin;
  const fineStart = grid[0]! - margin * fineStep;
  const transmittance = new Float64Array(fineCount);
  for (let i = 0; i < fineCount; i++) {
    const nu = fineStart + i * fineStep;
    let tau = 0;
    for (const line of band.lines) {
      const u = (nu - line.centre) / band.lineHwhm;
      tau += line.strength / (Math.PI * band.lineHwhm) / (1 + u * u);
    }
    transmittance[i] = Math.exp(-band.column * tau);
  }
  const out = new Float64Array(grid.length);
  for (let j = 0; j < grid.length; j++) {
    const centreIndex = margin + j * oversample;
    let sum = 0;
    let weight = 0;
    for (let k = -margin; k <= margin; k++) {
      const u = (k * fineStep) / band.kernelHwhm;
      const w = Math.exp(-Math.LN2 * u * u);
      sum += w * transmittance[centreIndex + k]!;
      weight += w;
    }
    out[j] = -Math.log10(sum / weight);
  }
  return out;
}

/** A synthetic three-component mixture on one region (synthetic, known truth). */
export interface MixtureScenario {
  /** Grid, cm⁻¹. */
  grid: Float64Array;
  /** Component names, reported flags and units, in concentration column order. */
  components: { name: string; reported: boolean; unit: string }[];
  /** Pure spectra, absorbance per ppm, one per component. */
  pure: Float64Array[];
  /** Noise-free absorbance of concentrations c (ppm) times φ. */
  spectrumOf: (concentrations: readonly number[], phi?: number) => Float64Array;
}

/**
 * "CO" (three Lorentzian bands), "N2O" (three Lorentzians 5 cm⁻¹ from CO's, wider: strongly
 * overlapping) and the interferent "H2O" (two Gaussians, one under the CO/N2O cluster), on
 * 2000–2250 cm⁻¹ every 0.5 cm⁻¹. Band names are labels only; the shapes are invented.
 */
export function overlappingMixture(): MixtureScenario {
  const grid = uniformGrid(2000, 2250, 0.5);
  const n = grid.length;
  const co = combine(
    [2100, 2110, 2120].map((centre, k) => ({
      spectrum: lorentzianBand(grid, { centre, hwhm: 3, peak: 0.005 * (1 - 0.2 * k) }),
      weight: 1,
    })),
    n,
  );
  const n2o = combine(
    [2105, 2115, 2125].map((centre, k) => ({
      spectrum: lorentzianBand(grid, { centre, hwhm: 4, peak: 0.006 * (1 - 0.15 * k) }),
      weight: 1,
    })),
    n,
  );
  const h2o = combine(
    [2130, 2180].map((centre) => ({
      spectrum: gaussianBand(grid, { centre, hwhm: 5, peak: 1e-4 }),
      weight: 1,
    })),
    n,
  );
  const pure = [co, n2o, h2o];
  return {
    grid,
    components: [
      { name: 'CO', reported: true, unit: 'ppm' },
      { name: 'N2O', reported: true, unit: 'ppm' },
      { name: 'H2O', reported: false, unit: 'ppm' },
    ],
    pure,
    spectrumOf: (concentrations, phi = 1) =>
      combine(
        pure.map((spectrum, j) => ({ spectrum, weight: concentrations[j]! * phi })),
        n,
      ),
  };
}

/** A design of standards: n rows of (CO 0…200, N2O 0…100, H2O 2000…5000) ppm, mutually uncorrelated levels. */
export function mixtureDesign(count: number): number[][] {
  const rows: number[][] = [];
  for (let i = 0; i < count; i++) {
    rows.push([
      Math.round((200 * ((i * 7) % count)) / (count - 1)),
      Math.round((100 * ((i * 3) % count)) / (count - 1)),
      2000 + (3000 * ((i * 3) % 4)) / 3,
    ]);
  }
  return rows;
}

/** Cosine of the angle between two spectra (1 = same shape). */
export function cosine(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let ab = 0;
  let aa = 0;
  let bb = 0;
  for (let i = 0; i < a.length; i++) {
    ab += a[i]! * b[i]!;
    aa += a[i]! * a[i]!;
    bb += b[i]! * b[i]!;
  }
  return ab / Math.sqrt(aa * bb);
}
