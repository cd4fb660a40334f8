/**
 * Writer for JCAMP-DX 5.01 single spectra that {@link parseJcamp} (and other JCAMP-DX readers)
 * read back.
 *
 * Ordinates are written as integers Y = round(y / YFACTOR); YFACTOR is a power of ten chosen so
 * the largest |y| has about 9 significant digits, so the quantisation error is at most
 * YFACTOR/2 ≈ 5·10⁻¹⁰ of the largest value. Compression forms (McDonald & Wilks, Applied
 * Spectroscopy 42 (1988) 151):
 * - `affn`: space-separated integers;
 * - `sqz`: SQZ characters, no separators;
 * - `dif-dup` (default): first ordinate of a line in SQZ, then DIF differences with DUP repeat
 *   counts; each line ends in DIF form, so the next line repeats its last ordinate as the Y check,
 *   and a final line holds the Y check of the last point.
 * Lines are at most 80 characters. The X at each line start is the exact abscissa of its first
 * ordinate.
 *
 * Abscissae must be evenly spaced for `##XYDATA=(X++(Y..Y))` (within 10⁻⁹ of a step); an uneven
 * grid is written as `##XYPOINTS=(XY..XY)` pairs in full precision instead (no compression).
 *
 * Conditions are written with explicit unit comments (`##PATH LENGTH=0.1 $$ m`,
 * `##TEMPERATURE=296.15 $$ K`, `##PRESSURE=101.325 $$ kPa`), so no reader needs the cm/°C/atm
 * convention to interpret them. Natural-log absorbance carries `##$Y KIND=absorbance-natural`.
 */
import { BandwrightError } from '../../errors.js';
import type { Spectrum } from '../../spectrum/spectrum.js';

/** Options of {@link formatJcamp}. */
export interface JcampWriteOptions {
  /** `##TITLE=` (one line; line breaks become spaces). */
  title: string;
  /** Ordinate encoding; default `dif-dup`. */
  compression?: 'affn' | 'sqz' | 'dif-dup';
  /** Ordinate scale factor (y = Y·YFACTOR), > 0; default: a power of ten giving ~9 significant digits. */
  yFactor?: number;
  /** `##ORIGIN=`; default `bandwright`. */
  origin?: string;
  /** `##OWNER=`; default empty. */
  owner?: string;
}

const MAX_LINE = 80;
const SQZ_POSITIVE = '@ABCDEFGHI';
const SQZ_NEGATIVE = '@abcdefghi';
const DIF_POSITIVE = '%JKLMNOPQR';
const DIF_NEGATIVE = '%jklmnopqr';
const DUP_DIGITS = '0STUVWXYZs';

function encode(value: number, positive: string, negative: string): string {
  const digits = String(Math.abs(value));
  const table = value < 0 ? negative : positive;
  return (table[Number(digits[0])] as string) + digits.slice(1);
}

/** SQZ form of an integer: `@` 0, `A`…`I` 1…9, `a`…`i` −1…−9 as the first digit. */
export function squeeze(value: number): string {
  return encode(value, SQZ_POSITIVE, SQZ_NEGATIVE);
}

/** DIF form of an integer difference: `%` 0, `J`…`R` 1…9, `j`…`r` −1…−9 as the first digit. */
export function difference(value: number): string {
  return encode(value, DIF_POSITIVE, DIF_NEGATIVE);
}

/** DUP form of a repeat count ≥ 1: `S`…`Z`, `s` = 1…9 as the first digit. */
export function duplicate(count: number): string {
  const digits = String(count);
  return (DUP_DIGITS[Number(digits[0])] as string) + digits.slice(1);
}

function oneLine(text: string): string {
  return text.replace(/[\r\n]+/g, ' ').trim();
}

/** The ordinates to write: saturated transmittance (NaN) as 0, as it was printed in the file read. */
function withSaturatedAsZero(spectrum: Spectrum, where: string): Float64Array {
  const { y } = spectrum;
  if (!y.some(Number.isNaN)) return y;
  if (spectrum.yKind !== 'transmittance' && spectrum.yKind !== 'transmittance-percent') {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: ${y.filter(Number.isNaN).length} undefined (saturated) ordinate(s) in a ${spectrum.yKind} ` +
        'spectrum; only transmittance can write them (as 0)',
      { parameter: 'y' },
    );
  }
  return y.map((value) => (Number.isNaN(value) ? 0 : value));
}

/**
 * Formats a spectrum as JCAMP-DX 5.01 text.
 *
 * @param spectrum - any y-kind but single-beam; x ascending in cm⁻¹; metadata conditions in m, K,
 *   kPa, resolution in cm⁻¹. Saturated (NaN) transmittance is written as 0, which reads back as
 *   saturated.
 * @param options - title, compression, YFACTOR, origin, owner
 * @returns the file text, ending with `##END=` and a line break
 * @throws BandwrightError `INVALID_VALUE` for a single-beam spectrum, undefined (NaN) ordinates of
 *   a kind other than transmittance, a bad `yFactor`, ordinates
 *   too large for exact integers at that factor, or an abscissa that cannot be written in plain
 *   decimals
 * @example
 * writeFileSync('co.jdx', formatJcamp(spectrum, { title: 'CO 100 ppm, 10 cm cell', compression: 'dif-dup' }));
 */
export function formatJcamp(spectrum: Spectrum, options: JcampWriteOptions): string {
  const where = spectrum.metadata.source ?? 'spectrum';
  if (spectrum.yKind === 'single-beam') {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: a single-beam spectrum is not written as JCAMP-DX here; convert it to absorbance or ` +
        `transmittance first`,
      {
        parameter: 'yKind',
      },
    );
  }
  const compression = options.compression ?? 'dif-dup';
  const { x } = spectrum;
  const y = withSaturatedAsZero(spectrum, where);
  const n = x.length;
  const step = ((x[n - 1] as number) - (x[0] as number)) / (n - 1);
  let even = true;
  for (let i = 1; i < n - 1 && even; i++)
    even = Math.abs((x[i] as number) - ((x[0] as number) + i * step)) <= 1e-9 * Math.abs(step);

  const lines: string[] = [
    `##TITLE=${oneLine(options.title)}`,
    '##JCAMP-DX=5.01',
    '##DATA TYPE=INFRARED SPECTRUM',
    `##ORIGIN=${oneLine(options.origin ?? 'bandwright')}`,
    `##OWNER=${oneLine(options.owner ?? '')}`,
  ];
  const { metadata } = spectrum;
  const condition = (label: string, value: number | undefined, unit: string): void => {
    if (value === undefined) return;
    if (!Number.isFinite(value)) {
      throw new BandwrightError('INVALID_VALUE', `${where}: ${label} = ${value}, must be a finite number`, {
        parameter: label,
      });
    }
    lines.push(`##${label}=${String(value)}${unit === '' ? '' : ` $$ ${unit}`}`);
  };
  condition('PATH LENGTH', metadata.pathLength_m, 'm');
  condition('TEMPERATURE', metadata.temperature_K, 'K');
  condition('PRESSURE', metadata.pressure_kPa, 'kPa');
  condition('RESOLUTION', metadata.resolution_cm, '');
  lines.push('##XUNITS=1/CM');
  switch (spectrum.yKind) {
    case 'absorbance':
      lines.push('##YUNITS=ABSORBANCE');
      break;
    case 'absorbance-natural':
      lines.push('##YUNITS=ABSORBANCE', '##$Y KIND=absorbance-natural');
      break;
    case 'transmittance':
      lines.push('##YUNITS=TRANSMITTANCE');
      break;
    case 'transmittance-percent':
      lines.push('##YUNITS=PERCENT TRANSMITTANCE');
      break;
    case 'absorbance-per-amount':
      lines.push('##YUNITS=(micromol/mol)-1m-1 (base 10)');
      break;
  }

  if (!even) {
    lines.push(
      '##XFACTOR=1',
      '##YFACTOR=1',
      `##FIRSTX=${String(x[0])}`,
      `##LASTX=${String(x[n - 1])}`,
      `##NPOINTS=${n}`,
      `##FIRSTY=${String(y[0])}`,
      '##XYPOINTS=(XY..XY)',
    );
    for (let i = 0; i < n; i++) lines.push(`${String(x[i])}, ${String(y[i])}`);
    lines.push('##END=');
    return `${lines.join('\n')}\n`;
  }

  let maxAbs = 0;
  for (let i = 0; i < n; i++) maxAbs = Math.max(maxAbs, Math.abs(y[i] as number));
  let yFactor: number;
  let yFactorText: string;
  if (options.yFactor !== undefined) {
    yFactor = options.yFactor;
    if (!(yFactor > 0) || !Number.isFinite(yFactor)) {
      throw new BandwrightError('INVALID_VALUE', `yFactor = ${yFactor}, must be a finite number > 0`, {
        parameter: 'yFactor',
      });
    }
    yFactorText = String(yFactor);
  } else {
    // Below 1E-300 the factor itself would underflow to 0 for subnormal ordinates; such values
    // (|y| < 1e-300) are written as 0, which no absorbance or transmittance can tell apart.
    const exponent = maxAbs === 0 ? 0 : Math.max(-300, Math.ceil(Math.log10(maxAbs)) - 9);
    yFactorText = `1E${exponent}`;
    yFactor = Number(yFactorText);
  }
  if (maxAbs / yFactor > 2 ** 52) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `yFactor = ${yFactorText}: the largest |y| = ${maxAbs} would need ` +
        `${Math.round(maxAbs / yFactor)} as an integer, beyond exact integers; use a larger yFactor`,
      {
        parameter: 'yFactor',
      },
    );
  }
  const ints = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const value = Math.round((y[i] as number) / yFactor);
    ints[i] = value === 0 ? 0 : value; // no "-0"
  }
  const xText = (i: number): string => {
    const text = String(x[i]);
    if (/e/i.test(text)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${where}: x = ${text} cm⁻¹ cannot be written as a plain decimal in ##XYDATA (1e-6 … 1e21)`,
        {},
      );
    }
    return text;
  };
  lines.push(
    '##XFACTOR=1',
    `##YFACTOR=${yFactorText}`,
    `##FIRSTX=${xText(0)}`,
    `##LASTX=${xText(n - 1)}`,
    `##DELTAX=${String(step)}`,
    `##NPOINTS=${n}`,
    `##FIRSTY=${String((ints[0] as number) * yFactor)}`,
    '##XYDATA=(X++(Y..Y))',
  );
  const Y = (i: number): number => ints[i] as number;
  if (compression === 'dif-dup') {
    let i = 0;
    for (;;) {
      let line = xText(i) + squeeze(Y(i));
      let j = i;
      while (j + 1 < n) {
        const d = Y(j + 1) - Y(j);
        let run = 1;
        while (j + 1 + run < n && Y(j + 1 + run) - Y(j + run) === d) run++;
        let token = difference(d) + (run > 1 ? duplicate(run) : '');
        if (line.length + token.length > MAX_LINE) {
          run = 1;
          token = difference(d);
          if (line.length + token.length > MAX_LINE) break;
        }
        line += token;
        j += run;
      }
      lines.push(line);
      if (j === n - 1) {
        if (j > i) lines.push(xText(j) + squeeze(Y(j)));
        break;
      }
      i = j;
    }
  } else {
    const separator = compression === 'affn' ? ' ' : '';
    const token = compression === 'affn' ? (v: number): string => String(v) : squeeze;
    let i = 0;
    while (i < n) {
      let line = xText(i) + (compression === 'affn' ? ' ' : '') + token(Y(i));
      i++;
      while (i < n) {
        const next = separator + token(Y(i));
        if (line.length + next.length > MAX_LINE) break;
        line += next;
        i++;
      }
      lines.push(line);
    }
  }
  lines.push('##END=');
  return `${lines.join('\n')}\n`;
}
