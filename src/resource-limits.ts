/**
 * Resource limits on input files, so a hostile or broken file is refused with a message instead
 * of exhausting memory: scan size and point count, size of tables and JSON files, rows of a table.
 *
 * Each limit has a default and can be changed with an environment variable. An environment
 * variable, rather than an option on each command, because the limits apply inside every reader
 * of every command (calibrate, quantify, inspect, recheck, status, report, watch …), and because
 * a laboratory that needs larger scans sets it once for its scheduler or shell instead of on
 * every command line. Method files keep a fixed limit (1 MiB, 32 levels of nesting): a method is
 * a small hand-written document, and nothing legitimate comes near it.
 */
import { BandwrightError } from './errors.js';

/** The limits in force. */
export interface ResourceLimits {
  /** Largest scan file, bytes. */
  maxScanBytes: number;
  /** Most data points in one scan. */
  maxPoints: number;
  /** Largest table, calibration or history file read whole, bytes. */
  maxTableBytes: number;
  /** Most data rows in one table (manifest, responses, limits, history). */
  maxTableRows: number;
}

/** The environment variable and default of each limit. */
export const RESOURCE_LIMIT_SETTINGS: Readonly<
  Record<keyof ResourceLimits, { variable: string; default: number; minimum: number; what: string }>
> = {
  maxScanBytes: {
    variable: 'BANDWRIGHT_MAX_SCAN_BYTES',
    default: 200_000_000,
    minimum: 1,
    what: 'largest scan file, bytes',
  },
  maxPoints: {
    variable: 'BANDWRIGHT_MAX_POINTS',
    default: 2_000_000,
    minimum: 2,
    what: 'most data points in one scan',
  },
  maxTableBytes: {
    variable: 'BANDWRIGHT_MAX_TABLE_BYTES',
    default: 64 * 1024 * 1024,
    minimum: 1,
    what: 'largest manifest, table, calibration or history file, bytes',
  },
  maxTableRows: {
    variable: 'BANDWRIGHT_MAX_TABLE_ROWS',
    default: 1_000_000,
    minimum: 1,
    what: 'most data rows in one table',
  },
};

/**
 * The limits in force: each from its environment variable when set, else its default.
 *
 * @param environment - variables to read (default `process.env`)
 * @returns the limits
 * @throws BandwrightError `USAGE` naming the variable when its value is not a whole number at or
 *   above the limit's minimum
 * @example
 * // BANDWRIGHT_MAX_POINTS=5000000 bandwright inspect big.jdx
 * resourceLimits().maxPoints; // 5000000
 */
export function resourceLimits(
  environment: Readonly<Record<string, string | undefined>> = process.env,
): ResourceLimits {
  const limits = {} as ResourceLimits;
  for (const [key, setting] of Object.entries(RESOURCE_LIMIT_SETTINGS) as [
    keyof ResourceLimits,
    (typeof RESOURCE_LIMIT_SETTINGS)[keyof ResourceLimits],
  ][]) {
    const text = environment[setting.variable];
    if (text === undefined || text.trim() === '') {
      limits[key] = setting.default;
      continue;
    }
    const value = /^\s*\d+(?:[eE]\+?\d+)?\s*$/.test(text) ? Number(text) : Number.NaN;
    if (!Number.isSafeInteger(value) || value < setting.minimum) {
      throw new BandwrightError(
        'USAGE',
        `${setting.variable} = ${JSON.stringify(text)}, must be a whole number >= ${setting.minimum} (${setting.what})`,
        { parameter: setting.variable },
      );
    }
    limits[key] = value;
  }
  return limits;
}

/** Help text listing the limits and their variables (for `bandwright --help`). */
export function resourceLimitsHelp(): string {
  const lines = Object.values(RESOURCE_LIMIT_SETTINGS).map(
    (s) => `  ${s.variable.padEnd(28)} ${s.what} (default ${s.default})`,
  );
  return ['Input limits (environment variables; a larger file is refused with a message):', ...lines].join(
    '\n',
  );
}
