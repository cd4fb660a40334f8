/**
 * Spectral windows (band, baseline windows, regions): validation against each other and
 * against a scan's range.
 */
import { BandwrightError } from '../errors.js';
import { lowerBound, type Spectrum } from '../spectrum/spectrum.js';

/** A wavenumber interval [low, high] in cm⁻¹, low < high. */
export type Window = readonly [number, number];

/**
 * Formats a window for messages, e.g. `2040–2245 cm⁻¹`.
 *
 * @param window - interval in cm⁻¹
 */
export function formatWindow(window: Window): string {
  return `${window[0]}–${window[1]} cm⁻¹`;
}

/**
 * Checks that a window is two finite numbers in increasing order.
 *
 * @param window - interval in cm⁻¹
 * @param where - parameter or field name for the message, e.g. `method.json gases[0].band`
 * @throws BandwrightError `WINDOW` for an inverted or empty window, `INVALID_VALUE` for non-numbers
 */
export function assertWindow(window: readonly unknown[], where: string): asserts window is Window {
  if (
    window.length !== 2 ||
    typeof window[0] !== 'number' ||
    typeof window[1] !== 'number' ||
    !Number.isFinite(window[0]) ||
    !Number.isFinite(window[1])
  ) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where} = ${JSON.stringify(window)}, must be two finite wavenumbers [low, high] in cm⁻¹`,
      { parameter: where },
    );
  }
  if (!(window[0] < window[1])) {
    throw new BandwrightError(
      'WINDOW',
      `${where} = ${formatWindow(window as unknown as Window)}, is inverted or empty: ` +
        'the low end must be below the high end',
      { parameter: where },
    );
  }
}

/** True when two windows share more than an end point. */
export function windowsOverlap(a: Window, b: Window): boolean {
  return a[0] < b[1] && b[0] < a[1];
}

/**
 * Checks a band and its baseline windows: every window valid, baseline windows outside the band
 * and not overlapping each other.
 *
 * @param band - integration window, cm⁻¹
 * @param baseline - baseline windows, cm⁻¹ (may be empty: no baseline correction)
 * @param where - prefix for messages, e.g. `method.json gases[0]`
 * @throws BandwrightError `WINDOW` naming the offending windows
 */
export function assertBandWindows(band: Window, baseline: readonly Window[], where: string): void {
  assertWindow(band, `${where} band`);
  baseline.forEach((window, i) => {
    assertWindow(window, `${where} baseline[${i}]`);
    if (windowsOverlap(window, band)) {
      throw new BandwrightError(
        'WINDOW',
        `${where} baseline[${i}] = ${formatWindow(window)} overlaps the band ${formatWindow(band)}: ` +
          'baseline windows must lie outside the band',
        { parameter: `${where} baseline` },
      );
    }
    for (let j = 0; j < i; j++) {
      const other = baseline[j] as Window;
      if (windowsOverlap(window, other)) {
        throw new BandwrightError(
          'WINDOW',
          `${where} baseline[${j}] = ${formatWindow(other)} ` +
            `and baseline[${i}] = ${formatWindow(window)} overlap: use one window or separate them`,
          { parameter: `${where} baseline` },
        );
      }
    }
  });
}

/**
 * Checks that a window lies inside a scan's wavenumber range and holds at least `minPoints` points.
 *
 * @param spectrum - the scan
 * @param window - interval in cm⁻¹
 * @param what - what the window is, for the message (e.g. `band`, `baseline window 2`)
 * @param minPoints - grid points the window must contain (default 2)
 * @returns indices [first, end) of the grid points inside the window
 * @throws BandwrightError `WINDOW` naming the scan, the window and the scan's range
 */
export function windowIndices(
  spectrum: Spectrum,
  window: Window,
  what: string,
  minPoints = 2,
): [number, number] {
  const { x } = spectrum;
  const first = x[0] as number;
  const last = x[x.length - 1] as number;
  const scan = spectrum.metadata.source ?? 'scan';
  if (window[0] < first || window[1] > last) {
    throw new BandwrightError(
      'WINDOW',
      `${scan}: ${what} ${formatWindow(window)} lies outside the scan's range ${first}–${last} cm⁻¹`,
      { file: spectrum.metadata.source },
    );
  }
  const start = lowerBound(x, window[0]);
  let end = lowerBound(x, window[1]);
  if (end < x.length && x[end] === window[1]) end++;
  if (end - start < minPoints) {
    throw new BandwrightError(
      'WINDOW',
      `${scan}: ${what} ${formatWindow(window)} holds ${end - start} grid point(s), ` +
        `needs at least ${minPoints}: widen it or use a finer scan`,
      { file: spectrum.metadata.source },
    );
  }
  return [start, end];
}
