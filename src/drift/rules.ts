/**
 * Control rules on a series of check results (Westgard, Barry, Hunt & Groth, "A multi-rule
 * Shewhart chart for quality control in clinical chemistry", Clinical Chemistry 27 (1981) 493).
 *
 * Each check is expressed as z = (recovery − 100 %) / σ: the mean of the chart is the certified
 * value, σ is chosen by the caller (see `evaluate.ts`). "Beyond" is strict (|z| > k).
 *
 * - 1-2s (warning): this check beyond ±2σ.
 * - 1-3s (reject): this check beyond ±3σ.
 * - 2-2s (reject): this check and the one before beyond the same ±2σ limit.
 * - R-4s (reject): the range exceeds 4σ: one check beyond +2σ and one beyond −2σ. The rule is
 *   defined within one run; with one check standard per run it is applied here across two
 *   consecutive checks (this one and the one before).
 * - 4-1s (reject): this check and the three before beyond the same ±1σ limit.
 * - 10-x (reject): this check and the nine before on the same side of the mean.
 *
 * Every rule is evaluated at every check, not only after a 1-2s warning as in the 1981 flow
 * chart; computerised multirule QC usually does so (common practice, from memory), and it lets
 * the systematic-error rules (4-1s, 10-x) warn of drift that never reaches 2σ.
 *
 * The centre of the chart is the certified value, not the mean of the checks, so a run rule would
 * also fire on a constant offset that is within what the calibration itself is uncertain of: the
 * standard error of prediction includes the uncertainty of the fitted curve, which every check
 * with the calibration shares, so averaging checks does not shrink it. 10-x therefore also needs
 * the mean of its ten checks to lie more than the caller's `runOffsetFloor` (in σ: the larger of
 * the check's own standard error and the σ floor, below which an offset is negligible for the
 * acceptance decision) from the centre; 4-1s and 2-2s need every check beyond 1σ or 2σ, and σ is
 * never below either (`sigma.ts`), so they meet it by construction. Without `runOffsetFloor` the
 * rules are those of 1981.
 *
 * `CUSUM` is not judged here: `cusum.ts` keeps the cumulative sums and `evaluate.ts` adds its firing.
 */
import type { ControlRuleName } from './record.js';

/** How serious a rule is: a warning asks for a look, a reject means out of control. */
export type RuleSeverity = 'warning' | 'reject';

/** A rule that fired at a check. */
export interface RuleFiring {
  /** Rule name, e.g. `2-2s`. */
  rule: ControlRuleName;
  /** Warning (1-2s) or reject (the others). */
  severity: RuleSeverity;
  /** Positions (in the series given to {@link controlRulesAt}) of the checks the rule looked at, oldest first. */
  checks: number[];
  /** Plain words: which checks, which limit, which side. */
  reason: string;
}

/** Definition of each rule: its severity and what it says. */
export const CONTROL_RULES: Readonly<
  Record<ControlRuleName, { severity: RuleSeverity; description: string }>
> = {
  '1-2s': { severity: 'warning', description: 'one check beyond ±2σ' },
  '1-3s': { severity: 'reject', description: 'one check beyond ±3σ' },
  '2-2s': { severity: 'reject', description: 'two consecutive checks beyond the same ±2σ limit' },
  'R-4s': {
    severity: 'reject',
    description:
      'one check beyond +2σ and the next beyond −2σ, or the reverse ' +
      '(applied across two consecutive checks, one check per run)',
  },
  '4-1s': { severity: 'reject', description: 'four consecutive checks beyond the same ±1σ limit' },
  '10-x': {
    severity: 'reject',
    description:
      'ten consecutive checks on the same side of the certified value, ' +
      "their mean further from it than one check's standard error and the σ floor",
  },
  CUSUM: {
    severity: 'warning',
    description:
      'the cumulative sum of (recovery − 100 %)/σ beyond the reference value k has passed the decision ' +
      'interval h (tabular CUSUM, ISO 7870-4): a slow, persistent drift; a warning unless the method ' +
      'makes it a fail',
  },
};

function sideWord(sign: number): string {
  return sign > 0 ? 'above' : 'below';
}

function signedLimit(sign: number, k: number): string {
  return `${sign > 0 ? '+' : '−'}${k}σ`;
}

/** Largest multiple of σ printed as a number; beyond it the text says "more than". */
const LARGEST_PRINTED_MULTIPLE = 999;

/**
 * A multiple of σ as text, signed, with the digits it can carry: two decimals below 10σ
 * (`+2.10σ`), one below 100σ (`−12.4σ`), none up to 999σ (`+245σ`), and `more than +999σ`
 * beyond, never an exponent: σ has a floor, so a far larger multiple only says the check is far
 * outside the chart.
 *
 * @param z - (recovery − 100 %)/σ, dimensionless
 * @example
 * formatSigmaMultiple(-2.104); // '−2.10σ'
 */
export function formatSigmaMultiple(z: number): string {
  const sign = z < 0 ? '−' : '+';
  const size = Math.abs(z);
  if (!Number.isFinite(size) || Math.round(size) > LARGEST_PRINTED_MULTIPLE)
    return `more than ${sign}${LARGEST_PRINTED_MULTIPLE}σ`;
  const digits = size < 10 ? 2 : size < 100 ? 1 : 0;
  let text = size.toFixed(digits);
  // Rounding may carry into the next band (9.996 → 10.00): print it with that band's digits.
  if (Number(text) >= 10 && digits === 2) text = size.toFixed(1);
  if (Number(text) >= 100 && digits >= 1) text = size.toFixed(0);
  return `${sign}${text}σ`;
}

const formatZ = formatSigmaMultiple;

/** All of the last `count` values (ending at `index`) beyond `k` on the same side; returns that side or 0. */
function sameSideRun(z: readonly number[], index: number, count: number, k: number): number {
  if (index + 1 < count) return 0;
  for (const sign of [1, -1]) {
    let all = true;
    for (let j = index - count + 1; j <= index; j++) {
      if (!(sign * (z[j] as number) > k)) {
        all = false;
        break;
      }
    }
    if (all) return sign;
  }
  return 0;
}

function range(from: number, to: number): number[] {
  const out: number[] = [];
  for (let i = from; i <= to; i++) out.push(i);
  return out;
}

/**
 * The control rules that fire at one check of a series, looking back from it.
 *
 * @param z - the series of checks in time order, each as (recovery − 100) / σ (dimensionless);
 *   NaN entries never satisfy a rule
 * @param index - the check to judge (0-based); only checks up to it are looked at
 * @param options - `labels`: a short label per check for the reasons (default `check N`, 1-based);
 *   `runOffsetFloor`: how far (in σ, ≥ 0) the mean of a 10-x run must lie from the centre for the
 *   rule to fire (default 0: the 1981 rule)
 * @returns the rules that fired, in the order of {@link CONTROL_RULES} (never `CUSUM`)
 * @example
 * controlRulesAt([2.3, 2.4], 1).map((f) => f.rule); // ['1-2s', '2-2s']
 */
export function controlRulesAt(
  z: readonly number[],
  index: number,
  options: { labels?: readonly string[]; runOffsetFloor?: number } = {},
): RuleFiring[] {
  const label = (i: number): string => options.labels?.[i] ?? `check ${i + 1}`;
  const current = z[index];
  if (current === undefined || Number.isNaN(current)) return [];
  const fired: RuleFiring[] = [];
  const sign = current > 0 ? 1 : current < 0 ? -1 : 0;
  if (Math.abs(current) > 2) {
    fired.push({
      rule: '1-2s',
      severity: 'warning',
      checks: [index],
      reason: `${label(index)} is at ${formatZ(current)}, beyond ${signedLimit(sign, 2)}`,
    });
  }
  if (Math.abs(current) > 3) {
    fired.push({
      rule: '1-3s',
      severity: 'reject',
      checks: [index],
      reason: `${label(index)} is at ${formatZ(current)}, beyond ${signedLimit(sign, 3)}`,
    });
  }
  if (index >= 1) {
    const previous = z[index - 1] as number;
    const twoTwo = sameSideRun(z, index, 2, 2);
    if (twoTwo !== 0) {
      fired.push({
        rule: '2-2s',
        severity: 'reject',
        checks: [index - 1, index],
        reason:
          `${label(index - 1)} (${formatZ(previous)}) and ${label(index)} (${formatZ(current)}) ` +
          `are both beyond ${signedLimit(twoTwo, 2)}`,
      });
    }
    if ((previous > 2 && current < -2) || (previous < -2 && current > 2)) {
      fired.push({
        rule: 'R-4s',
        severity: 'reject',
        checks: [index - 1, index],
        reason:
          `${label(index - 1)} (${formatZ(previous)}) and ${label(index)} (${formatZ(current)}) ` +
          'lie beyond opposite 2σ limits, a range above 4σ (applied across two consecutive checks)',
      });
    }
  }
  const fourOne = sameSideRun(z, index, 4, 1);
  if (fourOne !== 0) {
    fired.push({
      rule: '4-1s',
      severity: 'reject',
      checks: range(index - 3, index),
      reason: `${label(index - 3)} to ${label(index)}: four consecutive checks beyond ${signedLimit(fourOne, 1)}`,
    });
  }
  const tenX = sameSideRun(z, index, 10, 0);
  const offsetFloor = options.runOffsetFloor ?? 0;
  const runMean = tenX === 0 ? 0 : range(index - 9, index).reduce((sum, i) => sum + (z[i] as number), 0) / 10;
  if (tenX !== 0 && Math.abs(runMean) > offsetFloor) {
    fired.push({
      rule: '10-x',
      severity: 'reject',
      checks: range(index - 9, index),
      reason:
        `${label(index - 9)} to ${label(index)}: ten consecutive checks ${sideWord(tenX)} the certified value` +
        (offsetFloor > 0
          ? `, their mean at ${formatZ(runMean)}, further from it than one check's standard error ` +
            `and the σ floor (${formatZ(tenX * offsetFloor)})`
          : ''),
    });
  }
  return fired;
}
