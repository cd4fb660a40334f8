/**
 * Student-t and Fisher-F quantiles and cumulative distribution functions.
 *
 * Thin wrappers around the @stdlib kernels (no tables, no home-made series). These are scalar
 * numeric kernels: outside their domain they return NaN rather than throw, so callers that
 * feed them user input check the result (see {@link criticalT}, which throws).
 *
 * The kernels are loaded on first use, and quantiles are remembered: the @stdlib packages are
 * some 200 small modules, about 10 MB of memory in every thread that loads them, while a batch
 * worker quantifying scans needs only the few quantiles its calibration's degrees of freedom
 * give. The batch hands a worker the quantiles already computed ({@link computedQuantiles},
 * {@link adoptQuantiles}), so a worker loads the kernels only if it meets a new one.
 */
import { createRequire } from 'node:module';
import type fCdfKernel from '@stdlib/stats-base-dists-f-cdf';
import type fQuantileKernel from '@stdlib/stats-base-dists-f-quantile';
import type tCdfKernel from '@stdlib/stats-base-dists-t-cdf';
import type tQuantileKernel from '@stdlib/stats-base-dists-t-quantile';
import { BandwrightError } from '../errors.js';

// Types only: the kernels themselves are required on first use (see loadKernels).
interface Kernels {
  tCdf: typeof tCdfKernel;
  tQuantile: typeof tQuantileKernel;
  fCdf: typeof fCdfKernel;
  fQuantile: typeof fQuantileKernel;
}

let kernels: Kernels | undefined;

function loadKernels(): Kernels {
  if (kernels === undefined) {
    const require = createRequire(import.meta.url);
    kernels = {
      tCdf: require('@stdlib/stats-base-dists-t-cdf') as Kernels['tCdf'],
      tQuantile: require('@stdlib/stats-base-dists-t-quantile') as Kernels['tQuantile'],
      fCdf: require('@stdlib/stats-base-dists-f-cdf') as Kernels['fCdf'],
      fQuantile: require('@stdlib/stats-base-dists-f-quantile') as Kernels['fQuantile'],
    };
  }
  return kernels;
}

/**
 * Quantiles computed so far, by their arguments. Bounded: a fit with fractional (Satterthwaite)
 * degrees of freedom asks for many one-off values, and a long `watch` must not grow with them.
 */
const quantiles = new Map<string, number>();
const MAX_REMEMBERED_QUANTILES = 512;

function remembered(key: string, compute: () => number): number {
  const known = quantiles.get(key);
  if (known !== undefined) return known;
  const value = compute();
  if (quantiles.size >= MAX_REMEMBERED_QUANTILES) quantiles.clear();
  quantiles.set(key, value);
  return value;
}

/**
 * The t and F quantiles this thread has computed, as plain data another thread can adopt.
 *
 * @returns pairs of (arguments key, quantile)
 */
export function computedQuantiles(): [string, number][] {
  return [...quantiles];
}

/**
 * Takes over quantiles computed by another thread (from {@link computedQuantiles}), so this
 * thread need not load the kernels for them. The values are the kernels' own, so results are
 * identical either way.
 *
 * @param entries - pairs of (arguments key, quantile)
 */
export function adoptQuantiles(entries: readonly (readonly [string, number])[]): void {
  for (const [key, value] of entries)
    if (quantiles.size < MAX_REMEMBERED_QUANTILES) quantiles.set(key, value);
}

/**
 * Quantile of Student's t distribution: the value t with P(T ≤ t) = p.
 *
 * Returns NaN when p is outside [0, 1], when df ≤ 0, or when either is NaN.
 * p = 0 gives −Infinity and p = 1 gives +Infinity.
 *
 * @param p - lower-tail probability, 0…1
 * @param df - degrees of freedom, > 0 (need not be an integer)
 * @returns the quantile, or NaN outside the domain
 * @example
 * tQuantile(0.975, 8); // 2.306004135204166, the two-sided 95 % value for 8 degrees of freedom
 */
export function tQuantile(p: number, df: number): number {
  return remembered(`t ${p} ${df}`, () => loadKernels().tQuantile(p, df));
}

/**
 * Cumulative distribution function of Student's t distribution, P(T ≤ x).
 *
 * Returns NaN when df ≤ 0 or when an argument is NaN.
 *
 * @param x - the value
 * @param df - degrees of freedom, > 0
 * @returns probability 0…1, or NaN outside the domain
 */
export function tCdf(x: number, df: number): number {
  return loadKernels().tCdf(x, df);
}

/**
 * Quantile of the F distribution with d1 (numerator) and d2 (denominator) degrees of freedom.
 *
 * Returns NaN when p is outside [0, 1], when d1 ≤ 0 or d2 ≤ 0, or when an argument is NaN.
 *
 * @param p - lower-tail probability, 0…1
 * @param d1 - numerator degrees of freedom, > 0
 * @param d2 - denominator degrees of freedom, > 0
 * @returns the quantile, or NaN outside the domain
 * @example
 * fQuantile(0.99, 1, 7); // 12.246…, the Mandel test's critical value for 10 standards
 */
export function fQuantile(p: number, d1: number, d2: number): number {
  return remembered(`F ${p} ${d1} ${d2}`, () => loadKernels().fQuantile(p, d1, d2));
}

/**
 * Cumulative distribution function of the F distribution, P(F ≤ x).
 *
 * Returns NaN when d1 ≤ 0 or d2 ≤ 0, or when an argument is NaN; 0 for x ≤ 0.
 *
 * @param x - the value
 * @param d1 - numerator degrees of freedom, > 0
 * @param d2 - denominator degrees of freedom, > 0
 * @returns probability 0…1, or NaN outside the domain
 */
export function fCdf(x: number, d1: number, d2: number): number {
  return loadKernels().fCdf(x, d1, d2);
}

/**
 * Critical value of Student's t for a confidence level, for the pipeline (throws instead of
 * returning NaN).
 *
 * @param level - confidence level, strictly between 0 and 1 (e.g. 0.95)
 * @param df - degrees of freedom, > 0
 * @param options - `sides`: 2 (default) gives t(1 − (1 − level)/2, df); 1 gives t(level, df)
 * @returns the critical value, > 0 for level > 0.5 (one-sided) or any level (two-sided)
 * @throws BandwrightError `INVALID_VALUE` when level or df is outside its domain
 * @example
 * criticalT(0.99, 8); // 3.355…, two-sided 99 %
 * criticalT(0.99, 8, { sides: 1 }); // 2.896…, one-sided 99 %
 */
export function criticalT(level: number, df: number, options: { sides?: 1 | 2 } = {}): number {
  const sides = options.sides ?? 2;
  if (!(level > 0 && level < 1)) {
    throw new BandwrightError('INVALID_VALUE', `level = ${level}, must be strictly between 0 and 1`, {
      parameter: 'level',
    });
  }
  if (!(df > 0) || !Number.isFinite(df)) {
    throw new BandwrightError('INVALID_VALUE', `degrees of freedom = ${df}, must be a finite number > 0`, {
      parameter: 'df',
    });
  }
  const p = sides === 2 ? 1 - (1 - level) / 2 : level;
  return tQuantile(p, df);
}
