/**
 * The layout of a spectrum table: its delimiter, decimal separator and columns.
 *
 * Delimiter: tab, `;` or `,` — the first of these found on the first content line, unless
 * given. Decimal separator: `,` when the delimiter is `;` or tab and the data contain a comma,
 * or when the delimiter is `,` and the first field is quoted and contains a comma; `.`
 * otherwise, unless given. A decimal comma with a comma delimiter needs every field quoted.
 *
 * The first content line is a header when its first cell is not a number. Columns: an x column
 * and one y column, or an x column and a sample/background pair of single-beam columns. x is in
 * cm⁻¹ unless the header's x column names micrometres (`wavelength_um`, `micrometers`, `µm`,
 * `microns`) or nanometres (`wavelength_nm`, `nanometers`). The y-kind comes from the header's y
 * column name or from the `yKind` option; if both are present they must agree. Without either,
 * `defaultYKind` applies only when the caller gave one: absorbance is never assumed silently.
 */
import { BandwrightError } from '../../errors.js';
import type { YKind } from '../../spectrum/spectrum.js';
import { BYTE, decodeText, shortText } from '../bytes.js';
import { DECIMAL_COMMA, DECIMAL_POINT, parseNumberText } from '../number-parse.js';
import type { AbscissaUnit } from '../reader-checks.js';
import type { Preamble } from './conditions.js';

const { COMMA, CR, LF, PERIOD, QUOTE, SEMICOLON, SPACE, TAB } = BYTE;

/** How a table is laid out, as the caller may fix it. */
export interface TableLayoutOptions {
  /** Label used in messages and stored as `metadata.source`, e.g. the path as the user gave it. */
  source: string;
  /** What y is; must agree with the header's y column name when that names a kind. */
  yKind?: YKind;
  /** What y is when neither the header nor `yKind` says; used only when given explicitly. */
  defaultYKind?: YKind;
  /** Field delimiter; detected from the first non-comment line when absent. */
  delimiter?: ',' | ';' | '\t';
  /** Decimal separator; detected when absent (see the module notes). */
  decimal?: '.' | ',';
}

/** What a column holds. */
export type Role = 'x' | 'y' | 'sample' | 'background';

const Y_NAMES: ReadonlyMap<string, YKind | 'sample' | 'background'> = new Map<
  string,
  YKind | 'sample' | 'background'
>([
  ...[
    'absorbance',
    'a',
    'abs',
    'absorbance_decadic',
    'decadic_absorbance',
    'absorbance_log10',
    'absorbance_au',
  ].map((n) => [n, 'absorbance'] as const),
  ...[
    'absorbance_natural',
    'natural_absorbance',
    'absorbance_ln',
    'ln',
    'napierian_absorbance',
    'absorbance_napierian',
  ].map((n) => [n, 'absorbance-natural'] as const),
  ...['transmittance', 't', 'transmittance_fraction'].map((n) => [n, 'transmittance'] as const),
  ...[
    'transmittance_pct',
    'transmittance_percent',
    'transmittance_%',
    '%t',
    't%',
    't_%',
    't_pct',
    'percent_transmittance',
    'pct_transmittance',
    '%_transmittance',
  ].map((n) => [n, 'transmittance-percent'] as const),
  ...['absorbance_per_ppm_m', 'absorbance_per_umol_mol_m'].map((n) => [n, 'absorbance-per-amount'] as const),
  ...['sample', 'single_beam_sample', 'sample_single_beam', 'sample_intensity', 'sb_sample'].map(
    (n) => [n, 'sample'] as const,
  ),
  ...[
    'background',
    'single_beam_background',
    'background_single_beam',
    'background_intensity',
    'reference',
    'sb_background',
  ].map((n) => [n, 'background'] as const),
]);

/** Header spellings recognised for each y-kind, for messages. */
const Y_NAME_HINT =
  'absorbance (or A), absorbance_natural (or ln), transmittance (or T, a fraction), transmittance_pct ' +
  '(or %T), or a pair sample,background (single_beam_sample,single_beam_background)';

function normaliseName(name: string): string {
  return name
    .toLowerCase()
    .replace(/[µμ]/g, 'u')
    .replace(/[^a-z0-9%]+/g, '_')
    .replace(/^_+|_+$/g, '');
}

function xUnitOf(name: string, where: string): AbscissaUnit {
  const tokens = name
    .toLowerCase()
    .replace(/[µμ]/g, 'u')
    .split(/[^a-z0-9]+/)
    .filter((t) => t !== '');
  const has = (...words: string[]): boolean => words.some((w) => tokens.includes(w));
  if (has('um', 'micrometer', 'micrometers', 'micrometre', 'micrometres', 'micron', 'microns')) return 'um';
  if (has('nm', 'nanometer', 'nanometers', 'nanometre', 'nanometres')) return 'nm';
  if (has('cm', 'cm1', 'wavenumber', 'wavenumbers')) return 'cm-1';
  if (has('wavelength', 'lambda')) {
    throw new BandwrightError(
      'PARSE',
      `${where}: x column "${name}" is a wavelength without a unit; name it wavelength_um or wavelength_nm`,
      {
        parameter: name,
      },
    );
  }
  return 'cm-1';
}

function describeKind(kind: YKind): string {
  return kind;
}

/** Splits one line into cells honouring double quotes (used for the header line only). */
function splitCells(line: string, delimiter: string): string[] {
  const cells: string[] = [];
  let current = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i] as string;
    if (quoted) {
      if (ch === '"') {
        if (line[i + 1] === '"') {
          current += '"';
          i++;
        } else quoted = false;
      } else current += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === delimiter) {
      cells.push(current.trim());
      current = '';
    } else current += ch;
  }
  cells.push(current.trim());
  return cells;
}

/** Counts tab, semicolon and comma outside double quotes. */
function countDelimiters(
  bytes: Uint8Array,
  start: number,
  end: number,
): { tab: number; semicolon: number; comma: number } {
  let tab = 0;
  let semicolon = 0;
  let comma = 0;
  let quoted = false;
  for (let i = start; i < end; i++) {
    const c = bytes[i];
    if (c === QUOTE) quoted = !quoted;
    else if (!quoted) {
      if (c === TAB) tab++;
      else if (c === SEMICOLON) semicolon++;
      else if (c === COMMA) comma++;
    }
  }
  return { tab, semicolon, comma };
}

/** The columns: what each holds, their names, what y is and the unit of x. */
export interface Layout {
  roles: Role[];
  names: string[];
  yKind: YKind;
  xUnit: AbscissaUnit;
}

function resolveLayout(
  header: string[] | undefined,
  columnCount: number,
  options: TableLayoutOptions,
  headerLine: number,
): Layout {
  const source = options.source;
  const at = header === undefined ? `${source}` : `${source} line ${headerLine}`;
  let headerKind: YKind | undefined;
  let roles: Role[];
  let xUnit: AbscissaUnit = 'cm-1';
  if (header !== undefined) {
    xUnit = xUnitOf(header[0] ?? '', at);
    const kinds = header.slice(1).map((name) => Y_NAMES.get(normaliseName(name)));
    if (header.length === 2) {
      const kind = kinds[0];
      if (kind === 'sample' || kind === 'background') {
        throw new BandwrightError(
          'PARSE',
          `${at}: column "${header[1]}" is a single-beam ${kind} spectrum; a single-beam table needs ` +
            `both columns, x,sample,background`,
          {
            file: source,
            line: headerLine,
          },
        );
      }
      headerKind = kind;
      roles = ['x', 'y'];
    } else if (header.length === 3) {
      const [first, second] = kinds;
      if (
        (first === 'sample' && second === 'background') ||
        (first === 'background' && second === 'sample')
      ) {
        headerKind = 'single-beam';
        roles = ['x', first, second];
      } else if (first === undefined && second === undefined) {
        roles = ['x', 'sample', 'background'];
      } else {
        throw new BandwrightError(
          'PARSE',
          `${at}: header ${JSON.stringify(header.join(','))} has 3 columns; 3 columns must be x, ` +
            `sample, background (single-beam pair)`,
          { file: source, line: headerLine },
        );
      }
    } else {
      throw new BandwrightError(
        'PARSE',
        `${at}: header has ${header.length} column(s), expected 2 (x, y) or 3 (x, sample, background)`,
        {
          file: source,
          line: headerLine,
        },
      );
    }
  } else if (columnCount === 2) roles = ['x', 'y'];
  else if (columnCount === 3) roles = ['x', 'sample', 'background'];
  else {
    throw new BandwrightError(
      'PARSE',
      `${at} line ${headerLine}: ${columnCount} field(s), expected 2 (x, y) or 3 (x, sample, background)`,
      {
        file: source,
        line: headerLine,
      },
    );
  }
  if (headerKind !== undefined && options.yKind !== undefined && headerKind !== options.yKind) {
    throw new BandwrightError(
      'PARSE',
      `${at}: header column ${JSON.stringify(header?.slice(1).join(','))} says ` +
        `${describeKind(headerKind)} but the y-kind option says ${describeKind(options.yKind)}; ` +
        `remove one or make them agree`,
      { file: source, line: headerLine, parameter: 'yKind' },
    );
  }
  const yKind = headerKind ?? options.yKind ?? options.defaultYKind;
  if (yKind === undefined) {
    const why =
      header === undefined
        ? 'has no header line'
        : `header column ${JSON.stringify(header.slice(1).join(','))} does not name a y-kind`;
    throw new BandwrightError(
      'PARSE',
      `${at}: ${why}, so what y is (absorbance, transmittance, …) is unknown; name the y column ` +
        `${Y_NAME_HINT}, or give the y-kind explicitly`,
      { file: source, line: headerLine, parameter: 'yKind' },
    );
  }
  if ((yKind === 'single-beam') !== (roles.length === 3)) {
    throw new BandwrightError(
      'PARSE',
      yKind === 'single-beam'
        ? `${at}: y-kind single-beam needs 3 columns (x, sample, background), found ${roles.length}`
        : `${at}: 3 columns (x, sample, background) but y-kind ${yKind}; 3 columns are read only as a single-beam pair`,
      { file: source, line: headerLine },
    );
  }
  const defaultNames: Record<Role, string> = { x: 'x', y: 'y', sample: 'sample', background: 'background' };
  const names = header ?? roles.map((role) => defaultNames[role]);
  return { roles, names, yKind, xUnit };
}

/** Everything the data rows need to know about the table's layout. */
export interface TableLayout extends Layout {
  /** Field delimiter byte. */
  delimiter: number;
  /** Decimal separator byte. */
  decimal: number;
  /** Whether the decimal separator was detected (not given). */
  decimalDetected: boolean;
  /** Byte offset of the first data line. */
  dataStart: number;
  /** Its 1-based line number. */
  dataLine: number;
}

function detectDelimiter(bytes: Uint8Array, preamble: Preamble, source: string): number {
  const { contentStart, contentEnd, contentLine } = preamble;
  const counts = countDelimiters(bytes, contentStart, contentEnd);
  if (counts.tab > 0) return TAB;
  if (counts.semicolon > 0) return SEMICOLON;
  if (counts.comma > 0) return COMMA;
  throw new BandwrightError(
    'PARSE',
    `${source} line ${contentLine}: ${JSON.stringify(shortText(bytes, contentStart, contentEnd))} ` +
      `has no delimiter (comma, semicolon or tab); a spectrum table needs an x and a y column`,
    { file: source, line: contentLine },
  );
}

function detectDecimal(bytes: Uint8Array, dataStart: number, delimiter: number): number {
  const length = bytes.length;
  if (delimiter !== COMMA) return bytes.indexOf(COMMA, dataStart) >= 0 ? COMMA : PERIOD;
  let p = dataStart;
  while (p < length && (bytes[p] === SPACE || bytes[p] === TAB || bytes[p] === CR || bytes[p] === LF)) p++;
  let commaInQuotes = false;
  if (bytes[p] === QUOTE) {
    const close = bytes.indexOf(QUOTE, p + 1);
    const lineEnd = bytes.indexOf(LF, p);
    const limit = close < 0 ? length : close;
    if (lineEnd < 0 || limit < lineEnd) {
      const comma = bytes.indexOf(COMMA, p + 1);
      commaInQuotes = comma >= 0 && comma < limit;
    }
  }
  return commaInQuotes ? COMMA : PERIOD;
}

/**
 * Works out the table's layout from its first content line and the caller's options.
 *
 * @param bytes - file content
 * @param preamble - where the content starts (see `readPreamble`)
 * @param options - source label, y-kind, delimiter, decimal separator
 * @returns delimiter, decimal separator, columns, y-kind, x unit and where the data start
 * @throws BandwrightError `PARSE` when no delimiter is found, the header or column count is not
 *   a spectrum's, the y-kind is unknown or contradicts the option, or the single-beam pair is
 *   incomplete
 */
export function readLayout(bytes: Uint8Array, preamble: Preamble, options: TableLayoutOptions): TableLayout {
  const { contentStart, contentEnd, contentLine } = preamble;
  const delimiter =
    options.delimiter !== undefined
      ? options.delimiter.charCodeAt(0)
      : detectDelimiter(bytes, preamble, options.source);
  const firstCells = splitCells(decodeText(bytes, contentStart, contentEnd), String.fromCharCode(delimiter));
  const firstCell = firstCells[0] ?? '';
  const firstIsNumber =
    !Number.isNaN(parseNumberText(firstCell, DECIMAL_POINT)) ||
    !Number.isNaN(parseNumberText(firstCell, DECIMAL_COMMA)) ||
    /^[+-]?(nan|inf|infinity)$/i.test(firstCell);
  const header = firstIsNumber ? undefined : firstCells;
  const dataStart = header === undefined ? contentStart : preamble.nextLine;
  const dataLine = header === undefined ? contentLine : contentLine + 1;
  const layout = resolveLayout(header, firstCells.length, options, contentLine);
  const decimal =
    options.decimal !== undefined
      ? options.decimal.charCodeAt(0)
      : detectDecimal(bytes, dataStart, delimiter);
  // Written out rather than spread from `layout`: an object spread followed by more properties
  // costs microseconds a call on Node 20, as much as reading a 200-point table.
  return {
    roles: layout.roles,
    names: layout.names,
    yKind: layout.yKind,
    xUnit: layout.xUnit,
    delimiter,
    decimal,
    decimalDetected: options.decimal === undefined,
    dataStart,
    dataLine,
  };
}
