/**
 * Drift trend: a least-squares straight line of recovery against time over the recent checks,
 * its uncertainty, and the projected date it leaves the tolerance.
 *
 * Model: R(t) = a + b·(t − t̄), t in days, t̄ the mean time of the checks used (centring keeps the
 * fit well conditioned whatever the epoch). Fitted by QR (`leastSquares`). The slope is tested
 * against zero with Student's t, df = n − 2: T = b / se(b), se(b) = s / √Sxx (ordinary least
 * squares; e.g. Draper & Smith, Applied Regression Analysis, §1.4, from memory). When |T| is below
 * t(1 − α/2, n − 2) the verdict is "no significant drift".
 *
 * Projection: the fitted line crosses the limit L = 100 ± tolerance at t̄ + (L − a)/b. Its range
 * is the set of times where the confidence band of the line, a + b·u ± t·s·√(1/n + u²/Sxx), reaches
 * L (Fieller's construction, as in inverse prediction): the roots of
 * (b² − t²s²/Sxx)·u² + 2b(a − L)·u + (a − L)² − t²s²/n = 0. When the slope is significant the
 * leading coefficient is positive and the range is bounded.
 */
import { isBandwrightError } from '../errors.js';
import { criticalT, tCdf } from '../stats/distributions.js';
import { leastSquares } from '../stats/least-squares.js';

/** Milliseconds in a day. */
export const DAY_MS = 86_400_000;

/** A point of the trend: a time and a recovery. */
export interface TrendPoint {
  /** ISO 8601 time of the check. */
  time: string;
  /** Recovery, %. */
  recoveryPct: number;
}

/** Options of {@link fitDriftTrend}. */
export interface TrendOptions {
  /** Tolerance, ± % recovery around 100 %; the projection is to 100 ± tolerance. */
  tolerancePct: number;
  /** Use at most this many of the latest points (default 10). */
  maxPoints?: number;
  /** Fit only with at least this many points (default 4, so that df ≥ 2). */
  minimumPoints?: number;
  /** Confidence level of the slope test and the projection range (default 0.95). */
  level?: number;
  /**
   * Smallest scatter of the checks about the line the slope test uses, % recovery (default 0):
   * checks that agree more closely than one check resolves (the same scan rechecked) would
   * otherwise make a slope of rounding noise "significant". The residual SD reported is the fitted one.
   */
  scatterFloorPct?: number;
}

/** When the fitted line leaves (or left) the tolerance. */
export interface TrendProjection {
  /** Which limit the line heads for. */
  limit: 'upper' | 'lower';
  /** The limit, % recovery (100 ± tolerance). */
  limitPct: number;
  /** ISO date-time at which the fitted line crosses the limit. */
  date: string;
  /** Earliest crossing consistent with the line's confidence band, ISO. */
  earliest: string;
  /** Latest crossing consistent with the line's confidence band, ISO. */
  latest: string;
  /** True when the crossing is at or before the last check used (the line is already outside). */
  alreadyOutside: boolean;
}

/** A fitted drift trend (plain, JSON-safe). */
export interface DriftTrend {
  /** `insufficient` (too few usable points), `none` (no significant drift) or `drift`. */
  status: 'insufficient' | 'none' | 'drift';
  /** One line for people, e.g. `no significant drift (…)`. */
  summary: string;
  /** Number of points fitted (0 when insufficient). */
  points: number;
  /** Points needed for a fit. */
  minimumPoints: number;
  /** Confidence level used. */
  level: number;
  /** Time of the first and last point fitted, ISO. */
  from?: string;
  to?: string;
  /** The centre t̄ of the times, ISO: the line is a + b·(t − t̄) with t in days. */
  origin?: string;
  /** a: recovery of the fitted line at `origin`, %. */
  interceptPct?: number;
  /** b: slope, % recovery per day. */
  slopePctPerDay?: number;
  /** Standard error of the slope, % per day. */
  slopeStandardErrorPctPerDay?: number;
  /** Residual SD about the line, % recovery. */
  residualSdPct?: number;
  /** Scatter the slope test, the projection range and the band use: the residual SD, or the floor when larger, %. */
  scatterPct?: number;
  /** Σ (t − t̄)², days². */
  sxxDays2?: number;
  /** Residual degrees of freedom, n − 2. */
  df?: number;
  /** b / se(b) (±Infinity for a noise-free line). */
  tStatistic?: number;
  /** Two-sided p-value of the slope. */
  pValue?: number;
  /** t(1 − α/2, df). */
  criticalT?: number;
  /** Projected crossing of the tolerance; present only when `status` is `drift`. */
  projection?: TrendProjection;
}

/** Largest time a Date can hold, ms from the epoch (ECMAScript's ±8.64e15). */
const LAST_DATE_MS = 8.64e15;

function isoAt(originMs: number, days: number): string {
  const ms = originMs + days * DAY_MS;
  return new Date(Math.max(-LAST_DATE_MS, Math.min(LAST_DATE_MS, ms))).toISOString();
}

/** Whether a time so many days from the origin is one a Date can hold. */
function representable(originMs: number, days: number): boolean {
  return Math.abs(originMs + days * DAY_MS) <= LAST_DATE_MS;
}

function formatSlope(perDay: number, se: number): string {
  const week = (v: number): string => (v * 7).toFixed(Math.abs(v * 7) >= 1 ? 2 : 3);
  return `${perDay * 7 >= 0 ? '+' : '−'}${week(Math.abs(perDay))} ± ${week(se)} %/week`;
}

function formatP(p: number): string {
  if (p < 0.001) return 'p < 0.001';
  return `p = ${p.toFixed(3)}`;
}

/**
 * Fits the drift trend of recovery against time.
 *
 * @param points - checks (any order; sorted by time here), recovery in %
 * @param options - tolerance (± %), window size, minimum points, level
 * @returns the trend; `status: 'insufficient'` (never an error) when there are too few points or
 *   all fall at one time
 * @example
 * const trend = fitDriftTrend(points, { tolerancePct: 5 });
 * if (trend.status === 'drift') console.log(trend.projection?.date);
 */
export function fitDriftTrend(points: readonly TrendPoint[], options: TrendOptions): DriftTrend {
  const level = options.level ?? 0.95;
  const minimumPoints = Math.max(3, options.minimumPoints ?? 4);
  const maxPoints = Math.max(minimumPoints, options.maxPoints ?? 10);
  const sorted = points
    .map((p, i) => ({ ...p, ms: Date.parse(p.time), i }))
    .filter((p) => Number.isFinite(p.ms) && Number.isFinite(p.recoveryPct))
    .sort((a, b) => a.ms - b.ms || a.i - b.i);
  const used = sorted.slice(Math.max(0, sorted.length - maxPoints));
  const base = { minimumPoints, level };
  if (used.length < minimumPoints) {
    return {
      status: 'insufficient',
      summary: `no trend yet: ${used.length} check(s), a trend needs at least ${minimumPoints}`,
      points: used.length,
      ...base,
    };
  }
  const n = used.length;
  const firstMs = (used[0] as (typeof used)[number]).ms;
  const days = used.map((p) => (p.ms - firstMs) / DAY_MS);
  const meanDay = days.reduce((s, d) => s + d, 0) / n;
  const u = days.map((d) => d - meanDay);
  const sxx = u.reduce((s, v) => s + v * v, 0);
  const from = new Date(firstMs).toISOString();
  const to = new Date((used[n - 1] as (typeof used)[number]).ms).toISOString();
  if (!(sxx > 0)) {
    return {
      status: 'insufficient',
      summary: `no trend: all ${n} checks are at the same time`,
      points: n,
      from,
      to,
      ...base,
    };
  }
  let fit;
  try {
    fit = leastSquares(
      u.map((v) => [1, v]),
      used.map((p) => p.recoveryPct),
      { columnNames: ['recovery at the mean time', 'slope per day'] },
    );
  } catch (error) {
    if (isBandwrightError(error, 'SINGULAR'))
      return { status: 'insufficient', summary: `no trend: ${error.message}`, points: n, from, to, ...base };
    throw error;
  }
  const a = fit.coefficients[0] as number;
  const b = fit.coefficients[1] as number;
  const fitted = fit.residualSD;
  const s = Math.max(fitted, options.scatterFloorPct ?? 0);
  const df = fit.degreesOfFreedom;
  const seSlope = s / Math.sqrt(sxx);
  const tStatistic =
    seSlope > 0 ? b / seSlope : b === 0 ? 0 : b > 0 ? Number.POSITIVE_INFINITY : Number.NEGATIVE_INFINITY;
  const pValue = Number.isFinite(tStatistic) ? 2 * (1 - tCdf(Math.abs(tStatistic), df)) : 0;
  const tCritical = criticalT(level, df);
  const originMs = firstMs + meanDay * DAY_MS;
  const trend: DriftTrend = {
    status: 'none',
    summary: '',
    points: n,
    ...base,
    from,
    to,
    origin: new Date(originMs).toISOString(),
    interceptPct: a,
    slopePctPerDay: b,
    slopeStandardErrorPctPerDay: seSlope,
    residualSdPct: fitted,
    scatterPct: s,
    sxxDays2: sxx,
    df,
    tStatistic,
    pValue,
    criticalT: tCritical,
  };
  const slopeText = `${formatSlope(b, seSlope)} over the last ${n} checks, ${formatP(pValue)}`;
  if (!(Math.abs(tStatistic) > tCritical)) {
    trend.summary = `no significant drift (${slopeText})`;
    return trend;
  }
  trend.status = 'drift';
  const limit: 'upper' | 'lower' = b > 0 ? 'upper' : 'lower';
  const limitPct = 100 + (limit === 'upper' ? options.tolerancePct : -options.tolerancePct);
  const crossing = (limitPct - a) / b;
  if (!representable(originMs, crossing)) {
    trend.summary = `drift ${slopeText}, but too slow to reach ${limitPct} % in any time a calendar can hold`;
    return trend;
  }
  const q = tCritical * tCritical * s * s;
  const A = b * b - q / sxx;
  const B = 2 * b * (a - limitPct);
  const C = (a - limitPct) ** 2 - q / n;
  let earliest = crossing;
  let latest = crossing;
  const discriminant = B * B - 4 * A * C;
  if (q > 0 && A > 0 && discriminant >= 0) {
    // Stable roots of the quadratic (no cancellation when B is large).
    const root = Math.sqrt(discriminant);
    const qq = -0.5 * (B + (B >= 0 ? root : -root));
    const r1 = qq / A;
    const r2 = qq !== 0 ? C / qq : r1;
    earliest = Math.min(r1, r2);
    latest = Math.max(r1, r2);
  }
  const lastU = u[n - 1] as number;
  const alreadyOutside = crossing <= lastU;
  trend.projection = {
    limit,
    limitPct,
    date: isoAt(originMs, crossing),
    earliest: isoAt(originMs, earliest),
    latest: isoAt(originMs, latest),
    alreadyOutside,
  };
  const day = (iso: string): string => iso.slice(0, 10);
  trend.summary = alreadyOutside
    ? `drift ${slopeText}: the trend line crossed ${limitPct} % on ${day(trend.projection.date)}`
    : `drift ${slopeText}: projected to cross ${limitPct} % on ${day(trend.projection.date)} ` +
      `(${Math.round(level * 100)} % range ${day(trend.projection.earliest)} ` +
      `to ${day(trend.projection.latest)})`;
  return trend;
}

/**
 * The fitted line and its confidence band at a time (for plots).
 *
 * @param trend - a fitted trend (status `none` or `drift`)
 * @param time - ISO time
 * @returns recovery of the line and the band ends, %, or undefined when the trend has no line
 */
export function trendAt(
  trend: DriftTrend,
  time: string,
): { recoveryPct: number; low: number; high: number } | undefined {
  if (
    trend.status === 'insufficient' ||
    trend.origin === undefined ||
    trend.interceptPct === undefined ||
    trend.slopePctPerDay === undefined
  )
    return undefined;
  const u = (Date.parse(time) - Date.parse(trend.origin)) / DAY_MS;
  const value = trend.interceptPct + trend.slopePctPerDay * u;
  const s = trend.scatterPct ?? trend.residualSdPct ?? 0;
  const half =
    (trend.criticalT ?? 0) *
    s *
    Math.sqrt(1 / trend.points + (u * u) / (trend.sxxDays2 ?? Number.POSITIVE_INFINITY));
  return { recoveryPct: value, low: value - half, high: value + half };
}
