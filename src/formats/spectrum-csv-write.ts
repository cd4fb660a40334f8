/**
 * Writes a spectrum as a table that {@link parseSpectrumTable} reads back exactly: `#` comment
 * lines with the cell conditions, a header naming the x unit and the y-kind, and one point per
 * line with every number in its shortest round-trip form (`String(value)`, and `-0` for −0), so
 * no bit is lost.
 */
import { BandwrightError } from '../errors.js';
import type { Spectrum, YKind } from '../spectrum/spectrum.js';

/** Options of {@link formatSpectrumCsv}. */
export interface SpectrumCsvOptions {
  /** Field delimiter; default `,`. */
  delimiter?: ',' | '\t' | ';';
  /** Line ending; default `\n`. */
  lineEnding?: '\n' | '\r\n';
}

/** Header name of the y column for each kind (single-beam writes two columns). */
export const Y_COLUMN_NAMES: Readonly<Record<Exclude<YKind, 'single-beam'>, string>> = Object.freeze({
  absorbance: 'absorbance',
  'absorbance-natural': 'absorbance_natural',
  transmittance: 'transmittance',
  'transmittance-percent': 'transmittance_pct',
  'absorbance-per-amount': 'absorbance_per_ppm_m',
});

/** Shortest round-trip text of a double; keeps the sign of −0, which `String` drops. */
function numberText(value: number): string {
  return Object.is(value, -0) ? '-0' : String(value);
}

function oneLine(text: string): string {
  return text.replace(/[\r\n]+/g, ' ').trim();
}

/**
 * Formats a spectrum as CSV text.
 *
 * Comment lines carry `title`, `path_length_m` (m), `temperature_K` (K), `pressure_kPa` (kPa),
 * `resolution_cm-1` (cm⁻¹) and `date` when the metadata has them. A `;` delimiter writes a
 * decimal point still (the reader takes `.` unless the data contain commas).
 *
 * @param spectrum - any y-kind; x ascending in cm⁻¹
 * @param options - delimiter and line ending
 * @returns the table text, ending with a line break
 * @throws BandwrightError `INVALID_VALUE` when a number is not finite
 * @example
 * formatSpectrumCsv(spectrum);
 * // "# path_length_m = 0.1\n…\nwavenumber_cm-1,absorbance\n2000,0.125\n…"
 */
export function formatSpectrumCsv(spectrum: Spectrum, options: SpectrumCsvOptions = {}): string {
  const delimiter = options.delimiter ?? ',';
  const eol = options.lineEnding ?? '\n';
  const { metadata } = spectrum;
  const lines: string[] = [];
  const numberComment = (key: string, value: number | undefined): void => {
    if (value === undefined) return;
    if (!Number.isFinite(value)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${metadata.source ?? 'spectrum'}: ${key} = ${value}, must be a finite number`,
        { parameter: key },
      );
    }
    lines.push(`# ${key} = ${String(value)}`);
  };
  if (metadata.title !== undefined && oneLine(metadata.title) !== '')
    lines.push(`# title = ${oneLine(metadata.title)}`);
  if (metadata.dateText !== undefined && oneLine(metadata.dateText) !== '')
    lines.push(`# date = ${oneLine(metadata.dateText)}`);
  numberComment('path_length_m', metadata.pathLength_m);
  numberComment('temperature_K', metadata.temperature_K);
  numberComment('pressure_kPa', metadata.pressure_kPa);
  numberComment('resolution_cm-1', metadata.resolution_cm);
  const { x, y, background } = spectrum;
  if (spectrum.yKind === 'single-beam') {
    if (background === undefined) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${metadata.source ?? 'spectrum'}: single-beam spectrum without a background`,
        {},
      );
    }
    lines.push(['wavenumber_cm-1', 'single_beam_sample', 'single_beam_background'].join(delimiter));
    for (let i = 0; i < x.length; i++) {
      const xy = `${numberText(x[i] as number)}${delimiter}${numberText(y[i] as number)}`;
      lines.push(`${xy}${delimiter}${numberText(background[i] as number)}`);
    }
  } else {
    lines.push(`wavenumber_cm-1${delimiter}${Y_COLUMN_NAMES[spectrum.yKind]}`);
    for (let i = 0; i < x.length; i++)
      lines.push(`${numberText(x[i] as number)}${delimiter}${numberText(y[i] as number)}`);
  }
  for (let i = 0; i < x.length; i++) {
    if (
      !Number.isFinite(x[i]) ||
      !Number.isFinite(y[i]) ||
      (background !== undefined && !Number.isFinite(background[i]))
    ) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${metadata.source ?? 'spectrum'}: point ${i + 1} is not finite (x = ${x[i]}, y = ${y[i]})`,
        {},
      );
    }
  }
  return lines.join(eol) + eol;
}
