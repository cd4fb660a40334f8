/**
 * Inverting a calibration curve: the root of a second-order curve on the branch that holds the
 * calibrated range, and Fieller's interval found numerically for weighted fits (the set of x with
 * (ȳ0 − ŷ(x))² ≤ t²·(s²/(m·w(x)) + Var ŷ(x)), w(x) taken at each candidate x).
 */
import { BandwrightError } from '../../errors.js';
import { fittedVarianceAt, type UnivariateModel } from './model.js';
import { weightAt } from './weights.js';
import { significantDigits } from '../../words.js';

/**
 * Roots of A·z² + B·z + C = 0 by the cancellation-free formula, ascending.
 *
 * @returns the real roots (one when A = 0, none when complex or A = B = 0)
 */
export function quadraticRoots(A: number, B: number, C: number): number[] {
  if (A === 0) return B === 0 ? [] : [-C / B];
  const discriminant = B * B - 4 * A * C;
  if (discriminant < 0) return [];
  const q = -0.5 * (B + (B >= 0 ? 1 : -1) * Math.sqrt(discriminant));
  const roots = [q / A];
  if (q !== 0) roots.push(C / q);
  return roots.sort((p, r) => p - r);
}

/**
 * The concentration at which the model's curve gives a response: (target − a)/b for straight
 * lines; for a second-order curve the root inside the calibrated range, or outside it the root on
 * the branch of the curve that holds the range.
 *
 * @param model - a fitted model
 * @param target - the response (mean of the sample's responses)
 * @returns the concentration, calibration units
 * @throws BandwrightError `NO_SOLUTION` when the response is beyond the curve's vertex or is
 *   reached twice inside the calibrated range
 */
export function invertCurve(model: UnivariateModel, target: number): number {
  const { a, b, c } = model.coefficients;
  const [low, high] = model.range;
  if (c === 0) return (target - a) / b;
  const vertex = -b / (2 * c);
  const roots = quadraticRoots(c, b, a - target);
  if (roots.length === 0) {
    const vertexResponse = a + b * vertex + c * vertex * vertex;
    throw new BandwrightError(
      'NO_SOLUTION',
      `response ${significantDigits(target)} is beyond the vertex of the second-order calibration (its ` +
        `${c < 0 ? 'highest' : 'lowest'} response is ${significantDigits(vertexResponse)}, at concentration ` +
        `${significantDigits(vertex)}): no concentration gives this response`,
      { parameter: 'responses' },
    );
  }
  const tolerance = 1e-9 * (high - low);
  const inside = roots.filter((root) => root >= low - tolerance && root <= high + tolerance);
  let root: number;
  if (inside.length === 1) root = inside[0] as number;
  else if (inside.length === 2) {
    throw new BandwrightError(
      'NO_SOLUTION',
      `response ${significantDigits(target)} is reached twice inside the calibrated range (at concentrations ` +
        `${significantDigits(inside[0] as number)} and ${significantDigits(inside[1] as number)}), ` +
        `because the second-order curve ` +
        `turns at ${significantDigits(vertex)}: the calibration is not monotonic there`,
      { parameter: 'responses' },
    );
  } else {
    // Outside the range: stay on the branch of the curve that holds the calibrated range.
    const side = Math.sign((low + high) / 2 - vertex);
    const onBranch = roots.filter((candidate) => Math.sign(candidate - vertex) === side || side === 0);
    const pool = onBranch.length > 0 ? onBranch : roots;
    root = pool.reduce((best, candidate) =>
      Math.min(Math.abs(candidate - low), Math.abs(candidate - high)) <
      Math.min(Math.abs(best - low), Math.abs(best - high))
        ? candidate
        : best,
    );
  }
  // One Newton step removes the last rounding of the closed form.
  const slope = b + 2 * c * root;
  if (slope !== 0) root -= (a + b * root + c * root * root - target) / slope;
  return root;
}

/**
 * Ends of {x : (ȳ0 − ŷ(x))² ≤ t²·(s²/(m·w(x)) + Var ŷ(x))} around x̂0, found by stepping outwards
 * until the inequality fails and then bisecting. An end that is not found within 1e8 times the
 * calibrated range is unbounded (null).
 *
 * @param model - a fitted model
 * @param mean - mean response ȳ0 of the sample
 * @param m - number of responses averaged
 * @param t - the t quantile of the interval
 * @param start - the estimate x̂0 (inside the set)
 * @param se - its standard error (sets the first step)
 * @returns the ends, null where unbounded
 */
export function fiellerByBracketing(
  model: UnivariateModel,
  mean: number,
  m: number,
  t: number,
  start: number,
  se: number,
): { low: number | null; high: number | null } {
  const { a, b, c } = model.coefficients;
  const s2 = model.residualSD * model.residualSD;
  const excess = (x: number): number => {
    const residual = mean - (a + b * x + c * x * x);
    return (
      residual * residual - t * t * (s2 / (m * weightAt(model, x)) + fittedVarianceAt(model.covariance, x))
    );
  };
  const width = Math.max(model.range[1] - model.range[0], Math.abs(start));
  const end = (direction: 1 | -1): number | null => {
    let inside = start;
    let step = Math.max(t * se, width * 1e-6);
    let outside: number | null = null;
    while (step <= 1e8 * width) {
      const candidate = start + direction * step;
      if (excess(candidate) >= 0) {
        outside = candidate;
        break;
      }
      inside = candidate;
      step *= 2;
    }
    if (outside === null) return null;
    let beyond: number = outside;
    for (let iteration = 0; iteration < 200 && Math.abs(beyond - inside) > 1e-14 * width; iteration++) {
      const middle: number = (inside + beyond) / 2;
      if (excess(middle) >= 0) beyond = middle;
      else inside = middle;
    }
    return (inside + beyond) / 2;
  };
  return { low: end(-1), high: end(1) };
}
