/**
 * What a JCAMP-DX file's axis units mean. `##XUNITS=1/CM`, `MICROMETERS` (ν = 10⁴/λ) or
 * `NANOMETERS` (ν = 10⁷/λ). `##YUNITS=ABSORBANCE` (decadic), `TRANSMITTANCE` (a fraction),
 * `% TRANSMITTANCE` / `PERCENT TRANSMITTANCE`, and decadic absorbance per µmol/mol per metre
 * (`(micromol/mol)-1m-1 (base 10)`, quantitative reference spectra). Natural-log absorbance only when declared by the
 * private label `##$Y KIND=absorbance-natural` together with `##YUNITS=ABSORBANCE`; a YUNITS
 * comment that mentions a natural log without that label is an error rather than a guess.
 */
import { BandwrightError } from '../../errors.js';
import type { YKind } from '../../spectrum/spectrum.js';
import type { AbscissaUnit } from '../reader-checks.js';
import type { JcampRecord } from './records.js';

const WAVENUMBER_SPELLINGS = ['1/CM', 'CM-1', 'CM^-1', 'CM**-1', 'WAVENUMBER', 'WAVENUMBERS'];
const MICROMETRE_SPELLINGS = ['MICROMETERS', 'MICROMETRES', 'MICRONS', 'UM', 'µM', 'ΜM'];
const NANOMETRE_SPELLINGS = ['NANOMETERS', 'NANOMETRES', 'NM'];
const PERCENT_TRANSMITTANCE_SPELLINGS = [
  '%TRANSMITTANCE',
  'PERCENTTRANSMITTANCE',
  '%T',
  'TRANSMITTANCE%',
  'TRANSMITTANCEPERCENT',
];
/**
 * Absorbance per amount per path, as quantitative reference spectra declare it, e.g.
 * `(micromol/mol)-1m-1 (base 10)` (squeezed: upper case, no spaces, brackets or commas).
 */
const PER_AMOUNT = /^(MICROMOL\/MOL|ΜMOL\/MOL|µMOL\/MOL|UMOL\/MOL|PPM|PPMV)-1\*?M-1(BASE(10|E))?$/;

/** The y-kinds `##$Y KIND=` may declare. */
const DECLARABLE_Y_KINDS: YKind[] = [
  'absorbance',
  'absorbance-natural',
  'transmittance',
  'transmittance-percent',
];

/**
 * The abscissa unit named by `##XUNITS=`.
 *
 * @param record - the XUNITS record
 * @param source - label for messages
 * @throws BandwrightError `UNSUPPORTED` for any other unit
 */
export function readXUnit(record: JcampRecord, source: string): AbscissaUnit {
  const key = record.value.toUpperCase().replace(/\s+/g, '');
  if (WAVENUMBER_SPELLINGS.includes(key)) return 'cm-1';
  if (MICROMETRE_SPELLINGS.includes(key)) return 'um';
  if (NANOMETRE_SPELLINGS.includes(key)) return 'nm';
  throw new BandwrightError(
    'UNSUPPORTED',
    `${source} line ${record.line}: ##XUNITS=${record.value}: not a wavenumber or wavelength axis; bandwright ` +
      'reads infrared spectra on 1/CM, MICROMETERS or NANOMETERS',
    { file: source, line: record.line, parameter: 'XUNITS', content: 'other' },
  );
}

/**
 * What the ordinates are, from `##YUNITS=` and the private `##$Y KIND=` label.
 *
 * @param yUnits - the YUNITS record (its `$$` comment is read too)
 * @param yKindLabel - the `##$Y KIND=` record, when present
 * @param source - label for messages
 * @throws BandwrightError `UNSUPPORTED` for y values of another kind; `PARSE` for an unknown or
 *   contradicting y-kind, absorbance per amount not stated as decadic,
 *   and a YUNITS comment that suggests natural-log absorbance without `##$Y KIND`
 */
export function readYKind(yUnits: JcampRecord, yKindLabel: JcampRecord | undefined, source: string): YKind {
  const key = yUnits.value.toUpperCase().replace(/[\s(),]+/g, '');
  let yKind: YKind;
  if (key === 'ABSORBANCE' || key === 'ABSORBANCEUNITS') yKind = 'absorbance';
  else if (PER_AMOUNT.test(key)) {
    if (!/BASE10$/.test(key)) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${yUnits.line}: ##YUNITS=${yUnits.value}: absorbance per amount, but not stated ` +
          'as decadic "(base 10)"; bandwright reads quantitative reference spectra in decadic absorbance',
        { file: source, line: yUnits.line, parameter: 'YUNITS' },
      );
    }
    yKind = 'absorbance-per-amount';
  } else if (key === 'TRANSMITTANCE') yKind = 'transmittance';
  else if (PERCENT_TRANSMITTANCE_SPELLINGS.includes(key)) yKind = 'transmittance-percent';
  else {
    throw new BandwrightError(
      'UNSUPPORTED',
      `${source} line ${yUnits.line}: ##YUNITS=${yUnits.value}: y values that are neither absorbance nor ` +
        'transmittance; bandwright reads ABSORBANCE, TRANSMITTANCE (a fraction), % TRANSMITTANCE or ' +
        '(micromol/mol)-1m-1 (base 10)',
      { file: source, line: yUnits.line, parameter: 'YUNITS', content: 'other' },
    );
  }
  if (yKindLabel !== undefined) {
    const declared = yKindLabel.value.trim().toLowerCase();
    if (!(DECLARABLE_Y_KINDS as string[]).includes(declared)) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${yKindLabel.line}: ##$Y KIND=${yKindLabel.value}, must be one of ` +
          `${DECLARABLE_Y_KINDS.join(', ')}`,
        {
          file: source,
          line: yKindLabel.line,
          parameter: '$Y KIND',
        },
      );
    }
    const kind = declared as YKind;
    const compatible = kind === yKind || (kind === 'absorbance-natural' && yKind === 'absorbance');
    if (!compatible) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${yKindLabel.line}: ##$Y KIND=${kind} contradicts ##YUNITS=${yUnits.value} ` +
          `(line ${yUnits.line})`,
        {
          file: source,
          line: yKindLabel.line,
          parameter: '$Y KIND',
        },
      );
    }
    return kind;
  }
  if (yKind === 'absorbance' && /\b(natural|ln|napierian|base\s*e|neperian)\b/i.test(yUnits.comment)) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${yUnits.line}: ##YUNITS comment "${yUnits.comment}" suggests natural-log ` +
        `absorbance; declare it with ##$Y KIND=absorbance-natural, or remove the comment for ` +
        `decadic absorbance`,
      { file: source, line: yUnits.line, parameter: 'YUNITS' },
    );
  }
  return yKind;
}
