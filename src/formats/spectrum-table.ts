/**
 * Reader for spectrum tables (CSV/TSV): an x column and one y column, or an x column and a
 * sample/background pair of single-beam columns. Bytes in, Float64Arrays out, one pass over the
 * data with no string made per value (see `number-parse.ts`).
 *
 * Layout accepted, in order:
 * 1. an optional UTF-8 byte-order mark;
 * 2. blank lines and `#` comment lines; a comment of the form `# key = value` with a key
 *    `title`, `path_length_m`, `temperature_K`, `temperature_C`, `pressure_kPa`,
 *    `resolution_cm-1` or `date` sets that metadata field (other comments are free text);
 * 3. an optional header line (present when its first cell is not a number);
 * 4. data lines, one point each, contiguous; blank lines may follow the data, nothing else.
 *
 * Delimiter: tab, `;` or `,` — the first of these found on the first non-comment line, unless
 * given. Decimal separator: `,` when the delimiter is `;` or tab and the data contain a comma,
 * or when the delimiter is `,` and the first field is quoted and contains a comma; `.`
 * otherwise, unless given. A decimal comma with a comma delimiter needs every field quoted.
 *
 * x is in cm⁻¹ unless the header's x column names micrometres (`wavelength_um`, `micrometers`,
 * `µm`, `microns`) → ν = 10⁴/λ, or nanometres (`wavelength_nm`, `nanometers`) → ν = 10⁷/λ.
 * Descending x is reversed so the result ascends; a reversal or duplicate is an error.
 *
 * The y-kind comes from the header's y column name or from the `yKind` option; if both are
 * present they must agree. Without either, `defaultYKind` applies only when the caller gave one:
 * absorbance is never assumed silently.
 */
import { BandwrightError } from '../errors.js';
import { makeSpectrum, type ScanMetadata, type Spectrum, type YKind } from '../spectrum/spectrum.js';
import { RESOURCE_LIMIT_SETTINGS } from '../resource-limits.js';
import {
  DECIMAL_COMMA,
  DECIMAL_POINT,
  parseNumberText,
  scanNumber,
  type NumberSyntax,
  type ScanCursor,
} from './number-parse.js';

/** Options of {@link parseSpectrumTable}. */
export interface SpectrumTableOptions {
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
  /** Most data points accepted before a `LIMIT` error; default 2,000,000. */
  maxPoints?: number;
  /**
   * Return the columns as views on buffers that the next parse in this thread overwrites
   * (default false: arrays of their own). For callers done with a spectrum before they parse
   * the next, such as a batch, it saves an allocation and a copy per column.
   */
  reuseOutput?: boolean;
}

/** Default of {@link SpectrumTableOptions.maxPoints} (the BANDWRIGHT_MAX_POINTS default). */
export const DEFAULT_MAX_POINTS = RESOURCE_LIMIT_SETTINGS.maxPoints.default;

/**
 * The largest transmittance-fraction value accepted. A fraction cannot exceed 1 beyond noise;
 * values above 1.5 are percent mislabelled as a fraction, and reading them as a fraction would
 * give wildly wrong absorbances, so they are refused rather than rescaled by guesswork.
 */
export const MAX_TRANSMITTANCE_FRACTION = 1.5;

const TAB = 0x09;
const SPACE = 0x20;
const QUOTE = 0x22;
const HASH = 0x23;
const COMMA = 0x2c;
const SEMICOLON = 0x3b;
const LF = 0x0a;
const CR = 0x0d;

type Role = 'x' | 'y' | 'sample' | 'background';
type XUnit = 'cm-1' | 'um' | 'nm';

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
  'absorbance (or A), absorbance_natural (or ln), transmittance (or T, a fraction), transmittance_pct (or %T), or a pair sample,background (single_beam_sample,single_beam_background)';

function normaliseName(name: string): string {
  return name
    .toLowerCase()
    .replace(/[µμ]/g, 'u')
    .replace(/[^a-z0-9%]+/g, '_')
    .replace(/^_+|_+$/g, '');
}

function xUnitOf(name: string, where: string): XUnit {
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

/** Text of bytes[start, end) for messages (UTF-8, invalid bytes replaced), shortened. */
function textOf(bytes: Uint8Array, start: number, end: number): string {
  const text = new TextDecoder('utf-8').decode(bytes.subarray(start, Math.min(end, start + 200)));
  return text.length > 40 ? `${text.slice(0, 40)}…` : text;
}

function delimiterName(byte: number): string {
  return byte === TAB ? 'tab' : `'${String.fromCharCode(byte)}'`;
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

const METADATA_KEYS = new Set([
  'title',
  'path_length_m',
  'temperature_k',
  'temperature_c',
  'pressure_kpa',
  'resolution_cm-1',
  'resolution_cm',
  'date',
]);

/** Reads a `# key = value` comment into metadata; other comments are ignored. */
function readCommentLine(
  text: string,
  lineNumber: number,
  source: string,
  metadata: ScanMetadata,
  seen: Map<string, number>,
): void {
  const body = text.replace(/^\s*#+/, '');
  const equals = body.indexOf('=');
  if (equals < 0) return;
  const key = body.slice(0, equals).trim().toLowerCase().replace(/\s+/g, '_');
  if (!METADATA_KEYS.has(key)) return;
  const rawValue = body.slice(equals + 1).trim();
  const canonical =
    key === 'resolution_cm' ? 'resolution_cm-1' : key === 'temperature_c' ? 'temperature_k' : key;
  const earlier = seen.get(canonical);
  if (earlier !== undefined) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${lineNumber}: ${body.slice(0, equals).trim()} given again (first on line ${earlier}), must appear once`,
      {
        file: source,
        line: lineNumber,
        parameter: key,
      },
    );
  }
  seen.set(canonical, lineNumber);
  if (key === 'title') {
    metadata.title = rawValue;
    return;
  }
  if (key === 'date') {
    metadata.dateText = rawValue;
    return;
  }
  const value = parseNumberText(rawValue);
  const name = body.slice(0, equals).trim();
  const bad = (rule: string): never => {
    const shown = rawValue.length > 40 ? `${rawValue.slice(0, 40)}…` : rawValue;
    throw new BandwrightError(
      'INVALID_VALUE',
      `${source} line ${lineNumber}: ${name} = ${JSON.stringify(shown)}, ${rule}`,
      {
        file: source,
        line: lineNumber,
        parameter: name,
      },
    );
  };
  if (!Number.isFinite(value)) bad('must be a finite number');
  switch (key) {
    case 'path_length_m':
      if (!(value > 0)) bad('must be > 0');
      metadata.pathLength_m = value;
      break;
    case 'temperature_k':
      if (!(value > 0)) bad('must be > 0 K');
      metadata.temperature_K = value;
      break;
    case 'temperature_c':
      if (!(value > -273.15)) bad('must be above absolute zero (> -273.15 °C)');
      metadata.temperature_K = value + 273.15;
      break;
    case 'pressure_kpa':
      if (!(value > 0)) bad('must be > 0');
      metadata.pressure_kPa = value;
      break;
    default:
      if (!(value > 0)) bad('must be > 0');
      metadata.resolution_cm = value;
  }
}

interface Layout {
  roles: Role[];
  names: string[];
  yKind: YKind;
  xUnit: XUnit;
}

function resolveLayout(
  header: string[] | undefined,
  columnCount: number,
  options: SpectrumTableOptions,
  headerLine: number,
): Layout {
  const source = options.source;
  const at = header === undefined ? `${source}` : `${source} line ${headerLine}`;
  let headerKind: YKind | undefined;
  let roles: Role[];
  let xUnit: XUnit = 'cm-1';
  if (header !== undefined) {
    xUnit = xUnitOf(header[0] ?? '', at);
    const kinds = header.slice(1).map((name) => Y_NAMES.get(normaliseName(name)));
    if (header.length === 2) {
      const kind = kinds[0];
      if (kind === 'sample' || kind === 'background') {
        throw new BandwrightError(
          'PARSE',
          `${at}: column "${header[1]}" is a single-beam ${kind} spectrum; a single-beam table needs both columns, x,sample,background`,
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
          `${at}: header ${JSON.stringify(header.join(','))} has 3 columns; 3 columns must be x, sample, background (single-beam pair)`,
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
      `${at}: header column ${JSON.stringify(header?.slice(1).join(','))} says ${describeKind(headerKind)} but the y-kind option says ${describeKind(options.yKind)}; remove one or make them agree`,
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
      `${at}: ${why}, so what y is (absorbance, transmittance, …) is unknown; name the y column ${Y_NAME_HINT}, or give the y-kind explicitly`,
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

/** What the row loop needs; passed explicitly so the hot loop keeps its values in registers. */
interface RowContext {
  bytes: Uint8Array;
  length: number;
  source: string;
  delimiter: number;
  decimal: number;
  decimalDetected: boolean;
  skipTabs: boolean;
  quotesRequired: boolean;
  columnCount: number;
  names: string[];
  /** Initial length of the output arrays (they double when full, up to maxPoints). */
  capacity: number;
  maxPoints: number;
  syntax: NumberSyntax;
  /** Per column: 0 x, 1 y (or sample), 2 background. */
  roles: number[];
}

function rowFail(
  context: RowContext,
  code: 'PARSE' | 'INVALID_VALUE' | 'NOT_MONOTONIC' | 'LIMIT',
  line: number,
  message: string,
  parameter?: string,
): never {
  const source = context.source;
  throw new BandwrightError(
    code,
    `${source} line ${line}: ${message}`,
    parameter === undefined ? { file: source, line } : { file: source, line, parameter },
  );
}

function fieldEnd(context: RowContext, start: number, end: number): number {
  const { bytes, delimiter } = context;
  let quoted = false;
  for (let i = start; i < end; i++) {
    const c = bytes[i];
    if (c === QUOTE) quoted = !quoted;
    else if (!quoted && c === delimiter) return i;
  }
  return end;
}

function lineEndAt(context: RowContext, from: number): number {
  const { bytes, length } = context;
  let end = bytes.indexOf(LF, from);
  if (end < 0) end = length;
  if (end > from && bytes[end - 1] === CR) end--;
  return end;
}

/** Diagnoses a field that is not a number and throws the most specific message. */
function badField(context: RowContext, line: number, column: number, start: number, lineEnd: number): never {
  const { delimiter, decimal } = context;
  const name = context.names[column] ?? `column ${column + 1}`;
  const stop = fieldEnd(context, start, lineEnd);
  let text = textOf(context.bytes, start, stop).trim();
  if (text.length >= 2 && text.startsWith('"') && text.endsWith('"')) text = text.slice(1, -1);
  if (text === '')
    return rowFail(context, 'PARSE', line, `column ${column + 1} (${name}) is empty, must be a number`, name);
  if (/^[+-]?(nan|inf|infinity)$/i.test(text)) {
    return rowFail(
      context,
      'INVALID_VALUE',
      line,
      `column ${column + 1} (${name}) = ${JSON.stringify(text)}, must be a finite number`,
      name,
    );
  }
  for (const other of [TAB, SEMICOLON, COMMA]) {
    // A stray comma in a tab/semicolon table is a decimal-separator problem, reported below.
    if (other === COMMA && delimiter !== COMMA) continue;
    if (other !== delimiter && other !== decimal && text.includes(String.fromCharCode(other))) {
      return rowFail(
        context,
        'PARSE',
        line,
        `${delimiterName(other)} found in ${JSON.stringify(text)} but the delimiter is ${delimiterName(delimiter)}; mixed delimiters`,
        name,
      );
    }
  }
  const hint =
    decimal !== COMMA && text.includes(',')
      ? ` (the decimal separator is '.'; for a decimal comma use ';' or tab as the delimiter${delimiter === COMMA ? ', or quote every field, since a decimal comma with a comma delimiter is ambiguous' : ''})`
      : decimal === COMMA && text.includes('.')
        ? ` (the decimal separator is ','${context.decimalDetected ? ', detected from commas in the data' : ''}; a '.' is not accepted with it, nor is digit grouping)`
        : '';
  return rowFail(
    context,
    'PARSE',
    line,
    `column ${column + 1} (${name}) = ${JSON.stringify(text)}, not a number; must be a decimal such as 2143.5 or 1.2e-3${hint}`,
    name,
  );
}

function grown(array: Float64Array<ArrayBuffer>, capacity: number): Float64Array<ArrayBuffer> {
  if (array.length >= capacity) return array;
  const bigger = new Float64Array(capacity);
  bigger.set(array);
  return bigger;
}

/**
 * Column buffers reused from one table to the next (a batch reads thousands): rows are read into
 * them and the result gets exact-size copies, so a table costs one allocation per column instead
 * of a guess, its growth and a trim. Buffers above {@link SCRATCH_LIMIT} values are not kept.
 */
const scratch: {
  xs: Float64Array<ArrayBuffer>;
  ys: Float64Array<ArrayBuffer>;
  backgrounds: Float64Array<ArrayBuffer>;
} = {
  xs: new Float64Array(0),
  ys: new Float64Array(0),
  backgrounds: new Float64Array(0),
};
const SCRATCH_LIMIT = 1 << 18;

function keep(
  array: Float64Array<ArrayBuffer>,
  previous: Float64Array<ArrayBuffer>,
): Float64Array<ArrayBuffer> {
  return array.length <= SCRATCH_LIMIT && array.length > previous.length ? array : previous;
}

/**
 * The data rows: one pass per line, numbers scanned up to the buffer's end (a line break is not a
 * digit, so no number runs past its line); the line end is looked for only to explain an error.
 * Checks monotonic x as it goes, so the message names the line.
 */
function readRows(
  context: RowContext,
  start: number,
  firstLine: number,
): { n: number; direction: number; xs: Float64Array; ys: Float64Array; backgrounds: Float64Array } {
  const { bytes, length, delimiter, skipTabs, quotesRequired, columnCount, syntax, roles, maxPoints } =
    context;
  // Capacity is what the rows may fill before growing (never above maxPoints); the reused buffers may be longer.
  let capacity = Math.min(maxPoints, Math.max(context.capacity, scratch.xs.length));
  let xs = grown(scratch.xs, capacity);
  let ys = grown(scratch.ys, capacity);
  let backgrounds = columnCount === 3 ? grown(scratch.backgrounds, capacity) : scratch.backgrounds;
  const cursor: ScanCursor = { end: 0 };
  const lastColumn = columnCount - 1;
  let n = 0;
  let direction = 0;
  let blankLine = 0;
  let pos = start;
  let lineNumber = firstLine - 1;
  while (pos < length) {
    lineNumber++;
    let p = pos;
    let c = bytes[p] as number;
    while (c === SPACE || (skipTabs && c === TAB)) c = bytes[++p] as number;
    if (p >= length || c === LF || c === CR) {
      const end = lineEndAt(context, pos);
      if (end > p)
        rowFail(context, 'PARSE', lineNumber, 'a carriage return inside the line; lines end with LF or CRLF');
      pos = end < length && bytes[end] === CR ? end + 2 : end + 1;
      if (blankLine === 0) blankLine = lineNumber;
      continue;
    }
    if (blankLine !== 0)
      rowFail(
        context,
        'PARSE',
        lineNumber,
        `data after the blank line ${blankLine}; the data lines of a table must be contiguous`,
      );
    if (c === HASH)
      rowFail(
        context,
        'PARSE',
        lineNumber,
        'comment line inside the data; # comments are allowed only before the data',
      );
    if (n === capacity) {
      if (capacity >= maxPoints)
        rowFail(
          context,
          'LIMIT',
          lineNumber,
          `more than ${maxPoints} data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)`,
        );
      capacity = Math.min(maxPoints, capacity * 2);
      xs = grown(xs, capacity);
      ys = grown(ys, capacity);
      if (columnCount === 3) backgrounds = grown(backgrounds, capacity);
    }
    for (let column = 0; column < columnCount; column++) {
      c = bytes[p] as number;
      while (c === SPACE || (skipTabs && c === TAB)) c = bytes[++p] as number;
      const fieldStart = p;
      const quoted = c === QUOTE;
      if (quoted) p++;
      else if (quotesRequired) {
        rowFail(
          context,
          'PARSE',
          lineNumber,
          `column ${column + 1} is not quoted; with a decimal comma and a comma delimiter every field must be quoted ("1234,5","0,25"), otherwise the comma is ambiguous`,
        );
      }
      const value = scanNumber(bytes, p, length, syntax, cursor);
      if (cursor.end === p) badField(context, lineNumber, column, fieldStart, lineEndAt(context, fieldStart));
      p = cursor.end;
      if (quoted) {
        if (bytes[p] !== QUOTE)
          badField(context, lineNumber, column, fieldStart, lineEndAt(context, fieldStart));
        p++;
      }
      c = bytes[p] as number;
      while (c === SPACE || (skipTabs && c === TAB)) c = bytes[++p] as number;
      if (column < lastColumn) {
        if (c !== delimiter) {
          const end = lineEndAt(context, fieldStart);
          if (p >= end)
            rowFail(
              context,
              'PARSE',
              lineNumber,
              `${column + 1} field(s), expected ${columnCount} (${context.names.join(', ')})`,
            );
          badField(context, lineNumber, column, fieldStart, end);
        }
        p++;
      } else {
        if (c === CR && (p + 1 >= length || bytes[p + 1] === LF)) p++;
        if (p < length && bytes[p] !== LF) {
          const end = lineEndAt(context, fieldStart);
          if (p < end && bytes[p] === delimiter) {
            let fields = columnCount;
            for (let k = p; k < end; k = fieldEnd(context, k + 1, end)) fields++;
            const hint =
              context.decimal !== COMMA && delimiter === COMMA
                ? '; if the numbers use a decimal comma, a comma delimiter is ambiguous: use ; or tab, or quote every field'
                : '';
            rowFail(
              context,
              'PARSE',
              lineNumber,
              `${fields} fields, expected ${columnCount} (${context.names.join(', ')})${hint}`,
            );
          }
          if (p >= end)
            rowFail(
              context,
              'PARSE',
              lineNumber,
              'a carriage return inside the line; lines end with LF or CRLF',
            );
          badField(context, lineNumber, column, fieldStart, end);
        }
      }
      if (value - value !== 0) {
        const name = context.names[column] ?? `column ${column + 1}`;
        rowFail(
          context,
          'INVALID_VALUE',
          lineNumber,
          `column ${column + 1} (${name}) = ${JSON.stringify(textOf(bytes, fieldStart, cursor.end).trim())} overflows a double, must be a finite number`,
          name,
        );
      }
      const role = roles[column];
      if (role === 0) xs[n] = value;
      else if (role === 1) ys[n] = value;
      else backgrounds[n] = value;
    }
    pos = p + 1;
    if (n > 0) {
      const step = (xs[n] as number) - (xs[n - 1] as number);
      if (step === 0)
        rowFail(
          context,
          'NOT_MONOTONIC',
          lineNumber,
          `x = ${xs[n]} repeats the previous line's x; duplicate x value`,
          context.names[0],
        );
      const sign = step > 0 ? 1 : -1;
      if (direction === 0) direction = sign;
      else if (sign !== direction) {
        rowFail(
          context,
          'NOT_MONOTONIC',
          lineNumber,
          `x = ${xs[n]} after ${xs[n - 1]} reverses the ${direction > 0 ? 'ascending' : 'descending'} order; x values must be strictly increasing or strictly decreasing`,
          context.names[0],
        );
      }
    }
    n++;
  }
  scratch.xs = keep(xs, scratch.xs);
  scratch.ys = keep(ys, scratch.ys);
  scratch.backgrounds = keep(backgrounds, scratch.backgrounds);
  return { n, direction, xs, ys, backgrounds };
}

/**
 * The same bytes as a Buffer (no copy). The readers search for line breaks and other bytes with
 * `indexOf`; Buffer's is a memchr-style search, several times faster than the typed-array builtin
 * on the short line-by-line searches and over twenty times on whole-file ones (measured, Node 20).
 *
 * @param bytes - file content
 */
export function asBuffer(bytes: Uint8Array): Buffer {
  return Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/**
 * Refuses UTF-16 text (as spreadsheet "Unicode text" exports write it), which would otherwise
 * fail on its first NUL byte with a puzzling message.
 *
 * @param bytes - file content
 * @param source - label for the message
 * @throws BandwrightError `PARSE` when the content starts with a UTF-16 byte-order mark or its
 *   first bytes alternate with NUL
 */
export function assertNotUtf16(bytes: Uint8Array, source: string): void {
  const bom =
    bytes.length >= 2 &&
    ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff));
  const nulPattern =
    bytes.length >= 4 &&
    ((bytes[1] === 0 && bytes[3] === 0 && bytes[0] !== 0) ||
      (bytes[0] === 0 && bytes[2] === 0 && bytes[1] !== 0));
  if (bom || nulPattern) {
    throw new BandwrightError('PARSE', `${source}: the file is UTF-16 text; save it as UTF-8 (or ASCII)`, {
      file: source,
    });
  }
}

/**
 * Refuses text whose lines end with CR alone (classic Mac OS exports): read line by line at LF it
 * would be one long line, and the messages would point at line 1 with the whole file as a value.
 *
 * @param bytes - file content
 * @param source - label for the message
 * @throws BandwrightError `PARSE` when the content holds CR but no LF
 */
export function assertLineEnds(bytes: Uint8Array, source: string): void {
  if (bytes.indexOf(CR) >= 0 && bytes.indexOf(LF) < 0) {
    throw new BandwrightError(
      'PARSE',
      `${source}: lines end with CR alone (an old Mac OS export); save the file with LF or CRLF line ends`,
      { file: source },
    );
  }
}

/**
 * Refuses transmittance-fraction data that reach above {@link MAX_TRANSMITTANCE_FRACTION}.
 *
 * @param y - the ordinates as read
 * @param where - message prefix (the source)
 * @param hint - how to declare percent in this file format
 * @throws BandwrightError `INVALID_VALUE` naming the largest value
 */
export function assertTransmittanceFraction(y: Float64Array, where: string, hint: string): void {
  let max = -Infinity;
  let at = 0;
  for (let i = 0; i < y.length; i++) {
    if ((y[i] as number) > max) {
      max = y[i] as number;
      at = i;
    }
  }
  if (max > MAX_TRANSMITTANCE_FRACTION) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: transmittance (fraction) reaches ${max} at point ${at + 1}, a fraction cannot exceed ${MAX_TRANSMITTANCE_FRACTION}; the values look like percent: ${hint}`,
      { file: where },
    );
  }
}

/**
 * Parses a spectrum table from bytes.
 *
 * @param bytes - the file content (UTF-8 or ASCII; a BOM is skipped)
 * @param options - source label, y-kind, delimiter, decimal separator, point limit
 * @returns a spectrum on ascending wavenumbers (cm⁻¹) with `metadata.format = 'csv'` and any
 *   `# key = value` conditions (path length m, temperature K, pressure kPa, resolution cm⁻¹)
 * @throws BandwrightError `PARSE` (layout, non-numeric cell, column count, mixed delimiters,
 *   undeclared y-kind), `INVALID_VALUE` (NaN, infinities, overflow, λ ≤ 0, transmittance
 *   fraction above 1.5), `NOT_MONOTONIC` (reversal or duplicate x, naming the line), `LIMIT`
 *   (more than `maxPoints` points). Every message names the source and line.
 * @example
 * const spectrum = parseSpectrumTable(new TextEncoder().encode('wavenumber_cm-1,absorbance\n2000,0.1\n2001,0.2\n'),
 *   { source: 'co.csv' });
 * // spectrum.yKind === 'absorbance', spectrum.x = [2000, 2001]
 */
export function parseSpectrumTable(bytes: Uint8Array, options: SpectrumTableOptions): Spectrum {
  const source = options.source;
  const maxPoints = options.maxPoints ?? DEFAULT_MAX_POINTS;
  if (!Number.isInteger(maxPoints) || maxPoints < 2) {
    throw new BandwrightError('INVALID_VALUE', `maxPoints = ${maxPoints}, must be an integer >= 2`, {
      parameter: 'maxPoints',
    });
  }
  bytes = asBuffer(bytes);
  const length = bytes.length;
  assertNotUtf16(bytes, source);
  assertLineEnds(bytes, source);
  let pos = length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  let lineNumber = 0;
  const metadata: ScanMetadata = { source, format: 'csv' };
  const seenKeys = new Map<string, number>();

  // Preamble: blank lines and comments up to the first content line.
  let contentStart = -1;
  let contentEnd = -1;
  let nextLine = pos;
  while (pos < length) {
    lineNumber++;
    let lineEnd = bytes.indexOf(LF, pos);
    if (lineEnd < 0) lineEnd = length;
    nextLine = lineEnd + 1;
    let end = lineEnd;
    if (end > pos && bytes[end - 1] === CR) end--;
    let p = pos;
    while (p < end && (bytes[p] === SPACE || bytes[p] === TAB)) p++;
    if (p < end) {
      if (bytes[p] === HASH) {
        readCommentLine(
          new TextDecoder('utf-8').decode(bytes.subarray(p, end)),
          lineNumber,
          source,
          metadata,
          seenKeys,
        );
      } else {
        contentStart = pos;
        contentEnd = end;
        break;
      }
    }
    pos = nextLine;
  }
  if (contentStart < 0) {
    throw new BandwrightError('PARSE', `${source}: no data lines (the file is empty or has only comments)`, {
      file: source,
    });
  }
  const firstContentLine = lineNumber;

  // Delimiter.
  let delimiter: number;
  if (options.delimiter !== undefined) delimiter = options.delimiter.charCodeAt(0);
  else {
    const counts = countDelimiters(bytes, contentStart, contentEnd);
    if (counts.tab > 0) delimiter = TAB;
    else if (counts.semicolon > 0) delimiter = SEMICOLON;
    else if (counts.comma > 0) delimiter = COMMA;
    else {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${firstContentLine}: ${JSON.stringify(textOf(bytes, contentStart, contentEnd))} has no delimiter (comma, semicolon or tab); a spectrum table needs an x and a y column`,
        { file: source, line: firstContentLine },
      );
    }
  }
  const delimiterText = String.fromCharCode(delimiter);

  // Header or data?
  const firstCells = splitCells(
    new TextDecoder('utf-8').decode(bytes.subarray(contentStart, contentEnd)),
    delimiterText,
  );
  const firstCell = firstCells[0] ?? '';
  const firstIsNumber =
    !Number.isNaN(parseNumberText(firstCell, DECIMAL_POINT)) ||
    !Number.isNaN(parseNumberText(firstCell, DECIMAL_COMMA)) ||
    /^[+-]?(nan|inf|infinity)$/i.test(firstCell);
  const header = firstIsNumber ? undefined : firstCells;
  let dataStart: number;
  let dataLineNumber: number;
  if (header === undefined) {
    dataStart = contentStart;
    dataLineNumber = firstContentLine;
  } else {
    dataStart = nextLine;
    dataLineNumber = firstContentLine + 1;
  }
  const layout = resolveLayout(header, firstCells.length, options, firstContentLine);
  const columnCount = layout.roles.length;

  // Decimal separator.
  let decimal: number;
  if (options.decimal !== undefined) decimal = options.decimal.charCodeAt(0);
  else if (delimiter !== COMMA) decimal = bytes.indexOf(COMMA, dataStart) >= 0 ? COMMA : 0x2e;
  else {
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
    decimal = commaInQuotes ? COMMA : 0x2e;
  }
  const syntax: NumberSyntax = decimal === COMMA ? DECIMAL_COMMA : DECIMAL_POINT;
  const quotesRequired = decimal === COMMA && delimiter === COMMA;
  const skipTabs = delimiter !== TAB;

  // First guess at the number of points from the first data line's length; arrays grow if needed.
  let firstEnd = bytes.indexOf(LF, dataStart);
  if (firstEnd < 0) firstEnd = length;
  const estimate = Math.ceil(((length - dataStart) / Math.max(1, firstEnd - dataStart + 1)) * 1.05) + 16;
  const capacity = Math.min(estimate, maxPoints);
  const roles = layout.roles.map((role) => (role === 'x' ? 0 : role === 'background' ? 2 : 1));
  const context: RowContext = {
    bytes,
    length,
    source,
    delimiter,
    decimal,
    decimalDetected: options.decimal === undefined,
    skipTabs,
    quotesRequired,
    columnCount,
    names: layout.names,
    capacity,
    maxPoints,
    syntax,
    roles,
  };
  const rows = readRows(context, dataStart, dataLineNumber);
  const { n, xs, ys } = rows;
  const backgrounds = columnCount === 3 ? rows.backgrounds : undefined;
  let direction = rows.direction;
  if (n === 0) throw new BandwrightError('PARSE', `${source}: a header but no data lines`, { file: source });

  // The row buffers are reused by the next table: a copy, unless the caller takes views.
  const trim = (array: Float64Array): Float64Array =>
    options.reuseOutput ? array.subarray(0, n) : array.slice(0, n);
  const x = trim(xs);
  const y = trim(ys);
  const background = backgrounds === undefined ? undefined : trim(backgrounds);
  if (layout.xUnit !== 'cm-1') {
    const scale = layout.xUnit === 'um' ? 1e4 : 1e7;
    for (let i = 0; i < n; i++) {
      const lambda = x[i] as number;
      if (!(lambda > 0)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `${source}: point ${i + 1}: wavelength ${lambda} ${layout.xUnit === 'um' ? 'µm' : 'nm'}, must be > 0 to give a wavenumber`,
          { file: source },
        );
      }
      x[i] = scale / lambda;
    }
    direction = -direction;
  }
  if (direction < 0) {
    x.reverse();
    y.reverse();
    background?.reverse();
  }
  if (layout.yKind === 'transmittance') {
    assertTransmittanceFraction(
      y,
      source,
      'name the column transmittance_pct (or %T) or give the y-kind transmittance-percent',
    );
  }
  return makeSpectrum(
    background === undefined
      ? { x, y, yKind: layout.yKind, metadata }
      : { x, y, yKind: layout.yKind, background, metadata },
  );
}
