/**
 * In-place radix-2 complex fast Fourier transform (Cooley–Tukey, iterative; common practice),
 * used to apply the instrument line shape as a product in the optical-path-difference domain.
 */
import { BandwrightError } from '../errors.js';

/**
 * Smallest power of two ≥ n.
 *
 * @param n - a positive count
 */
export function nextPowerOfTwo(n: number): number {
  let size = 1;
  while (size < n) size *= 2;
  return size;
}

/**
 * Transforms (re, im) in place: forward X_k = Σ x_n·exp(−2πi·kn/N); inverse uses +i and
 * divides by N, so inverse(forward(x)) = x.
 *
 * @param re - real parts, length a power of two; overwritten
 * @param im - imaginary parts, same length; overwritten
 * @param options - `inverse` for the inverse transform (default false)
 * @throws BandwrightError `INVALID_VALUE` when the lengths differ or are not a power of two
 */
export function fftInPlace(re: Float64Array, im: Float64Array, options: { inverse?: boolean } = {}): void {
  const n = re.length;
  if (im.length !== n || n === 0 || (n & (n - 1)) !== 0) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `FFT length = ${n} (imaginary ${im.length}), must be equal powers of two`,
    );
  }
  // Bit-reversal permutation.
  for (let i = 1, j = 0; i < n; i++) {
    let bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) {
      const tr = re[i] as number;
      re[i] = re[j] as number;
      re[j] = tr;
      const ti = im[i] as number;
      im[i] = im[j] as number;
      im[j] = ti;
    }
  }
  const sign = options.inverse === true ? 1 : -1;
  // Twiddles for the largest stage; smaller stages stride through them.
  const half = n >> 1;
  const cos = new Float64Array(half);
  const sin = new Float64Array(half);
  for (let k = 0; k < half; k++) {
    cos[k] = Math.cos((2 * Math.PI * k) / n);
    sin[k] = sign * Math.sin((2 * Math.PI * k) / n);
  }
  for (let size = 2; size <= n; size *= 2) {
    const halfSize = size >> 1;
    const stride = n / size;
    for (let start = 0; start < n; start += size) {
      for (let k = 0; k < halfSize; k++) {
        const wr = cos[k * stride] as number;
        const wi = sin[k * stride] as number;
        const a = start + k;
        const b = a + halfSize;
        const br = re[b] as number;
        const bi = im[b] as number;
        const xr = br * wr - bi * wi;
        const xi = br * wi + bi * wr;
        const ar = re[a] as number;
        const ai = im[a] as number;
        re[b] = ar - xr;
        im[b] = ai - xi;
        re[a] = ar + xr;
        im[a] = ai + xi;
      }
    }
  }
  if (options.inverse === true) {
    for (let i = 0; i < n; i++) {
      re[i] = (re[i] as number) / n;
      im[i] = (im[i] as number) / n;
    }
  }
}
