/**
 * The csv-spectrum suite (npm package csv-spectrum 2.0.0, BSD-2-Clause: CSV edge cases with the
 * JSON each should parse to) run through our table reader, `parseTable`, which reads manifests,
 * response tables and limit files. Every shipped case is compared cell by cell with its JSON.
 *
 * Our reader trims cells and skips blank lines by design; none of the shipped expectations has
 * leading or trailing blanks, so the comparison is exact. One case, location_coordinates, ships a
 * JSON that disagrees with its own CSV (the CSV's phone number is 2095257564, the JSON's
 * 1234567890, and the JSON is an object rather than a list); it is compared on its other fields
 * and its phone number is checked against the CSV's bytes.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { basename, dirname, join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseTable } from '../../src/formats/csv-table.js';
import { decodeText } from '../../src/store/text-file.js';

const root = dirname(createRequire(import.meta.url).resolve('csv-spectrum/package.json'));
const cases = readdirSync(join(root, 'csvs'))
  .filter((name) => name.endsWith('.csv'))
  .map((name) => basename(name, '.csv'))
  .sort();

/** The case read as a user's file would be: bytes → UTF-8 text → table; rows as objects keyed by header. */
function readCase(name: string): Record<string, string>[] {
  const path = join(root, 'csvs', `${name}.csv`);
  const table = parseTable(decodeText(readFileSync(path), path), `${name}.csv`);
  return table.rows.map((row) =>
    Object.fromEntries(table.columns.map((column) => [column, row.cells.get(column.toLowerCase()) ?? ''])),
  );
}

function expected(name: string): Record<string, string>[] {
  const parsed = JSON.parse(readFileSync(join(root, 'json', `${name}.json`), 'utf8')) as
    Record<string, string> | Record<string, string>[];
  return Array.isArray(parsed) ? parsed : [parsed];
}

let passed = 0;

describe(`csv-spectrum 2.0.0 through parseTable (${cases.length} cases)`, () => {
  it('ships the twelve cases this test was written against', () => {
    expect(cases).toEqual([
      'comma_in_quotes',
      'empty',
      'empty_crlf',
      'escaped_quotes',
      'json',
      'location_coordinates',
      'newlines',
      'newlines_crlf',
      'quotes_and_newlines',
      'simple',
      'simple_crlf',
      'utf8',
    ]);
  });

  it.each(cases.filter((name) => name !== 'location_coordinates'))(
    '%s: same rows and cells as its JSON',
    (name) => {
      expect(readCase(name)).toEqual(expected(name));
      passed++;
    },
  );

  it("location_coordinates: same cells as its JSON except the phone number, which is the CSV's own", () => {
    const [row] = readCase('location_coordinates');
    const { 'Contact Phone Number': phone, ...rest } = expected('location_coordinates')[0] as Record<
      string,
      string
    >;
    expect(phone).toBe('1234567890');
    expect(row?.['Contact Phone Number']).toBe('2095257564');
    const ourRest: Record<string, string> = { ...(row as Record<string, string>) };
    delete ourRest['Contact Phone Number'];
    expect(ourRest).toEqual(rest);
    passed++;
  });

  it.each(['newlines', 'newlines_crlf', 'quotes_and_newlines'])(
    '%s: each row keeps the line it starts on, after cells that span lines',
    (name) => {
      const path = join(root, 'csvs', `${name}.csv`);
      const table = parseTable(decodeText(readFileSync(path), path), `${name}.csv`);
      // Line numbers read off the shipped files: a quoted cell spanning two (three) lines pushes the next row down.
      expect(table.rows.map((row) => row.line)).toEqual(name === 'quotes_and_newlines' ? [2, 5] : [2, 3, 5]);
    },
  );

  it('counts the cases that passed', () => {
    console.log(`csv-spectrum: ${passed} of ${cases.length} cases passed through parseTable`);
    expect(passed).toBe(cases.length);
  });
});
