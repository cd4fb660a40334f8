/**
 * Undefined (saturated) points of a spectrum: where y is NaN because the transmittance was at or
 * below zero as printed, so no absorbance can be given there. Finding them inside windows,
 * wording where they are, and bridging them by linear interpolation for a band integral (which
 * is then a lower bound: the true absorbance at a saturated point is at least as high as its
 * finite neighbours').
 */

/** An interval [low, high] in cm⁻¹ (the shape of a band window or region). */
export type Interval = readonly [number, number];

/** Where a spectrum's undefined points lie. */
export interface UndefinedPoints {
  /** How many points are undefined. */
  points: number;
  /** Runs of adjacent undefined points, as [first, last] wavenumbers in cm⁻¹, ascending. */
  runs: [number, number][];
}

/** Runs listed by name in messages; the rest are counted. */
const RUNS_NAMED = 3;

/**
 * Finds the undefined (NaN) points of y, optionally only those whose x lies inside one of the
 * windows (ends included).
 *
 * @param x - ascending wavenumbers, cm⁻¹
 * @param y - ordinates on that grid
 * @param windows - where to look (default: everywhere)
 * @returns the count and runs, or undefined when there are none
 */
export function findUndefinedPoints(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  windows?: readonly Interval[],
): UndefinedPoints | undefined {
  const inside = (value: number): boolean =>
    windows === undefined || windows.some((w) => value >= w[0] && value <= w[1]);
  let points = 0;
  const runs: [number, number][] = [];
  let open = false;
  for (let i = 0; i < y.length; i++) {
    const value = x[i] as number;
    if (Number.isNaN(y[i]) && inside(value)) {
      points++;
      if (open) (runs[runs.length - 1] as [number, number])[1] = value;
      else runs.push([value, value]);
      open = true;
    } else open = false;
  }
  return points === 0 ? undefined : { points, runs };
}

function formatWavenumber(value: number): string {
  return String(Number(value.toPrecision(7)));
}

/**
 * Words undefined points for a message, e.g. `3 saturated points at 2143.25–2143.75 cm⁻¹` or
 * `12 saturated points at 2143.25–2143.75, 2170 cm⁻¹ and 2 more places`.
 *
 * @param found - from {@link findUndefinedPoints}
 */
export function describeUndefinedPoints(found: UndefinedPoints): string {
  const named = found.runs
    .slice(0, RUNS_NAMED)
    .map(([low, high]) =>
      low === high ? formatWavenumber(low) : `${formatWavenumber(low)}–${formatWavenumber(high)}`,
    );
  const more = found.runs.length - named.length;
  return (
    `${found.points} saturated point${found.points === 1 ? '' : 's'} at ${named.join(', ')} cm⁻¹` +
    (more > 0 ? ` and ${more} more place${more === 1 ? '' : 's'}` : '')
  );
}

/**
 * Replaces undefined (NaN) points by linear interpolation between the nearest finite points on
 * either side. A run that reaches an end of the spectrum has no neighbour there and stays NaN.
 *
 * @param x - ascending wavenumbers, cm⁻¹
 * @param y - ordinates on that grid; not modified
 * @returns a new array, or `y` itself when it holds no NaN
 */
export function bridgeUndefinedPoints(x: ArrayLike<number>, y: Float64Array): Float64Array {
  let out: Float64Array | undefined;
  let i = 0;
  while (i < y.length) {
    if (!Number.isNaN(y[i])) {
      i++;
      continue;
    }
    let end = i;
    while (end < y.length && Number.isNaN(y[end])) end++;
    out ??= Float64Array.from(y);
    if (i > 0 && end < y.length) {
      const x1 = x[i - 1] as number;
      const y1 = y[i - 1] as number;
      const slope = ((y[end] as number) - y1) / ((x[end] as number) - x1);
      for (let k = i; k < end; k++) out[k] = y1 + slope * ((x[k] as number) - x1);
    }
    i = end;
  }
  return out ?? y;
}
