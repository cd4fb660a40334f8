/**
 * The tabular CUSUM chart of check recoveries (ISO 7870-4, "Control charts — Cumulative sum
 * charts"; e.g. Montgomery, Introduction to Statistical Quality Control, "The tabular CUSUM").
 * Pure.
 *
 * Each span check enters as z = (recovery − 100 %)/σ, σ the one in force at that check
 * (`sigma.ts`), so the sums are in units of σ around the certified value. With reference value k
 * and decision interval h (both in σ):
 *
 *   C⁺ᵢ = max(0, C⁺ᵢ₋₁ + zᵢ − k),   C⁻ᵢ = max(0, C⁻ᵢ₋₁ − zᵢ − k),   C⁺₀ = C⁻₀ = 0,
 *
 * and the chart signals at a check where C⁺ > h (drifting high) or C⁻ > h (drifting low). A shift
 * smaller than k per check is let pass; a persistent one accumulates until it crosses h, which is
 * how a slow drift (mirror fouling, a leaking cell) is seen before any single check leaves the
 * Shewhart limits.
 *
 * Defaults k = 0.5σ and h = 5σ, the usual scheme for detecting a shift of about 1σ (ISO 7870-4
 * and Montgomery, common practice, from memory): in control, one side signals about once in 465
 * checks; a 1σ shift is signalled after about 10 checks (average run lengths, from memory).
 *
 * After a failed check the sums restart at zero with the next check: a fail asks for the cause to
 * be found and removed before checks go on, and after such an action the chart starts afresh
 * (common practice). A warning does not restart them.
 */
import type { CusumSignal, RecheckPolicy } from '../calibration/method.js';

/** Default reference value k, in σ. */
export const DEFAULT_CUSUM_K = 0.5;
/** Default decision interval h, in σ. */
export const DEFAULT_CUSUM_H = 5;
/** Default verdict of a check at which the chart signals. */
export const DEFAULT_CUSUM_SIGNAL: CusumSignal = 'warning';

/** The chart's settings in force. */
export interface CusumSettings {
  /** Reference value, σ. */
  k: number;
  /** Decision interval, σ. */
  h: number;
  /** Verdict a signal gives. */
  onSignal: CusumSignal;
}

/** Direction of a signal: the checks have drifted above or below the certified value. */
export type CusumDirection = 'above' | 'below';

/** The sums after one check. */
export interface CusumPoint {
  /** C⁺ after the check, σ. */
  upper: number;
  /** C⁻ after the check, σ. */
  lower: number;
  /** The direction in which a sum is beyond h at this check, or null. */
  signal: CusumDirection | null;
  /** Position (in the series) of the first check of the current rise of C⁺, when C⁺ > 0. */
  upperSince?: number;
  /** Position of the first check of the current rise of C⁻, when C⁻ > 0. */
  lowerSince?: number;
}

/**
 * The settings a policy states, with the defaults for what it leaves out.
 *
 * @param policy - the recheck policy (optional `cusum.k`, `cusum.h` in σ, `cusum.onSignal`)
 */
export function cusumSettings(policy: Pick<RecheckPolicy, 'cusum'>): CusumSettings {
  return {
    k: policy.cusum?.k ?? DEFAULT_CUSUM_K,
    h: policy.cusum?.h ?? DEFAULT_CUSUM_H,
    onSignal: policy.cusum?.onSignal ?? DEFAULT_CUSUM_SIGNAL,
  };
}

/** The state before the first check (or after a restart). */
export const CUSUM_START: CusumPoint = { upper: 0, lower: 0, signal: null };

/**
 * One step of the tabular CUSUM.
 *
 * @param previous - the sums after the previous check ({@link CUSUM_START} for the first)
 * @param z - this check's (recovery − 100 %)/σ; NaN leaves the sums as they were
 * @param index - this check's position in the series (for `upperSince`/`lowerSince`)
 * @param settings - k and h, σ
 * @returns the sums after this check and whether it signals
 */
export function cusumStep(
  previous: CusumPoint,
  z: number,
  index: number,
  settings: Pick<CusumSettings, 'k' | 'h'>,
): CusumPoint {
  if (Number.isNaN(z)) return { ...previous, signal: signalOf(previous.upper, previous.lower, settings.h) };
  const upper = Math.max(0, previous.upper + z - settings.k);
  const lower = Math.max(0, previous.lower - z - settings.k);
  const point: CusumPoint = { upper, lower, signal: signalOf(upper, lower, settings.h) };
  if (upper > 0) point.upperSince = previous.upper > 0 ? (previous.upperSince ?? index) : index;
  if (lower > 0) point.lowerSince = previous.lower > 0 ? (previous.lowerSince ?? index) : index;
  return point;
}

function signalOf(upper: number, lower: number, h: number): CusumDirection | null {
  if (upper > h || lower > h) return upper >= lower ? 'above' : 'below';
  return null;
}

/**
 * The tabular CUSUM of a series.
 *
 * @param z - (recovery − 100 %)/σ per check, in time order
 * @param options - k and h (σ; defaults 0.5 and 5), and `restartAfter`: true at a check after which
 *   the sums restart at zero (a failed check)
 * @returns the sums after each check
 * @example
 * tabularCusum([0.2, 1.4, 1.1, 2.3]).map((p) => p.upper); // [0, 0.9, 1.5, 3.3]
 */
export function tabularCusum(
  z: readonly number[],
  options: { k?: number; h?: number; restartAfter?: readonly boolean[] } = {},
): CusumPoint[] {
  const settings = { k: options.k ?? DEFAULT_CUSUM_K, h: options.h ?? DEFAULT_CUSUM_H };
  const points: CusumPoint[] = [];
  let previous = CUSUM_START;
  z.forEach((value, i) => {
    const point = cusumStep(previous, value, i, settings);
    points.push(point);
    previous = options.restartAfter?.[i] === true ? CUSUM_START : point;
  });
  return points;
}
