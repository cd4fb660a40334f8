/**
 * From the Y values as written to the spectrum's ordinates, for both data tables: YFACTOR
 * scaling, the `##FIRSTY` check (within one YFACTOR step plus half a unit of its last printed
 * digit) and what the declared y unit allows (a transmittance fraction above 1.5 is refused as
 * mislabelled percent).
 */
import { BandwrightError } from '../../errors.js';
import type { YKind } from '../../spectrum/spectrum.js';
import { assertTransmittanceFraction } from '../reader-checks.js';
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
 * Checks the first ordinate against `##FIRSTY`, when the header gives it.
 *
 * @param header - the file's header (FIRSTY, YFACTOR)
 * @param first - the first ordinate, after YFACTOR
 * @param source - label for messages
 * @throws BandwrightError `PARSE` when they differ by more than one YFACTOR step plus half a unit
 *   of FIRSTY's last printed digit
 */
export function assertFirstY(header: JcampHeader, first: number, source: string): void {
  if (header.firstY === undefined) return;
  const tolerance =
    Math.abs(header.yFactor) + 0.5 * header.firstY.unit + 1e-9 * Math.abs(header.firstY.value);
  if (!(Math.abs(first - header.firstY.value) <= tolerance)) {
    throw new BandwrightError(
      'PARSE',
      `${source}: ##FIRSTY=${header.firstY.value} but the first ordinate decodes to ${first} ` +
        `(tolerance ${tolerance.toPrecision(3)}); YFACTOR or the data are wrong`,
      { file: source, parameter: 'FIRSTY' },
    );
  }
}

/**
 * Checks the ordinates against what their declared kind allows.
 *
 * @param y - the ordinates
 * @param yKind - what the header declares them to be
 * @param source - label for messages
 * @throws BandwrightError `INVALID_VALUE` for a transmittance fraction above 1.5
 */
export function assertOrdinatesFitKind(y: Float64Array, yKind: YKind, source: string): void {
  if (yKind === 'transmittance')
    assertTransmittanceFraction(y, source, 'declare ##YUNITS=% TRANSMITTANCE if they are percent');
}
