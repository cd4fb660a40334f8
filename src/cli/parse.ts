/**
 * Parsing command-line option values into numbers and lists, with messages that name the option.
 */
import { BandwrightError } from '../errors.js';

/**
 * Parses a number option strictly.
 *
 * @param text - the option's text
 * @param option - the option's name, e.g. `--path-length`
 * @param rule - optional check with its words, e.g. `[n => n > 0, 'must be > 0']`
 * @throws BandwrightError `USAGE` naming the option, the value and the rule
 */
export function parseNumberOption(
  text: string,
  option: string,
  rule?: [(n: number) => boolean, string],
): number {
  const value = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/.test(text.trim())
    ? Number(text)
    : Number.NaN;
  if (!Number.isFinite(value))
    throw new BandwrightError('USAGE', `${option} = ${JSON.stringify(text)}, must be a number`, {
      parameter: option,
    });
  if (rule !== undefined && !rule[0](value))
    throw new BandwrightError('USAGE', `${option} = ${text}, ${rule[1]}`, { parameter: option });
  return value;
}

/** A positive number option. */
export function parsePositiveOption(text: string, option: string): number {
  return parseNumberOption(text, option, [(n) => n > 0, 'must be > 0']);
}

/**
 * Parses a window `low:high` in cm⁻¹.
 *
 * @param text - e.g. `2040:2245`
 * @param option - option name for messages
 * @throws BandwrightError `USAGE`
 */
export function parseWindowOption(text: string, option: string): [number, number] {
  const parts = text.split(':');
  if (parts.length !== 2)
    throw new BandwrightError(
      'USAGE',
      `${option} = ${JSON.stringify(text)}, must be low:high in cm⁻¹, e.g. 2040:2245`,
      { parameter: option },
    );
  const low = parseNumberOption(parts[0] as string, option);
  const high = parseNumberOption(parts[1] as string, option);
  if (!(low < high))
    throw new BandwrightError('USAGE', `${option} = ${text}, the low end must be below the high end`, {
      parameter: option,
    });
  return [low, high];
}

/**
 * Parses a comma-separated list of windows, e.g. `2000:2030,2255:2290`.
 *
 * @param text - the list
 * @param option - option name
 */
export function parseWindowListOption(text: string, option: string): [number, number][] {
  return text
    .split(',')
    .filter((part) => part.trim() !== '')
    .map((part) => parseWindowOption(part.trim(), option));
}

/** Commander collector for repeatable options. */
export function collect(value: string, previous: string[] = []): string[] {
  return [...previous, value];
}

/**
 * The time to stamp into calibrations and reports: now, or SOURCE_DATE_EPOCH (seconds since 1970,
 * the reproducible-builds convention) when set, so regenerated files are byte-for-byte the same.
 *
 * @returns ISO 8601 time
 * @throws BandwrightError `USAGE` when SOURCE_DATE_EPOCH is not whole seconds
 */
export function creationTime(): string {
  const epoch = process.env.SOURCE_DATE_EPOCH;
  if (epoch === undefined || epoch === '') return new Date().toISOString();
  const seconds = parseNumberOption(epoch, 'SOURCE_DATE_EPOCH', [
    (n) => Number.isInteger(n) && n >= 0,
    'must be whole seconds since 1970',
  ]);
  return new Date(seconds * 1000).toISOString();
}
