/**
 * Baseline (nuisance) basis for classical least squares: Legendre polynomials P0…P_order on each
 * region separately, with x centred and scaled to [−1, 1] over the region, plus an optional
 * constant background spectrum; orthonormalised by Householder QR (ml-matrix), so removing the
 * baseline from a spectrum is `a − U (Uᵀ a)` with no matrix inverse (DESIGN §3).
 *
 * Also splits channels into contiguous segments (runs of adjacent channels in one region, with
 * no grid gap), along which channel-to-channel noise correlation is estimated and applied.
 */
import { QrDecomposition, Matrix } from 'ml-matrix';
import { BandwrightError } from '../../errors.js';

/** Highest polynomial baseline order accepted. */
export const MAX_BASELINE_ORDER = 3;

/** A run of adjacent channels `[start, end)` belonging to one region. */
export interface ChannelSegment {
  /** First channel index (inclusive). */
  readonly start: number;
  /** One past the last channel index. */
  readonly end: number;
  /** Region label of every channel in the run. */
  readonly region: number;
}

/**
 * Splits channels into segments: a new segment starts where the region label changes or where
 * the grid jumps by more than 1.5 times the median spacing (channels that are not neighbours
 * on the instrument's grid).
 *
 * @param regionOf - region label per channel (integers ≥ 0)
 * @param positions - channel positions (cm⁻¹, or channel indices), ascending within a region
 * @returns segments in channel order
 */
export function channelSegments(regionOf: ArrayLike<number>, positions: ArrayLike<number>): ChannelSegment[] {
  const count = regionOf.length;
  const steps: number[] = [];
  for (let i = 1; i < count; i++)
    if (regionOf[i] === regionOf[i - 1]) steps.push(Math.abs(positions[i]! - positions[i - 1]!));
  steps.sort((a, b) => a - b);
  const median = steps.length > 0 ? steps[Math.floor(steps.length / 2)]! : 0;
  const segments: ChannelSegment[] = [];
  let start = 0;
  for (let i = 1; i <= count; i++) {
    const breakHere =
      i === count ||
      regionOf[i] !== regionOf[i - 1] ||
      Math.abs(positions[i]! - positions[i - 1]!) > 1.5 * median;
    if (breakHere) {
      segments.push({ start, end: i, region: regionOf[start]! });
      start = i;
    }
  }
  return segments;
}

/** Legendre polynomial P_k(t) for k = 0…3. */
function legendre(order: number, t: number): number {
  switch (order) {
    case 0:
      return 1;
    case 1:
      return t;
    case 2:
      return (3 * t * t - 1) / 2;
    default:
      return ((5 * t * t - 3) * t) / 2;
  }
}

/**
 * Builds the orthonormal nuisance basis: per region the Legendre polynomials up to `order`
 * (zero outside the region), then the background spectrum if given.
 *
 * @param options.positions - channel positions (cm⁻¹ or indices), used only for centring/scaling
 * @param options.regionOf - region label per channel
 * @param options.order - polynomial order 0…3, or −1 for no baseline terms
 * @param options.background - optional constant background spectrum (absorbance) on the channels
 * @returns orthonormal columns, each a Float64Array over all channels
 * @throws BandwrightError `INSUFFICIENT_DATA` when a region has too few channels for the order;
 *   `INVALID_VALUE` when the background is itself a baseline polynomial (it would be removed twice)
 */
export function nuisanceBasis(options: {
  positions: ArrayLike<number>;
  regionOf: ArrayLike<number>;
  order: number;
  background?: ArrayLike<number>;
}): Float64Array[] {
  const { positions, regionOf, order, background } = options;
  const count = regionOf.length;
  const regions = [...new Set(Array.from(regionOf))].sort((a, b) => a - b);
  const columns: Float64Array[] = [];
  if (order >= 0) {
    for (const region of regions) {
      let low = Infinity;
      let high = -Infinity;
      let members = 0;
      for (let i = 0; i < count; i++) {
        if (regionOf[i] !== region) continue;
        members++;
        low = Math.min(low, positions[i]!);
        high = Math.max(high, positions[i]!);
      }
      if (members < order + 3) {
        throw new BandwrightError(
          'INSUFFICIENT_DATA',
          `region ${region}: ${members} channel(s), baseline order ${order} needs at least ${order + 3} (terms ` +
            `plus room for the gases)`,
          { parameter: 'baselineOrder' },
        );
      }
      const mid = (low + high) / 2;
      const half = (high - low) / 2;
      for (let k = 0; k <= order; k++) {
        const column = new Float64Array(count);
        for (let i = 0; i < count; i++) {
          if (regionOf[i] !== region) continue;
          column[i] = legendre(k, half > 0 ? (positions[i]! - mid) / half : 0);
        }
        columns.push(column);
      }
    }
  }
  if (background !== undefined) columns.push(Float64Array.from(background));
  if (columns.length === 0) return [];

  const design = new Matrix(count, columns.length);
  for (let j = 0; j < columns.length; j++) {
    const column = columns[j]!;
    for (let i = 0; i < count; i++) design.set(i, j, column[i]!);
  }
  const qr = new QrDecomposition(design);
  const r = qr.upperTriangularMatrix;
  const q = qr.orthogonalMatrix;
  for (let j = 0; j < columns.length; j++) {
    let norm = 0;
    for (const value of columns[j]!) norm += value * value;
    norm = Math.sqrt(norm);
    if (!(Math.abs(r.get(j, j)) > 1e-9 * norm)) {
      if (background !== undefined && j === columns.length - 1) {
        throw new BandwrightError(
          'INVALID_VALUE',
          norm === 0
            ? 'background spectrum is zero on every channel, must have some absorbance'
            : `background spectrum is a polynomial of order <= ${order} on every region, so the baseline terms ` +
                `already remove it; drop the background or lower baselineOrder`,
          { parameter: 'background' },
        );
      }
      throw new BandwrightError(
        'INSUFFICIENT_DATA',
        `baseline term ${j} is degenerate (too few distinct channel positions)`,
        {
          parameter: 'baselineOrder',
        },
      );
    }
  }
  const basis: Float64Array[] = [];
  for (let j = 0; j < columns.length; j++) {
    const column = new Float64Array(count);
    for (let i = 0; i < count; i++) column[i] = q.get(i, j);
    basis.push(column);
  }
  return basis;
}

/**
 * Removes the span of an orthonormal basis from a vector: `a − U (Uᵀ a)`. Does not modify `a`.
 *
 * @param a - values on the channels
 * @param basis - orthonormal columns (from {@link nuisanceBasis})
 * @returns a new array
 */
export function removeSpan(a: ArrayLike<number>, basis: readonly Float64Array[]): Float64Array {
  const out = Float64Array.from(a);
  for (const u of basis) {
    let dot = 0;
    for (let i = 0; i < out.length; i++) dot += u[i]! * out[i]!;
    if (dot === 0) continue;
    for (let i = 0; i < out.length; i++) out[i]! -= dot * u[i]!;
  }
  return out;
}
