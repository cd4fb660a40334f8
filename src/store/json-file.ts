/**
 * JSON files with size and nesting limits, so a hostile or broken file cannot exhaust memory or
 * the stack, and with parse errors that name the line.
 */
import { BandwrightError } from '../errors.js';
import { readText } from './text-file.js';

/** Limits on JSON input. */
export interface JsonLimits {
  /** Largest file, bytes (default 64 MiB). */
  maxBytes?: number;
  /** Deepest nesting of objects and arrays (default 64). */
  maxDepth?: number;
}

/**
 * Parses JSON text after checking its nesting depth (without recursion).
 *
 * @param text - JSON text
 * @param source - file name for messages
 * @param limits - nesting limit
 * @throws BandwrightError `PARSE` naming the line and column of a syntax error; `LIMIT` for deep nesting;
 *   `INVALID_VALUE` naming the line of a number too large for a double (such as 1e400)
 */
export function parseJson(text: string, source: string, limits: JsonLimits = {}): unknown {
  const maxDepth = limits.maxDepth ?? 64;
  let depth = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === 0x5c) i++;
      else if (c === 0x22) inString = false;
      continue;
    }
    if (c === 0x22) inString = true;
    else if (c === 0x7b || c === 0x5b) {
      depth++;
      if (depth > maxDepth) {
        throw new BandwrightError(
          'LIMIT',
          `${source} line ${lineOf(text, i)}: nested deeper than ${maxDepth} levels`,
          { file: source, line: lineOf(text, i) },
        );
      }
    } else if (c === 0x7d || c === 0x5d) depth--;
  }
  let value: unknown;
  try {
    value = JSON.parse(text) as unknown;
  } catch (error) {
    const message = (error as Error).message;
    const position = /position (\d+)/.exec(message);
    const line = position === null ? undefined : lineOf(text, Number(position[1]));
    throw new BandwrightError(
      'PARSE',
      `${source}${line === undefined ? '' : ` line ${line}`}: not valid JSON (${message})`,
      { file: source, ...(line === undefined ? {} : { line }) },
    );
  }
  refuseOverflow(text, source);
  return value;
}

/**
 * JSON.parse reads a number beyond the double range (1e400) as Infinity without a word, and it
 * would then be shown as null; refuse it where it is written.
 */
function refuseOverflow(text: string, source: string): void {
  const literal = /-?\d+(?:\.\d+)?[eE][+-]?\d+/g;
  for (let match = literal.exec(text); match !== null; match = literal.exec(text)) {
    if (!Number.isFinite(Number(match[0])) && !insideString(text, match.index)) {
      const line = lineOf(text, match.index);
      throw new BandwrightError(
        'INVALID_VALUE',
        `${source} line ${line}: number ${match[0]} is too large for a double-precision number`,
        { file: source, line },
      );
    }
  }
}

/** Whether offset lies inside a JSON string (counting unescaped quotes before it). */
function insideString(text: string, offset: number): boolean {
  let inString = false;
  for (let i = 0; i < offset; i++) {
    const c = text.charCodeAt(i);
    if (inString && c === 0x5c) i++;
    else if (c === 0x22) inString = !inString;
  }
  return inString;
}

/**
 * Reads and parses a JSON file with limits.
 *
 * @param path - file path
 * @param limits - size and nesting limits
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ`, `LIMIT`, `PARSE`
 */
export function readJson(path: string, limits: JsonLimits = {}): unknown {
  return parseJson(
    readText(path, limits.maxBytes === undefined ? {} : { maxBytes: limits.maxBytes }),
    path,
    limits,
  );
}

function lineOf(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset && i < text.length; i++) if (text.charCodeAt(i) === 0x0a) line++;
  return line;
}
