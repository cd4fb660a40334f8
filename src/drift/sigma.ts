/**
 * σ of the control rules (DESIGN §3 "Drift"): the scatter of check recoveries the rules and the
 * CUSUM chart measure deviations in, and the three things that set it. Pure.
 *
 * σ at a check is the largest of
 * - the baseline SD: the sample SD (n − 1) of the first 8 checks within tolerance, frozen from the
 *   check after them on (Shewhart phase I / phase II), so that later drift cannot widen the limits;
 * - the check's own standard error of prediction in % of the certified value (se/certified × 100):
 *   checks cannot show a scatter smaller than what one check resolves, so a baseline that agrees
 *   more closely (the same scan rechecked, a very stable instrument) does not make the limits
 *   narrower than a check's own uncertainty;
 * - a floor: the method's `recheck.sigmaFloorPct`, by default a tenth of the tolerance, so that
 *   the rules never judge scatter that is negligible for the acceptance decision (the "rule of
 *   ten": a measurement resolving a tenth of the tolerance is enough to judge against it, common
 *   practice, from memory).
 *
 * Before the baseline exists the history cannot estimate σ: σ is then the check's own standard
 * error, but not less than tolerance/3 (nor the floor), so that the ±3σ action limit is not inside
 * the tolerance before the checks' scatter is known — a first check inside the tolerance is not
 * failed on statistics the history cannot yet support.
 */
import type { RecheckPolicy } from '../calibration/method.js';
import type { CheckRecord } from './record.js';

/** The default floor of σ is the tolerance divided by this (a tenth). */
export const DEFAULT_SIGMA_FLOOR_DIVISOR = 10;

/** Before the baseline exists the floor of σ is the tolerance divided by this (the action limit is the tolerance). */
export const SHORT_HISTORY_FLOOR_DIVISOR = 3;

/** What set σ: the frozen baseline SD, the check's own standard error, or the floor. */
export type SigmaSource = 'baseline' | 'check-se' | 'floor';

/** The σ the control rules use at one check, what set it, and the candidates it was chosen from. */
export interface SigmaChoice {
  /** σ, % recovery. */
  valuePct: number;
  /** Which of the three set it. */
  basis: SigmaSource;
  /** The baseline is not complete yet: σ cannot be estimated from the history. */
  shortHistory: boolean;
  /** SD of the baseline checks, % recovery, when the baseline is complete. */
  baselineSdPct: number | null;
  /** The check's own standard error of prediction, % of the certified value, when known. */
  checkSePct: number | null;
  /** The floor in force, % recovery (before the baseline: at least tolerance/3). */
  floorPct: number;
  /** How the floor was set, in words (e.g. `tolerance/10 = 5 %/10`). */
  floorRule: string;
  /** Plain words: which σ and why. */
  reason: string;
}

/** The baseline as far as σ needs it. */
export interface BaselineState {
  /** Checks the baseline needs. */
  size: number;
  /** Checks within tolerance it holds so far. */
  have: number;
  /** Sample SD of the baseline recoveries, %, once complete. */
  sdPct?: number;
  /** Mean of the baseline recoveries, %, once complete. */
  meanPct?: number;
  /** Times of its first and last check, ISO, once complete. */
  from?: string;
  to?: string;
}

function pct(value: number, digits = 3): string {
  return value.toFixed(digits);
}

function trimmed(value: number): string {
  return pct(value, 3).replace(/\.?0+$/, '');
}

/**
 * The floor of σ a policy states, or its default (a tenth of the tolerance).
 *
 * @param policy - the recheck policy (tolerance ± %, optional `sigmaFloorPct`, % recovery)
 * @returns the floor, % recovery, and how it was set in words
 */
export function sigmaFloor(policy: RecheckPolicy): { valuePct: number; rule: string } {
  if (policy.sigmaFloorPct !== undefined)
    return { valuePct: policy.sigmaFloorPct, rule: "the method's recheck.sigmaFloorPct" };
  const value = policy.tolerancePct / DEFAULT_SIGMA_FLOOR_DIVISOR;
  return { valuePct: value, rule: `tolerance/10 = ${trimmed(policy.tolerancePct)} %/10` };
}

/**
 * A check's standard error of prediction in % of its certified value: se/certified × 100.
 *
 * @param record - the check's `se` and `certified` (same unit)
 * @returns the standard error, %, or undefined when it is not a positive finite number (zero gas,
 *   a record without a standard error)
 * @example
 * checkStandardErrorPct({ se: 1.2, certified: 100 }); // 1.2
 */
export function checkStandardErrorPct(record: Pick<CheckRecord, 'se' | 'certified'>): number | undefined {
  if (!(record.certified > 0)) return undefined;
  const value = (record.se / record.certified) * 100;
  return Number.isFinite(value) && value > 0 ? value : undefined;
}

function day(iso: string | undefined): string {
  return (iso ?? '').slice(0, 10);
}

/**
 * Chooses σ at a check: the largest of the frozen baseline SD (once the baseline is complete), the
 * check's own standard error and the floor; before the baseline, the larger of the standard error
 * and the short-history floor (tolerance/3, or the policy's floor if higher).
 *
 * @param policy - tolerance (± %) and optional floor (% recovery)
 * @param baseline - the baseline so far (size, checks it holds, SD and mean once complete)
 * @param checkSePct - the check's standard error, % of the certified value (undefined when unknown)
 * @returns the σ, what set it, the candidates and the reason in words
 * @example
 * chooseSigma({ everyDays: 7, tolerancePct: 5 }, { size: 8, have: 8, sdPct: 1e-14, meanPct: 100.74 }, 1.2).basis;
 * // 'check-se'
 */
export function chooseSigma(
  policy: RecheckPolicy,
  baseline: BaselineState,
  checkSePct?: number,
): SigmaChoice {
  const tolerance = policy.tolerancePct;
  const floor = sigmaFloor(policy);
  const se =
    checkSePct !== undefined && checkSePct > 0 && Number.isFinite(checkSePct) ? checkSePct : undefined;
  const seText =
    se === undefined ? 'the check has no standard error' : `this check's standard error, ${pct(se)} %`;
  const complete = baseline.sdPct !== undefined;
  if (!complete) {
    const shortFloor = tolerance / SHORT_HISTORY_FLOOR_DIVISOR;
    const useShort = shortFloor >= floor.valuePct;
    const floorPct = useShort ? shortFloor : floor.valuePct;
    const floorRule = useShort ? `tolerance/3 = ${trimmed(tolerance)} %/3` : floor.rule;
    const so = `${baseline.have} of the ${baseline.size} baseline checks within tolerance exist so far`;
    const common = {
      shortHistory: true,
      baselineSdPct: null,
      checkSePct: se ?? null,
      floorPct,
      floorRule,
    };
    if (se !== undefined && se > floorPct) {
      return {
        ...common,
        valuePct: se,
        basis: 'check-se',
        reason:
          `σ = ${pct(se)} %, this check's own standard error of prediction: ${so}, too few to estimate σ ` +
          `from the checks, and the standard error is above the short-history floor (${floorRule} = ` +
          `${pct(floorPct)} %)${wideNote(se, tolerance, 'a single check is too uncertain for this tolerance')}`,
      };
    }
    const head = useShort
      ? `σ = tolerance/3 = ${trimmed(tolerance)} %/3 = ${pct(floorPct)} %: ${so}, so the ±3σ action limit is the tolerance`
      : `σ = ${pct(floorPct)} %, ${floor.rule}: ${so}`;
    return {
      ...common,
      valuePct: floorPct,
      basis: 'floor',
      reason:
        `${head} (the short-history floor: the history is too short to estimate σ, and ` +
        `${se === undefined ? 'the check has no standard error' : `the check's own standard error, ${pct(se)} %, is smaller`})`,
    };
  }
  const sd = baseline.sdPct as number;
  const span = `${baseline.size} baseline checks (${day(baseline.from)} to ${day(baseline.to)})`;
  const common = {
    shortHistory: false,
    baselineSdPct: sd,
    checkSePct: se ?? null,
    floorPct: floor.valuePct,
    floorRule: floor.rule,
  };
  const floorText = `the floor, ${pct(floor.valuePct)} % (${floor.rule})`;
  if (sd > floor.valuePct && (se === undefined || sd > se)) {
    return {
      ...common,
      valuePct: sd,
      basis: 'baseline',
      reason:
        `σ = ${pct(sd)} %, the SD of the first ${baseline.size} checks within tolerance ` +
        `(${day(baseline.from)} to ${day(baseline.to)}, mean ${pct(baseline.meanPct ?? Number.NaN, 2)} %), ` +
        `frozen so that later drift cannot widen the limits; it is above ${seText} and ${floorText}` +
        wideNote(sd, tolerance, "the checks' repeatability is poor for this tolerance"),
    };
  }
  if (se !== undefined && se > floor.valuePct) {
    return {
      ...common,
      valuePct: se,
      basis: 'check-se',
      reason:
        `σ = ${pct(se)} %, this check's own standard error of prediction: the SD of the ${span}, ` +
        `${pct(sd)} %, is smaller than what one check can resolve; ${floorText} is smaller too` +
        wideNote(se, tolerance, 'a single check is too uncertain for this tolerance'),
    };
  }
  return {
    ...common,
    valuePct: floor.valuePct,
    basis: 'floor',
    reason:
      `σ = ${pct(floor.valuePct)} %, the floor (${floor.rule}): the SD of the ${span}, ${pct(sd)} %, ` +
      (se === undefined
        ? 'is smaller, and the check has no standard error'
        : `and this check's standard error, ${pct(se)} %, are both smaller`) +
      wideNote(floor.valuePct, tolerance, 'the floor is high for this tolerance'),
  };
}

function wideNote(sigma: number, tolerance: number, why: string): string {
  return 3 * sigma > tolerance
    ? `; its ±3σ action limit (±${pct(3 * sigma, 2)} %) is wider than the tolerance: ${why}`
    : '';
}
