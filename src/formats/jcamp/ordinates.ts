/**
 * From the Y values as written to the spectrum's ordinates, for both data tables: YFACTOR
 * scaling, the `##FIRSTY` check (within one YFACTOR step plus one unit of its last printed
 * digit; up to 1 % of the largest ordinate with a warning) and what the declared y unit allows
 * (percent written as a fraction, saturated transmittance, absorbance no instrument gives).
 */
import { BandwrightError } from '../../errors.js';
import type { ReadWarning, YKind } from '../../spectrum/spectrum.js';
import { assertTransmittanceFraction, MAX_TRANSMITTANCE_FRACTION } from '../reader-checks.js';
import type { JcampHeader } from './header.js';

/**
 * Multiplies the Y values as written by YFACTOR.
 *
 * @param written - the Y values as written (before YFACTOR)
 * @param count - how many of them to scale
 * @param yFactor - `##YFACTOR`
 * @param out - receives the ordinates (may be `written` itself)
 * @returns true when every ordinate is finite
 */
export function scaleOrdinates(
  written: Float64Array,
  count: number,
  yFactor: number,
  out: Float64Array,
): boolean {
  let finite = true;
  for (let i = 0; i < count; i++) {
    const value = (written[i] as number) * yFactor;
    out[i] = value;
    // value − value is 0 exactly for finite values, NaN for ±Infinity and NaN.
    if (value - value !== 0) finite = false;
  }
  return finite;
}

/**
 * A first ordinate that misses ##FIRSTY by more than its rounding but less than this fraction of
 * the largest ordinate is read with a warning (writers print FIRSTY from another stage of their
 * processing); beyond it, YFACTOR or the data are wrong.
 */
const FIRSTY_WARNING_FRACTION = 0.01;

/**
 * Checks the first ordinate against `##FIRSTY`, when the header gives it.
 *
 * @param header - the file's header (FIRSTY, YFACTOR); receives a warning for a small mismatch
 * @param y - the ordinates in file order, after YFACTOR
 * @param source - label for messages
 * @throws BandwrightError `PARSE` when they differ by more than one YFACTOR step plus one unit
 *   of FIRSTY's last printed digit and by more than 1 % of the largest |ordinate|
 */
export function checkFirstY(header: JcampHeader, y: Float64Array, source: string): void {
  if (header.firstY === undefined) return;
  const first = y[0] as number;
  // One unit of FIRSTY's last printed digit: writers round it or truncate it.
  const tolerance = Math.abs(header.yFactor) + header.firstY.unit + 1e-9 * Math.abs(header.firstY.value);
  const off = Math.abs(first - header.firstY.value);
  if (off <= tolerance) return;
  let largest = 0;
  for (const value of y) if (Math.abs(value) > largest) largest = Math.abs(value);
  if (!(off <= FIRSTY_WARNING_FRACTION * largest)) {
    throw new BandwrightError(
      'PARSE',
      `${source}: ##FIRSTY=${header.firstY.value} but the first ordinate decodes to ${first} ` +
        `(tolerance ${tolerance.toPrecision(3)}); YFACTOR or the data are wrong`,
      { file: source, parameter: 'FIRSTY' },
    );
  }
  header.warnings.push({
    code: 'firsty',
    message:
      `${source}: ##FIRSTY=${header.firstY.value} but the first ordinate decodes to ${first}, off by ` +
      `${((off / largest) * 100).toPrecision(2)} % of the largest ordinate; the data are read as decoded`,
  });
}

/** Decadic absorbance above which the y values are probably not absorbance (common practice). */
export const IMPLAUSIBLE_ABSORBANCE = 6;

/** The wavenumber spans of runs of flagged points, for messages (at most `limit` listed). */
function runsText(
  x: Float64Array,
  flagged: (i: number) => boolean,
  limit = 4,
): { runs: number; text: string } {
  const spans: string[] = [];
  let runs = 0;
  for (let i = 0; i < x.length; i++) {
    if (!flagged(i)) continue;
    let j = i;
    while (j + 1 < x.length && flagged(j + 1)) j++;
    runs++;
    if (spans.length < limit) {
      spans.push(
        i === j
          ? `${(x[i] as number).toFixed(2)}`
          : `${(x[i] as number).toFixed(2)}–${(x[j] as number).toFixed(2)}`,
      );
    }
    i = j;
  }
  return { runs, text: `${spans.join(', ')}${runs > limit ? ', …' : ''} cm⁻¹` };
}

function median(y: Float64Array): number {
  const sorted = Float64Array.from(y).sort();
  return sorted[sorted.length >> 1] as number;
}

/**
 * Reviews the ordinates against what their declared kind allows, on the final ascending
 * wavenumber grid, changing only what it reports in `warnings`:
 * - transmittance declared as a fraction but written in percent (median above 1.5: a fraction
 *   spectrum's median is below 1 whatever its spikes) is read as percent;
 * - isolated fraction values above 1.5 (at most 1 % of the points) are kept, with a warning;
 * - transmittance at or below zero (saturated at the printed precision) becomes NaN;
 * - absorbance above {@link IMPLAUSIBLE_ABSORBANCE} is kept with a warning.
 *
 * @param x - ascending wavenumbers, cm⁻¹
 * @param y - the ordinates (NaN written in place at saturated points)
 * @param yKind - what the header declares
 * @param source - label for messages
 * @param warnings - receives what was accepted or changed
 * @returns the kind to read y as, and the number of saturated points
 * @throws BandwrightError `INVALID_VALUE` for a fraction-scale transmittance with many values
 *   above 1.5
 */
export function reviewOrdinates(
  x: Float64Array,
  y: Float64Array,
  yKind: YKind,
  source: string,
  warnings: ReadWarning[],
): { yKind: YKind; saturatedPoints: number } {
  let kind = yKind;
  if (kind === 'transmittance') {
    const above = y.reduce((count, value) => (value > MAX_TRANSMITTANCE_FRACTION ? count + 1 : count), 0);
    // Sorting for the median is needed only when some value is above the fraction limit.
    const middle = above > 0 ? median(y) : 0;
    if (above > 0 && middle > MAX_TRANSMITTANCE_FRACTION) {
      kind = 'transmittance-percent';
      warnings.push({
        code: 'percent-transmittance',
        message:
          `${source}: ##YUNITS declares transmittance as a fraction, but the values are percent ` +
          `(median ${middle.toPrecision(3)}, ${above} of ${y.length} points above ${MAX_TRANSMITTANCE_FRACTION}); ` +
          'read as percent transmittance',
      });
    } else if (above > Math.max(1, 0.01 * y.length)) {
      assertTransmittanceFraction(y, source, 'declare ##YUNITS=% TRANSMITTANCE if they are percent');
    } else if (above > 0) {
      const { text } = runsText(x, (i) => (y[i] as number) > MAX_TRANSMITTANCE_FRACTION);
      warnings.push({
        code: 'transmittance-above-one',
        message:
          `${source}: ${above} transmittance value(s) above ${MAX_TRANSMITTANCE_FRACTION} at ${text} in a ` +
          `spectrum whose median is ${middle.toPrecision(3)}: spikes, kept as written (not percent)`,
      });
    }
  }
  let saturatedPoints = 0;
  if (kind === 'transmittance' || kind === 'transmittance-percent') {
    for (let i = 0; i < y.length; i++) {
      if ((y[i] as number) <= 0) {
        y[i] = Number.NaN;
        saturatedPoints++;
      }
    }
    if (saturatedPoints > 0) {
      // Only now, and only for files that have them, are the runs of saturated points described.
      const { runs, text } = runsText(x, (i) => Number.isNaN(y[i]));
      warnings.push({
        code: 'saturated',
        message:
          `${source}: ${saturatedPoints} point(s) at or below zero transmittance in ${runs} run(s), at ${text}: ` +
          'saturated at the printed precision, so no absorbance can be given there; they are undefined',
      });
    }
  }
  if (kind === 'absorbance' || kind === 'absorbance-natural') {
    let largest = -Infinity;
    let at = 0;
    for (let i = 0; i < y.length; i++) {
      if ((y[i] as number) > largest) {
        largest = y[i] as number;
        at = i;
      }
    }
    const decadic = kind === 'absorbance' ? largest : largest / Math.LN10;
    if (decadic > IMPLAUSIBLE_ABSORBANCE) {
      warnings.push({
        code: 'implausible-absorbance',
        message:
          `${source}: absorbance reaches ${largest.toPrecision(4)} at ${(x[at] as number).toFixed(2)} cm⁻¹, ` +
          `above ${IMPLAUSIBLE_ABSORBANCE}: no instrument measures that; the y values are probably not absorbance`,
      });
    }
  }
  return { yKind: kind, saturatedPoints };
}
