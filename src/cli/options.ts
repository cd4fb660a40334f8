/**
 * The options several commands share, defined and parsed in one place: cell conditions, y-kind,
 * interval level, times, the wavenumber axis of plots, worker threads, milliseconds, recheck
 * policy overrides, and the reporting options of the quantifying commands (quantify, watch).
 */
import type { Command } from 'commander';
import type { QuantifyOptions } from '../calibration/quantify.js';
import { BandwrightError } from '../errors.js';
import type { PartialConditions } from '../gas/conditions.js';
import { correctToReferenceOxygen, parseConcentrationUnit } from '../gas/units.js';
import type { WavenumberAxis } from '../report/svg/spectra.js';
import { Y_KINDS, type YKind } from '../spectrum/spectrum.js';
import { readLimits } from '../store/tables.js';
import { parseNumberOption, parsePositiveOption } from './parse.js';

/**
 * Conditions given on the command line (path length m, temperature K, pressure kPa).
 *
 * @param options - parsed options with `pathLength`, `temperature`, `pressure`
 * @throws BandwrightError `USAGE` for a value that is not a positive number
 */
export function conditionOptions(options: {
  pathLength?: string;
  temperature?: string;
  pressure?: string;
}): PartialConditions {
  const conditions: PartialConditions = {};
  if (options.pathLength !== undefined)
    conditions.pathLength_m = parsePositiveOption(options.pathLength, '--path-length');
  if (options.temperature !== undefined)
    conditions.temperature_K = parsePositiveOption(options.temperature, '--temperature');
  if (options.pressure !== undefined)
    conditions.pressure_kPa = parsePositiveOption(options.pressure, '--pressure');
  return conditions;
}

/**
 * Parses `--y-kind`.
 *
 * @param text - option value
 * @throws BandwrightError `USAGE` for a value that is not a y-kind
 */
export function yKindOption(text: string | undefined): YKind | undefined {
  if (text === undefined) return undefined;
  if (!(Y_KINDS as readonly string[]).includes(text))
    throw new BandwrightError(
      'USAGE',
      `--y-kind = ${JSON.stringify(text)}, must be one of ${Y_KINDS.join(', ')}`,
      { parameter: '--y-kind' },
    );
  return text as YKind;
}

/**
 * Parses `--level`, the level of prediction intervals or bands.
 *
 * @param text - option value, e.g. `0.95`
 * @throws BandwrightError `USAGE` outside (0, 1)
 */
export function levelOption(text: string): number {
  return parseNumberOption(text, '--level', [(n) => n > 0 && n < 1, 'must be between 0 and 1, e.g. 0.95']);
}

const ISO_TIME = /^\d{4}-\d{2}-\d{2}(?:T\d{2}:\d{2}(?::\d{2}(?:\.\d{1,9})?)?(Z|[+-]\d{2}:\d{2}))?$/;

/**
 * Parses an ISO 8601 time option: a date (`2026-09-01`, taken as 00:00 UTC) or a date and time with
 * its zone (`2026-09-01T09:30Z`, `2026-09-01T11:30+02:00`). A time without a zone is refused, so a
 * record never depends on the computer's time zone.
 *
 * @param text - the option's text
 * @param option - option name for messages
 * @returns the time as ISO 8601 UTC (`toISOString`)
 * @throws BandwrightError `USAGE`
 */
export function parseTimeOption(text: string, option: string): string {
  const trimmed = text.trim();
  if (/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:\.\d+)?)?$/.test(trimmed)) {
    throw new BandwrightError(
      'USAGE',
      `${option} = ${JSON.stringify(text)} has no time zone; add Z (UTC) or an offset such as +02:00`,
      { parameter: option },
    );
  }
  const ms = ISO_TIME.test(trimmed)
    ? Date.parse(trimmed.length === 10 ? `${trimmed}T00:00:00Z` : trimmed)
    : Number.NaN;
  if (!Number.isFinite(ms)) {
    throw new BandwrightError(
      'USAGE',
      `${option} = ${JSON.stringify(text)}, must be an ISO 8601 date or time such as 2026-09-01 ` +
        'or 2026-09-01T09:30:00Z',
      { parameter: option },
    );
  }
  const iso = new Date(ms).toISOString();
  // Date.parse rolls 2026-02-30 over to March: refuse dates that do not exist.
  if (iso.slice(0, 10) !== trimmed.slice(0, 10) && !/[+-]\d{2}:\d{2}$/.test(trimmed)) {
    throw new BandwrightError('USAGE', `${option} = ${JSON.stringify(text)} is not a calendar date`, {
      parameter: option,
    });
  }
  return iso;
}

/**
 * Parses `--every-days` and `--tolerance-pct`, the recheck policy overrides of `recheck` and
 * `status`.
 *
 * @param flags - the options' texts
 * @returns the values given
 * @throws BandwrightError `USAGE` for an interval that is not positive or a tolerance outside (0, 100)
 */
export function recheckPolicyOptions(flags: { everyDays?: string; tolerancePct?: string }): {
  everyDays?: number;
  tolerancePct?: number;
} {
  const policy: { everyDays?: number; tolerancePct?: number } = {};
  if (flags.everyDays !== undefined) policy.everyDays = parsePositiveOption(flags.everyDays, '--every-days');
  if (flags.tolerancePct !== undefined)
    policy.tolerancePct = parseNumberOption(flags.tolerancePct, '--tolerance-pct', [
      (n) => n > 0 && n < 100,
      'must be a percentage > 0 and < 100',
    ]);
  return policy;
}

/** Values of `--wavenumber-axis`. */
export const WAVENUMBER_AXIS_CHOICES: readonly WavenumberAxis[] = ['descending', 'ascending'];

/**
 * Parses `--wavenumber-axis`.
 *
 * @param text - option value (`descending`: high wavenumbers on the left; `ascending`)
 * @throws BandwrightError `USAGE` for another value
 */
export function wavenumberAxisOption(text: string | undefined): WavenumberAxis {
  if (text === undefined) return 'descending';
  if (!(WAVENUMBER_AXIS_CHOICES as readonly string[]).includes(text)) {
    throw new BandwrightError(
      'USAGE',
      `--wavenumber-axis = ${JSON.stringify(text)}, must be descending (high wavenumbers on the left) ` +
        'or ascending',
      { parameter: '--wavenumber-axis' },
    );
  }
  return text as WavenumberAxis;
}

/**
 * Parses `--workers`: `auto` or a whole number ≥ 0.
 *
 * @param text - the option's text
 * @throws BandwrightError `USAGE` naming the value
 */
export function workersOption(text: string): 'auto' | number {
  if (text === 'auto') return 'auto';
  if (!/^\d+$/.test(text.trim()) || Number(text) > 64)
    throw new BandwrightError(
      'USAGE',
      `--workers = ${JSON.stringify(text)}, must be auto or a whole number from 0 to 64`,
      { parameter: '--workers' },
    );
  return Number(text);
}

/**
 * Parses a whole number of milliseconds.
 *
 * @param text - the option's text
 * @param option - option name for messages
 * @param minimum - least value accepted, ms
 * @throws BandwrightError `USAGE`
 */
export function millisecondsOption(text: string, option: string, minimum: number): number {
  return parseNumberOption(text, option, [
    (n) => Number.isInteger(n) && n >= minimum,
    `must be a whole number of milliseconds >= ${minimum}`,
  ]);
}

/** The flags {@link withReportingOptions} adds, as commander parses them. */
export interface ReportingFlags {
  level: string;
  pathLength?: string;
  temperature?: string;
  pressure?: string;
  mgM3?: boolean;
  refTemperature: string;
  refPressure: string;
  dry?: boolean;
  h2o?: string;
  o2?: string;
  o2Ref?: string;
  o2Air: string;
  limits?: string;
  unit?: string;
  yKind?: string;
}

/**
 * Adds the options every quantifying command shares (quantify, watch): interval level, default
 * conditions, reporting unit and conversions, exposure limits, y-kind.
 *
 * @param command - the command to extend
 * @returns the same command
 */
export function withReportingOptions(command: Command): Command {
  return command
    .option('--level <p>', 'prediction-interval level', '0.95')
    .option('--path-length <m>', 'path length for scans that do not state it, m')
    .option('--temperature <K>', 'gas temperature for scans that do not state it, K')
    .option('--pressure <kPa>', 'gas pressure for scans that do not state it, kPa')
    .option('--unit <unit>', "report in ppm, ppb or pct (default: the calibration's unit)")
    .option('--mg-m3', 'also report mg/m³ at the reference temperature and pressure')
    .option('--ref-temperature <K>', 'reference temperature for --mg-m3, K', '273.15')
    .option('--ref-pressure <kPa>', 'reference pressure for --mg-m3, kPa', '101.325')
    .option('--dry', 'also report on a dry basis (H2O from the same scan, or --h2o)')
    .option('--h2o <pct>', 'water vapour in the sample, % by volume, for --dry')
    .option('--o2 <pct>', 'measured O2, %, for the oxygen reference correction')
    .option('--o2-ref <pct>', 'reference O2, %, to correct to')
    .option('--o2-air <pct>', 'O2 of air, %, in the correction', '20.9')
    .option('--limits <file>', 'CSV of exposure limits (gas,limit,unit,basis,source) for the over-limit flag')
    .option('--y-kind <kind>', 'y values of scans that do not declare them');
}

/**
 * Turns the reporting flags into core options.
 *
 * @param flags - parsed flags
 * @returns options for the quantify functions
 * @throws BandwrightError `USAGE` for bad values or incomplete combinations; the errors of
 *   reading a limits file
 */
export function quantifyOptionsFrom(flags: ReportingFlags): QuantifyOptions {
  const percent = (text: string, option: string): number =>
    parseNumberOption(text, option, [(n) => n >= 0 && n <= 100, 'must be a percentage from 0 to 100']);
  const options: QuantifyOptions = {
    level: levelOption(flags.level),
    defaultConditions: conditionOptions(flags),
  };
  if (flags.mgM3)
    options.massConcentration = {
      temperature_K: parsePositiveOption(flags.refTemperature, '--ref-temperature'),
      pressure_kPa: parsePositiveOption(flags.refPressure, '--ref-pressure'),
    };
  if (flags.h2o !== undefined && !flags.dry)
    throw new BandwrightError('USAGE', '--h2o gives the water vapour for --dry; add --dry', {
      parameter: '--h2o',
    });
  if (flags.dry)
    options.dryBasis = flags.h2o === undefined ? {} : { waterFraction: percent(flags.h2o, '--h2o') / 100 };
  if ((flags.o2 === undefined) !== (flags.o2Ref === undefined))
    throw new BandwrightError(
      'USAGE',
      'the O2 correction needs both --o2 <measured %> and --o2-ref <reference %>',
      { parameter: flags.o2 === undefined ? '--o2' : '--o2-ref' },
    );
  if (flags.o2 !== undefined && flags.o2Ref !== undefined) {
    options.oxygen = {
      measured_pct: percent(flags.o2, '--o2'),
      reference_pct: percent(flags.o2Ref, '--o2-ref'),
      air_pct: percent(flags.o2Air, '--o2-air'),
    };
    // The O2 values do not depend on the scan: refuse an impossible correction before reading any.
    correctToReferenceOxygen(1, options.oxygen);
  }
  if (flags.limits !== undefined) options.limits = readLimits(flags.limits);
  if (flags.unit !== undefined) options.unit = parseConcentrationUnit(flags.unit, '--unit');
  return options;
}
