/**
 * Weights of a univariate calibration (variance of a response ∝ 1/w):
 * - `none`: w = 1.
 * - `1/x`, `1/x2`: w = 1/max(x, floor) or 1/max(x, floor)². The floor stands in for x at and
 *   below it, so standards at zero concentration (blanks) get a finite weight. It defaults to the
 *   lowest non-zero concentration among the standards (a blank is then weighted like the lowest
 *   standard) and is recorded in the model.
 * - `replicates`: w = 1/sᵢ² with sᵢ the SD of the replicate responses at each level; every level
 *   needs at least 2 replicates and some scatter. Between levels s(x) is interpolated linearly in
 *   x and held constant beyond the lowest and highest level.
 * Weights are normalised so that Σw = n; the residual SD s is then on the scale of a typical
 * response, and the variance of one new observation at x is s²/w(x).
 */
import { BandwrightError } from '../../errors.js';
import type { ReplicateLevel, UnivariateModel, WeightScheme, Weighting } from './model.js';

/** Linear interpolation of level SDs, held constant beyond the ends. */
function interpolateSD(levels: readonly ReplicateLevel[], x: number): number {
  const first = levels[0] as ReplicateLevel;
  const last = levels[levels.length - 1] as ReplicateLevel;
  if (x <= first.concentration) return first.sd;
  if (x >= last.concentration) return last.sd;
  for (let i = 1; i < levels.length; i++) {
    const right = levels[i] as ReplicateLevel;
    if (x <= right.concentration) {
      const left = levels[i - 1] as ReplicateLevel;
      const fraction = (x - left.concentration) / (right.concentration - left.concentration);
      return left.sd + fraction * (right.sd - left.sd);
    }
  }
  return last.sd;
}

function rawWeight(weighting: Omit<Weighting, 'scale' | 'rule'>, x: number): number {
  switch (weighting.scheme) {
    case 'none':
      return 1;
    case '1/x':
      return 1 / Math.max(x, weighting.floor as number);
    case '1/x2':
      return 1 / Math.max(x, weighting.floor as number) ** 2;
    case 'replicates':
      return 1 / interpolateSD(weighting.levels as ReplicateLevel[], x) ** 2;
  }
}

/**
 * Weight w(x) of a new observation at concentration x under the model's weighting (1 when unweighted).
 *
 * @param model - a fitted model
 * @param concentration - concentration, calibration units
 * @returns the weight, on the same normalised scale as the standards' weights
 */
export function weightAt(model: Pick<UnivariateModel, 'weighting'>, concentration: number): number {
  return model.weighting.scale * rawWeight(model.weighting, concentration);
}

/** Standards grouped by concentration level, ascending, with the responses at each. */
export interface LevelGroup {
  /** The level's concentration. */
  level: number;
  /** Responses of the standards at it, in input order. */
  responses: number[];
}

/**
 * Groups standards by concentration level.
 *
 * @param concentration - concentrations of the standards
 * @param response - their responses, pairwise
 * @returns the levels, ascending
 */
export function groupLevels(concentration: readonly number[], response: readonly number[]): LevelGroup[] {
  const byLevel = new Map<number, number[]>();
  concentration.forEach((x, i) => {
    const list = byLevel.get(x) ?? [];
    list.push(response[i] as number);
    byLevel.set(x, list);
  });
  return [...byLevel.entries()]
    .sort((p, q) => p[0] - q[0])
    .map(([level, responses]) => ({ level, responses }));
}

function sampleSD(values: readonly number[]): number {
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  const sum = values.reduce((a, b) => a + (b - mean) ** 2, 0);
  return Math.sqrt(sum / (values.length - 1));
}

/**
 * The weighting of a fit and the normalised weight of each standard.
 *
 * @param x - concentrations of the standards (calibration units)
 * @param groups - the standards grouped by level ({@link groupLevels})
 * @param scheme - the weighting scheme
 * @param weightFloor - floor for `1/x` and `1/x2` (concentration > 0), or undefined for the default
 * @returns the weighting (rule in words), each standard's weight (Σw = n) and notes about blanks
 * @throws BandwrightError `INVALID_VALUE` for a floor ≤ 0 or replicate levels without scatter;
 *   `INSUFFICIENT_DATA` when `replicates` finds a level with one standard
 */
export function weightStandards(
  x: readonly number[],
  groups: readonly LevelGroup[],
  scheme: WeightScheme,
  weightFloor: number | undefined,
): { weighting: Weighting; weights: number[]; warnings: string[] } {
  const warnings: string[] = [];
  let floor: number | null = null;
  let replicateLevels: ReplicateLevel[] | null = null;
  let rule = 'unweighted (w = 1)';
  if (scheme === '1/x' || scheme === '1/x2') {
    if (weightFloor !== undefined) {
      if (!(Number.isFinite(weightFloor) && weightFloor > 0)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `weightFloor = ${weightFloor}, must be a finite concentration > 0 (it stands in for x in 1/x weights ` +
            `at and below it)`,
          { parameter: 'weightFloor' },
        );
      }
      floor = weightFloor;
    } else {
      floor = groups.map((group) => group.level).find((level) => level > 0) as number;
    }
    const power = scheme === '1/x' ? 'max(x, floor)' : 'max(x, floor)²';
    rule =
      `w = 1/${power} with floor ` +
      `${floor}${weightFloor === undefined ? ' (the lowest non-zero concentration)' : ''}, normalised so Σw = n`;
    const blanks = x.filter((value) => value < (floor as number)).length;
    if (blanks > 0) {
      warnings.push(
        `weights ${scheme}: ${blanks} standard${blanks === 1 ? '' : 's'} below the floor ${floor} (e.g. ` +
          `zero-concentration blanks) weighted as if at ` +
          `${floor}${weightFloor === undefined ? '; set weightFloor to choose another floor' : ''}`,
      );
    }
  } else if (scheme === 'replicates') {
    replicateLevels = groups.map((group) => {
      if (group.responses.length < 2) {
        throw new BandwrightError(
          'INSUFFICIENT_DATA',
          `weights replicates: concentration ${group.level} has ${group.responses.length} standard, needs at ` +
            `least 2 replicates at every level to estimate its SD`,
          { parameter: 'weights' },
        );
      }
      const sd = sampleSD(group.responses);
      if (!(sd > 0)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `weights replicates: the ${group.responses.length} replicates at concentration ${group.level} have ` +
            `identical responses (SD 0), so 1/s² is undefined`,
          { parameter: 'weights' },
        );
      }
      return { concentration: group.level, count: group.responses.length, sd };
    });
    rule =
      'w = 1/s(x)² with s the replicate SD at each level, linearly interpolated between levels and constant ' +
      'beyond them, normalised so Σw = n';
  }
  const provisional = { scheme, floor, levels: replicateLevels };
  const raw = x.map((value) => rawWeight(provisional, value));
  const rawSum = raw.reduce((a, b) => a + b, 0);
  const scale = x.length / rawSum;
  const weighting: Weighting = { scheme, floor, scale, levels: replicateLevels, rule };
  return { weighting, weights: raw.map((w) => w * scale), warnings };
}
