/**
 * The `Spectrum` type every stage after `io` works with, and conversions between y-kinds.
 *
 * Decadic absorbance A = −log10 T = −log10(I/I0) (Beer–Lambert, DESIGN §3). Natural-log
 * absorbance A_e = −ln T = A·ln 10. Transmittance in percent is 100·T.
 */
import { BandwrightError, assertAscending } from '../errors.js';

/**
 * What the y values of a spectrum are.
 * - `absorbance`: decadic absorbance, −log10 T (the core's working kind)
 * - `absorbance-natural`: −ln T (only when a file declares it)
 * - `transmittance`: fraction, 0…1
 * - `transmittance-percent`: percent, 0…100
 * - `single-beam`: sample single-beam intensity; needs a `background` of the same grid
 * - `absorbance-per-amount`: a quantitative reference spectrum, decadic absorbance per µmol/mol of
 *   the gas per metre of path (JCAMP-DX `(micromol/mol)-1m-1 (base 10)`); not a measured scan and
 *   never plain absorbance: {@link absorbanceFromReference} turns it into one for an amount and path
 */
export type YKind =
  | 'absorbance'
  | 'absorbance-natural'
  | 'transmittance'
  | 'transmittance-percent'
  | 'single-beam'
  | 'absorbance-per-amount';

/** All y-kinds, for validating options and column names. */
export const Y_KINDS: readonly YKind[] = [
  'absorbance',
  'absorbance-natural',
  'transmittance',
  'transmittance-percent',
  'single-beam',
  'absorbance-per-amount',
];

/**
 * Why a reader accepted a file it could have refused, or what it changed: each leniency shows.
 * - `line-start-x`: the abscissa printed at XYDATA line starts disagrees with the header's grid
 * - `deltax`: ##DELTAX printed rounded; the grid comes from FIRSTX, LASTX and NPOINTS
 * - `saturated`: points with transmittance at or below zero (as printed) made undefined
 * - `percent-transmittance`: transmittance declared as a fraction but written in percent
 * - `transmittance-above-one`: isolated transmittance fractions above 1.5 (spikes), kept
 * - `firsty`: ##FIRSTY disagrees a little with the first decoded ordinate
 * - `trailing-bytes`: bytes after the last ##END= (an end-of-file byte, blank lines, padding)
 * - `leading-bytes`: stray characters before ##TITLE= on the first line, skipped
 * - `duplicate-label`: a label given twice with the same value
 * - `label-text`: free text after a value and its unit, ignored
 * - `implausible-condition`: a path, temperature or pressure no gas cell has, not used
 * - `implausible-absorbance`: absorbance too high to be one; the y values are probably not absorbance
 * - `compound-block`: one infrared spectrum taken from a file of several blocks
 * - `label-order`: header labels out of the standard's order
 * - `line-ends`: old Mac OS line ends (CR alone)
 */
export type ReadWarningCode =
  | 'line-start-x'
  | 'deltax'
  | 'saturated'
  | 'percent-transmittance'
  | 'transmittance-above-one'
  | 'firsty'
  | 'trailing-bytes'
  | 'leading-bytes'
  | 'duplicate-label'
  | 'label-text'
  | 'implausible-condition'
  | 'implausible-absorbance'
  | 'compound-block'
  | 'label-order'
  | 'line-ends';

/** A warning from reading a scan: a stable code for scripts and a message for people. */
export interface ReadWarning {
  /** Stable code. */
  readonly code: ReadWarningCode;
  /** What was seen and what was done, naming the file and line or point. */
  readonly message: string;
}

/** Cell conditions and labels a scan file may carry. Units are fixed by the field names. */
export interface ScanMetadata {
  /** Where the scan came from: a path as given by the user, or a label such as `<stdin>`. */
  source?: string;
  /** Title or sample name in the file. */
  title?: string;
  /** Optical path length, m. */
  pathLength_m?: number;
  /** Gas temperature, K. */
  temperature_K?: number;
  /** Gas pressure, kPa. */
  pressure_kPa?: number;
  /** Nominal instrument resolution, cm⁻¹. */
  resolution_cm?: number;
  /** Format the scan was read from. */
  format?: 'csv' | 'jcamp';
  /** Date/time text found in the file, kept verbatim (not trusted as a measurement time). */
  dateText?: string;
  /**
   * Number of saturated points: y is NaN there (transmittance at or below zero as printed, so no
   * absorbance can be given). A spectrum holds NaN only when this counts them.
   */
  saturatedPoints?: number;
  /** What the reader accepted leniently or changed, in file order. */
  warnings?: readonly ReadWarning[];
}

/**
 * A spectrum on a strictly ascending wavenumber grid.
 *
 * Readers always deliver ascending x in cm⁻¹ (descending files and micrometre axes are
 * converted). Arrays are not copied by consumers and must not be mutated after construction.
 */
export interface Spectrum {
  /** Wavenumbers, cm⁻¹, strictly ascending. */
  readonly x: Float64Array;
  /** Ordinates of kind {@link Spectrum.yKind}, same length as x. */
  readonly y: Float64Array;
  /** What y is. */
  readonly yKind: YKind;
  /** Background single-beam intensity on the same grid; present only with `single-beam`. */
  readonly background?: Float64Array;
  /** Conditions and labels from the file. */
  readonly metadata: ScanMetadata;
}

function label(spectrum: Pick<Spectrum, 'metadata'>): string {
  return spectrum.metadata.source ?? 'spectrum';
}

/**
 * Builds a spectrum after checking its invariants: equal lengths, at least two points, finite
 * values (y may be NaN at as many points as `metadata.saturatedPoints` counts), strictly ascending
 * x, a background exactly when the kind is `single-beam`.
 *
 * @param init - the fields of the spectrum; arrays are taken, not copied
 * @returns the same data as a `Spectrum`
 * @throws BandwrightError `INVALID_VALUE` for lengths or non-finite values, `NOT_MONOTONIC` for x
 */
export function makeSpectrum(init: Spectrum): Spectrum {
  const where = label(init);
  const { x, y, background } = init;
  if (x.length !== y.length) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: ${x.length} x values but ${y.length} y values, must be equal`,
      { file: init.metadata.source },
    );
  }
  if (x.length < 2) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: ${x.length} point(s), a spectrum needs at least 2`,
      { file: init.metadata.source },
    );
  }
  let undefinedPoints = init.metadata.saturatedPoints ?? 0;
  for (let i = 0; i < x.length; i++) {
    const saturated = Number.isNaN(y[i]) && undefinedPoints-- > 0;
    if (!Number.isFinite(x[i]) || !(saturated || Number.isFinite(y[i]))) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${where}: point ${i + 1}: x = ${x[i]}, y = ${y[i]}, must be finite numbers`,
        { file: init.metadata.source },
      );
    }
  }
  assertAscending(x, { file: where });
  if ((init.yKind === 'single-beam') !== (background !== undefined)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      init.yKind === 'single-beam'
        ? `${where}: a single-beam sample spectrum needs a background single-beam spectrum to give absorbance`
        : `${where}: a background spectrum goes only with y-kind single-beam, not ${init.yKind}`,
      { file: init.metadata.source },
    );
  }
  if (background !== undefined) {
    if (background.length !== x.length) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${where}: background has ${background.length} points, sample ${x.length}, must be equal`,
        { file: init.metadata.source },
      );
    }
    for (let i = 0; i < background.length; i++) {
      if (!Number.isFinite(background[i])) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `${where}: background point ${i + 1} = ${background[i]}, must be a finite number`,
          { file: init.metadata.source },
        );
      }
    }
  }
  return init;
}

/**
 * Builds a spectrum from arrays whose invariants the caller has already established while
 * making them (equal lengths, at least two points, finite values, strictly ascending x, no
 * background unless single-beam), so a reader does not pass over 10⁴ points a second time. Any
 * caller that has not checked all of these must use {@link makeSpectrum}, which also words the
 * errors.
 *
 * @param init - the fields of the spectrum; arrays are taken, not copied
 * @returns the same data as a `Spectrum`
 * @throws BandwrightError `INVALID_VALUE` when the lengths differ or there are fewer than two
 *   points (cheap checks kept as a guard against misuse)
 */
export function spectrumFromCheckedArrays(init: Spectrum): Spectrum {
  if (
    init.x.length !== init.y.length ||
    init.x.length < 2 ||
    (init.yKind === 'single-beam') !== (init.background !== undefined)
  )
    return makeSpectrum(init);
  return init;
}

/**
 * Refuses a quantitative reference spectrum (y-kind `absorbance-per-amount`) where a measured
 * spectrum is needed: it holds absorbance per µmol/mol per metre, not the absorbance of a gas in a
 * cell, so using it as a sample or a standard would give numbers without meaning.
 *
 * @param spectrum - the spectrum about to be used as a measurement
 * @param role - what it was given as, for the message (e.g. `sample scan`, `standard`)
 * @throws BandwrightError `INVALID_VALUE` naming the file, what it is and where it can be used
 */
export function assertMeasuredSpectrum(spectrum: Spectrum, role: string): void {
  if (spectrum.yKind !== 'absorbance-per-amount') return;
  throw new BandwrightError(
    'INVALID_VALUE',
    `${label(spectrum)}: a quantitative reference spectrum (decadic absorbance per µmol/mol per metre of ` +
      `path), not a measured spectrum; it is usable as a reference spectrum of its gas (absorbance only for a ` +
      `stated amount and path length), not as a ${role}`,
    { file: spectrum.metadata.source },
  );
}

/**
 * Converts a spectrum to decadic absorbance.
 *
 * Transmittance T ≤ 0 (or a non-positive single-beam intensity) has no absorbance; such a
 * point is an error, because clipping it would invent a number. Saturated points (NaN, counted
 * in `metadata.saturatedPoints`) stay NaN.
 *
 * @param spectrum - any y-kind but `absorbance-per-amount`
 * @returns a new spectrum of kind `absorbance` (the input itself if it already is)
 * @throws BandwrightError `INVALID_VALUE` naming the first point with T ≤ 0 or intensity ≤ 0, or
 *   for a reference spectrum in absorbance per amount (see {@link absorbanceFromReference})
 */
export function toAbsorbance(spectrum: Spectrum): Spectrum {
  if (spectrum.yKind === 'absorbance') return spectrum;
  assertMeasuredSpectrum(spectrum, 'scan');
  const n = spectrum.y.length;
  const out = new Float64Array(n);
  const where = label(spectrum);
  const bad = (i: number, what: string, value: number): never => {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: point ${i + 1} (x = ${spectrum.x[i]} cm⁻¹): ${what} = ${value}, must be > 0 to give an absorbance`,
      { file: spectrum.metadata.source },
    );
  };
  const y = spectrum.y;
  switch (spectrum.yKind) {
    case 'absorbance-natural':
      for (let i = 0; i < n; i++) out[i] = (y[i] as number) / Math.LN10;
      break;
    case 'transmittance':
    case 'transmittance-percent': {
      const scale = spectrum.yKind === 'transmittance-percent' ? 0.01 : 1;
      for (let i = 0; i < n; i++) {
        const t = (y[i] as number) * scale;
        if (!(t > 0) && !Number.isNaN(t)) bad(i, 'transmittance', y[i] as number);
        out[i] = -Math.log10(t);
      }
      break;
    }
    case 'single-beam': {
      const background = spectrum.background as Float64Array;
      for (let i = 0; i < n; i++) {
        const sample = y[i] as number;
        const reference = background[i] as number;
        if (!(sample > 0)) bad(i, 'sample intensity', sample);
        if (!(reference > 0)) bad(i, 'background intensity', reference);
        out[i] = -Math.log10(sample / reference);
      }
      break;
    }
  }
  return { x: spectrum.x, y: out, yKind: 'absorbance', metadata: spectrum.metadata };
}

/**
 * The absorbance a quantitative reference spectrum predicts for an amount of its gas in a path:
 * A(ν) = k(ν) · c · L (Beer–Lambert, DESIGN §3), at the reference's own temperature and pressure.
 *
 * @param reference - a spectrum of kind `absorbance-per-amount` (per µmol/mol per m)
 * @param amount_ppm - mole fraction of the gas, µmol/mol (ppm)
 * @param pathLength_m - optical path length, m
 * @returns a new spectrum of kind `absorbance` on the same grid, with the path in its metadata
 * @throws BandwrightError `INVALID_VALUE` when the spectrum is another kind, or the amount or path
 *   is not a finite number (amount ≥ 0, path > 0)
 */
export function absorbanceFromReference(
  reference: Spectrum,
  amount_ppm: number,
  pathLength_m: number,
): Spectrum {
  if (reference.yKind !== 'absorbance-per-amount') {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${label(reference)}: y-kind ${reference.yKind}, must be absorbance-per-amount (a quantitative reference)`,
      { file: reference.metadata.source },
    );
  }
  if (!(Number.isFinite(amount_ppm) && amount_ppm >= 0)) {
    throw new BandwrightError('INVALID_VALUE', `amount = ${amount_ppm} ppm, must be a finite number ≥ 0`, {
      parameter: 'amount_ppm',
    });
  }
  if (!(Number.isFinite(pathLength_m) && pathLength_m > 0)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `path length = ${pathLength_m} m, must be a finite number > 0`,
      {
        parameter: 'pathLength_m',
      },
    );
  }
  const factor = amount_ppm * pathLength_m;
  const y = new Float64Array(reference.y.length);
  for (let i = 0; i < y.length; i++) y[i] = (reference.y[i] as number) * factor;
  return { x: reference.x, y, yKind: 'absorbance', metadata: { ...reference.metadata, pathLength_m } };
}

/**
 * Converts decadic absorbance to transmittance (fraction): T = 10^(−A).
 *
 * @param spectrum - a spectrum of kind `absorbance`
 * @returns a new spectrum of kind `transmittance`
 * @throws BandwrightError `INVALID_VALUE` when the input is not absorbance
 */
export function toTransmittance(spectrum: Spectrum): Spectrum {
  if (spectrum.yKind !== 'absorbance') {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${label(spectrum)}: y-kind ${spectrum.yKind}, convert to absorbance first`,
      { file: spectrum.metadata.source },
    );
  }
  const out = new Float64Array(spectrum.y.length);
  for (let i = 0; i < out.length; i++) out[i] = 10 ** -(spectrum.y[i] as number);
  return { x: spectrum.x, y: out, yKind: 'transmittance', metadata: spectrum.metadata };
}

/**
 * Index of the first grid point ≥ `value` (binary search), or `x.length` when none.
 *
 * @param x - ascending grid
 * @param value - the abscissa to look for, same unit as x
 */
export function lowerBound(x: ArrayLike<number>, value: number): number {
  let lo = 0;
  let hi = x.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((x[mid] as number) < value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Linear interpolation of y at `value` on an ascending grid. Returns NaN outside [x0, x_last].
 *
 * @param x - ascending grid, cm⁻¹
 * @param y - ordinates on that grid
 * @param value - where to interpolate, cm⁻¹
 */
export function interpolateAt(x: ArrayLike<number>, y: ArrayLike<number>, value: number): number {
  const n = x.length;
  if (n === 0 || !(value >= (x[0] as number)) || !(value <= (x[n - 1] as number))) return Number.NaN;
  const i = lowerBound(x, value);
  if (i < n && x[i] === value) return y[i] as number;
  const x1 = x[i - 1] as number;
  const x2 = x[i] as number;
  const y1 = y[i - 1] as number;
  const y2 = y[i] as number;
  return y1 + ((y2 - y1) * (value - x1)) / (x2 - x1);
}

/**
 * Resamples y onto another ascending grid by linear interpolation.
 *
 * @param spectrum - source spectrum
 * @param grid - target wavenumbers, cm⁻¹, ascending, inside the source range
 * @returns a spectrum on `grid` of the same kind and metadata; a grid point between two source
 *   points of which one is saturated (NaN) is NaN too, and `metadata.saturatedPoints` counts them
 * @throws BandwrightError `WINDOW` when the grid reaches outside the source range
 */
export function resample(spectrum: Spectrum, grid: Float64Array): Spectrum {
  const { x, y } = spectrum;
  const first = x[0] as number;
  const last = x[x.length - 1] as number;
  if (grid.length > 0 && ((grid[0] as number) < first || (grid[grid.length - 1] as number) > last)) {
    throw new BandwrightError(
      'WINDOW',
      `${label(spectrum)}: covers ${first}–${last} cm⁻¹, ` +
        `cannot be resampled onto ${grid[0]}–${grid[grid.length - 1]} cm⁻¹`,
      { file: spectrum.metadata.source },
    );
  }
  const out = new Float64Array(grid.length);
  let undefinedPoints = 0;
  let j = 1;
  for (let i = 0; i < grid.length; i++) {
    const value = grid[i] as number;
    while (j < x.length - 1 && (x[j] as number) < value) j++;
    const x1 = x[j - 1] as number;
    const x2 = x[j] as number;
    const t = (value - x1) / (x2 - x1);
    // A grid point on a source point takes its value, so a saturated (NaN) neighbour does not
    // spread to it; between two points, one NaN makes the interpolated value NaN (a gap).
    const y1 = y[j - 1] as number;
    const y2 = y[j] as number;
    const interpolated = t === 0 ? y1 : t === 1 ? y2 : y1 + t * (y2 - y1);
    out[i] = interpolated;
    if (Number.isNaN(interpolated)) undefinedPoints++;
  }
  // The count of undefined points travels with the values, so the result is a valid spectrum.
  const metadata =
    undefinedPoints === (spectrum.metadata.saturatedPoints ?? 0)
      ? spectrum.metadata
      : { ...spectrum.metadata, saturatedPoints: undefinedPoints };
  const background =
    spectrum.background === undefined
      ? undefined
      : resample({ ...spectrum, y: spectrum.background, background: undefined, yKind: 'absorbance' }, grid).y;
  return background === undefined
    ? { x: grid, y: out, yKind: spectrum.yKind, metadata }
    : { x: grid, y: out, yKind: spectrum.yKind, background, metadata };
}
