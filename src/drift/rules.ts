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
    description: 'ten consecutive checks on the same side of the certified value',
  },
};

function sideWord(sign: number): string {
  return sign > 0 ? 'above' : 'below';
}

function signedLimit(sign: number, k: number): string {
  return `${sign > 0 ? '+' : '−'}${k}σ`;
}

function formatZ(z: number): string {
  const text = Math.abs(z) >= 100 ? Math.abs(z).toExponential(2) : Math.abs(z).toFixed(2);
  return `${z < 0 ? '−' : '+'}${text}σ`;
}

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
 * @param options - `labels`: a short label per check for the reasons (default `check N`, 1-based)
 * @returns the rules that fired, in the order of {@link CONTROL_RULES}
 * @example
 * controlRulesAt([2.3, 2.4], 1).map((f) => f.rule); // ['1-2s', '2-2s']
 */
export function controlRulesAt(
  z: readonly number[],
  index: number,
  options: { labels?: readonly string[] } = {},
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
  if (tenX !== 0) {
    fired.push({
      rule: '10-x',
      severity: 'reject',
      checks: range(index - 9, index),
      reason: `${label(index - 9)} to ${label(index)}: ten consecutive checks ${sideWord(tenX)} the certified value`,
    });
  }
  return fired;
}
