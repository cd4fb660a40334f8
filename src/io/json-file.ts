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
 * @throws BandwrightError `PARSE` naming the line and column of a syntax error; `LIMIT` for deep nesting
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
        throw new BandwrightError('LIMIT', `${source} line ${lineOf(text, i)}: nested deeper than ${maxDepth} levels`, { file: source, line: lineOf(text, i) });
      }
    } else if (c === 0x7d || c === 0x5d) depth--;
  }
  try {
    return JSON.parse(text) as unknown;
  } catch (error) {
    const message = (error as Error).message;
    const position = /position (\d+)/.exec(message);
    const line = position === null ? undefined : lineOf(text, Number(position[1]));
    throw new BandwrightError('PARSE', `${source}${line === undefined ? '' : ` line ${line}`}: not valid JSON (${message})`, { file: source, ...(line === undefined ? {} : { line }) });
  }
}

/**
 * Reads and parses a JSON file with limits.
 *
 * @param path - file path
 * @param limits - size and nesting limits
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ`, `LIMIT`, `PARSE`
 */
export function readJson(path: string, limits: JsonLimits = {}): unknown {
  return parseJson(readText(path, limits.maxBytes === undefined ? {} : { maxBytes: limits.maxBytes }), path, limits);
}

function lineOf(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset && i < text.length; i++) if (text.charCodeAt(i) === 0x0a) line++;
  return line;
}
