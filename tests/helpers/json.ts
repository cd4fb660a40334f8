/**
 * JSON in tests: parsing what the program wrote into the shape the test expects, and damaging a
 * parsed document on purpose (a missing field, a value of the wrong type) by naming the path.
 */
import { readFileSync } from 'node:fs';

/**
 * Parses JSON text whose shape the test knows (a document the program wrote). The type is the
 * test's claim, not a check: the assertions that follow read the fields and fail when they are not
 * there.
 *
 * @param text - JSON text
 * @throws SyntaxError when the text is not JSON
 */
export function parseJsonAs<T>(text: string): T {
  return JSON.parse(text) as T;
}

/**
 * Reads and parses a JSON file whose shape the test knows (see {@link parseJsonAs}).
 *
 * @param path - the file
 */
export function readJsonAs<T>(path: string): T {
  return parseJsonAs<T>(readFileSync(path, 'utf8'));
}

/**
 * Parses text of one JSON document per line (JSON Lines), ignoring a final newline.
 *
 * @param text - the lines
 */
export function parseJsonLinesAs<T>(text: string): T[] {
  return text
    .trimEnd()
    .split('\n')
    .map((line) => parseJsonAs<T>(line));
}

/** A place inside a JSON document: object keys and list positions, outermost first. */
export type JsonPath = readonly (string | number)[];

function pathText(path: JsonPath): string {
  return (
    path.map((step) => (typeof step === 'number' ? `[${step}]` : `.${step}`)).join('') || '(the document)'
  );
}

/** The object or list holding the last step of `path`, which must itself be there. */
function holderOf(document: unknown, path: JsonPath): { holder: Record<string, unknown>; key: string } {
  if (path.length === 0) throw new Error('a JSON edit needs a path of at least one step');
  let here: unknown = document;
  for (let i = 0; ; i++) {
    if (typeof here !== 'object' || here === null)
      throw new Error(`${pathText(path.slice(0, i))} is not an object or a list`);
    // Lists are objects whose keys are the positions, so one lookup serves both.
    const holder = here as Record<string, unknown>;
    const key = String(path[i]);
    if (!(key in holder)) throw new Error(`${pathText(path.slice(0, i + 1))} is not in the document`);
    if (i === path.length - 1) return { holder, key };
    here = holder[key];
  }
}

/**
 * The value at `path`; the test fails, naming the path, when it is not there.
 *
 * @param document - parsed JSON
 * @param path - where
 */
export function jsonAt(document: unknown, path: JsonPath): unknown {
  const { holder, key } = holderOf(document, path);
  return holder[key];
}

/**
 * Replaces the value at `path`, which must be there (so a renamed field cannot make the damage
 * miss silently).
 *
 * @param document - parsed JSON, changed in place
 * @param path - where
 * @param value - the new value, of any type
 */
export function setJsonAt(document: unknown, path: JsonPath, value: unknown): void {
  const { holder, key } = holderOf(document, path);
  holder[key] = value;
}

/**
 * Removes the field at `path`, which must be there.
 *
 * @param document - parsed JSON, changed in place
 * @param path - where
 */
export function deleteJsonAt(document: unknown, path: JsonPath): void {
  const { holder, key } = holderOf(document, path);
  delete holder[key];
}
