/**
 * Typed errors for the whole core. Every failure a user can cause or meet is a
 * {@link BandwrightError} with a stable {@link ErrorCode}; the CLI maps codes to exit statuses.
 *
 * Messages follow one shape: where (file, line or parameter), the value, and the rule, e.g.
 * `standards.csv line 4: path_length_m = -1, must be > 0`.
 */

/** Stable error codes; scripts may match on them. */
export type ErrorCode =
  /** A command-line usage mistake (unknown option, missing argument). Exit status 2. */
  | 'USAGE'
  /** A file or folder that does not exist. */
  | 'FILE_NOT_FOUND'
  /** A file that exists but cannot be read (permissions, a directory where a file was expected). */
  | 'FILE_READ'
  /** An output file that exists and would be overwritten without `--force`. */
  | 'FILE_EXISTS'
  /** A file whose content does not follow its format (CSV, JCAMP-DX, JSON). */
  | 'PARSE'
  /** A JCAMP-DX DIF Y-check value that disagrees with the decoded ordinates. */
  | 'YCHECK'
  /** A value that breaks a rule: not finite, out of range, wrong sign. */
  | 'INVALID_VALUE'
  /** Abscissae that are not strictly monotonic (duplicates or a reversal). */
  | 'NOT_MONOTONIC'
  /** A band, baseline window or region that lies outside a scan, overlaps another or is inverted. */
  | 'WINDOW'
  /** Path length, temperature or pressure that is given nowhere for a scan. */
  | 'CONDITIONS_MISSING'
  /** A gas that is not in the species table. */
  | 'UNKNOWN_GAS'
  /** A gas with no infrared spectrum (homonuclear diatomic). */
  | 'IR_INACTIVE'
  /** Too few standards or distinct concentration levels for the model. */
  | 'INSUFFICIENT_DATA'
  /** A fit that cannot be made: collinear inputs, singular or ill-conditioned design. */
  | 'SINGULAR'
  /** A response that cannot be inverted to a concentration (outside the curve's reach). */
  | 'NO_SOLUTION'
  /** A file whose recorded SHA-256 does not match its content. */
  | 'INTEGRITY'
  /** A calibration file of a newer schema, or missing required fields. */
  | 'SCHEMA'
  /** A file held by another process's lock for longer than the wait allows. */
  | 'LOCKED'
  /** An input above a configured size or point limit. */
  | 'LIMIT'
  /** A unit conversion whose assumptions do not hold (for example O2 near the air value). */
  | 'CONVERSION'
  /**
   * A well-formed file that holds something other than a single infrared spectrum (NMR, a mass
   * spectrum, UV/Vis, several spectra …); `location.content` says what.
   */
  | 'UNSUPPORTED';

/** What a refused file holds, for scripts that sort refusals (see `UNSUPPORTED`). */
export type FileContent =
  | 'nmr'
  | 'mass-spectrum'
  | 'uv-vis'
  | 'raman'
  | 'reflectance'
  | 'chromatogram'
  | 'peak-table'
  | 'multidimensional'
  | 'several-spectra'
  | 'other';

/** Where an error happened, when known. All fields are optional and only used for messages. */
export interface ErrorLocation {
  /** File path as the user gave it (or a label such as `<stdin>`). */
  file?: string;
  /** 1-based line number in that file. */
  line?: number;
  /** Option, column or field name. */
  parameter?: string;
  /** What the file holds, when it is refused for that (`UNSUPPORTED`). */
  content?: FileContent;
}

/**
 * How a caller names the core's parameters in messages: the library's own names (`gas`,
 * `overwrite`, `pathLength_m` …) mapped to the caller's (the CLI maps `overwrite` to `--force`).
 * A name missing from the map is shown as the library name in backticks.
 */
export type ParameterNames = Readonly<Record<string, string>>;

/**
 * A message that names parameters: it is given a function that returns the caller's name for a
 * library parameter, so each caller words the same error with its own names.
 *
 * @example
 * (name) => `the calibration has 2 gases; choose the check standard's gas with ${name('gas')}`
 */
export type ParameterWording = (name: (parameter: string) => string) => string;

/**
 * Renders a {@link ParameterWording} with the given names.
 *
 * @param wording - the message function
 * @param names - caller's names for library parameters (default: the library names in backticks)
 * @returns the message text
 */
export function wordWithNames(wording: ParameterWording, names: ParameterNames = {}): string {
  return wording((parameter) => names[parameter] ?? `\`${parameter}\``);
}

/**
 * The one error type the core throws.
 *
 * The message is complete for library users. Where it must name a parameter of the caller (an
 * option that would fix the problem), it is given as a {@link ParameterWording}, and
 * {@link BandwrightError.describe} words it with the caller's names: the CLI passes its flags, so a
 * core error never hard-codes a command-line spelling.
 *
 * @example
 * throw new BandwrightError('INVALID_VALUE', 'standards.csv line 4: path_length_m = -1, must be > 0',
 *   { file: 'standards.csv', line: 4, parameter: 'path_length_m' });
 * throw new BandwrightError('FILE_EXISTS', (name) => `out.json exists; set ${name('overwrite')} to replace it`,
 *   { file: 'out.json', parameter: 'overwrite' });
 */
export class BandwrightError extends Error {
  /** Stable machine-readable code. */
  readonly code: ErrorCode;
  /** Where the problem is, for tools that want it separately from the message. */
  readonly location: ErrorLocation;
  /** The message as a function of parameter names, when it names any. */
  readonly wording: ParameterWording | undefined;

  /**
   * @param code - stable error code
   * @param message - full human message (where, the value, the rule), or a wording that names
   *   parameters through the function it is given
   * @param location - optional structured location
   * @param options - optional `cause`
   */
  constructor(
    code: ErrorCode,
    message: string | ParameterWording,
    location: ErrorLocation = {},
    options?: { cause?: unknown },
  ) {
    super(typeof message === 'string' ? message : wordWithNames(message), options);
    this.name = 'BandwrightError';
    this.code = code;
    this.location = location;
    this.wording = typeof message === 'string' ? undefined : message;
  }

  /**
   * The message worded with the caller's names for parameters.
   *
   * @param names - library parameter name to the caller's name (e.g. `{ overwrite: '--force' }`)
   * @returns the message; the plain message when it names no parameter
   */
  describe(names: ParameterNames = {}): string {
    return this.wording === undefined ? this.message : wordWithNames(this.wording, names);
  }
}

/** True when `value` is a {@link BandwrightError}, optionally with the given code. */
export function isBandwrightError(value: unknown, code?: ErrorCode): value is BandwrightError {
  return value instanceof BandwrightError && (code === undefined || value.code === code);
}

/**
 * Formats a location prefix: `file line 4: parameter` pieces that are known, joined as in our
 * messages (`standards.csv line 4: path_length_m`).
 *
 * @param location - where the problem is
 * @returns the prefix without a trailing colon, or an empty string when nothing is known
 */
export function formatLocation(location: ErrorLocation): string {
  const place = [location.file, location.line !== undefined ? `line ${location.line}` : undefined]
    .filter((part) => part !== undefined)
    .join(' ');
  if (location.parameter === undefined) return place;
  return place === '' ? location.parameter : `${place}: ${location.parameter}`;
}

function describe(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value);
  return String(value);
}

function fail(code: ErrorCode, location: ErrorLocation, value: unknown, rule: string): never {
  const prefix = formatLocation(location);
  const subject = location.parameter === undefined ? `value ${describe(value)}` : `= ${describe(value)}`;
  const head =
    prefix === ''
      ? subject
      : location.parameter === undefined
        ? `${prefix}: ${subject}`
        : `${prefix} ${subject}`;
  throw new BandwrightError(code, `${head}, ${rule}`, location);
}

/**
 * Throws `INVALID_VALUE` unless `value` is a finite number.
 *
 * @param value - the value to check
 * @param location - where it came from (used in the message)
 * @returns the value, narrowed to number
 * @throws BandwrightError `INVALID_VALUE`
 */
export function assertFinite(value: unknown, location: ErrorLocation): number {
  if (typeof value !== 'number' || !Number.isFinite(value))
    fail('INVALID_VALUE', location, value, 'must be a finite number');
  return value;
}

/**
 * Throws `INVALID_VALUE` unless `value` is a finite number greater than zero.
 *
 * @param value - the value to check
 * @param location - where it came from (used in the message)
 * @returns the value
 * @throws BandwrightError `INVALID_VALUE`
 */
export function assertPositive(value: unknown, location: ErrorLocation): number {
  const number = assertFinite(value, location);
  if (!(number > 0)) fail('INVALID_VALUE', location, value, 'must be > 0');
  return number;
}

/**
 * Throws `INVALID_VALUE` unless `value` is a finite number that is zero or more.
 *
 * @param value - the value to check
 * @param location - where it came from (used in the message)
 * @returns the value
 * @throws BandwrightError `INVALID_VALUE`
 */
export function assertNonNegative(value: unknown, location: ErrorLocation): number {
  const number = assertFinite(value, location);
  if (!(number >= 0)) fail('INVALID_VALUE', location, value, 'must be >= 0');
  return number;
}

/**
 * Throws `NOT_MONOTONIC` unless `values` is strictly increasing.
 *
 * @param values - abscissae, e.g. wavenumbers in cm⁻¹
 * @param location - where they came from; the message adds the index of the first offender
 * @throws BandwrightError `NOT_MONOTONIC`
 */
export function assertAscending(values: ArrayLike<number>, location: ErrorLocation): void {
  for (let i = 1; i < values.length; i++) {
    const previous = values[i - 1] as number;
    const current = values[i] as number;
    if (!(current > previous)) {
      const prefix = formatLocation(location);
      const rule =
        current === previous
          ? 'duplicate x value'
          : 'x values must be strictly increasing or strictly decreasing';
      throw new BandwrightError(
        'NOT_MONOTONIC',
        `${prefix === '' ? '' : `${prefix}: `}point ${i + 1}: x = ${current} after ${previous}, ${rule}`,
        location,
      );
    }
  }
}
