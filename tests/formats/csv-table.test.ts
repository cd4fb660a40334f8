import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { formatCsv, guardCell, parseNumberCell, parseTable } from '../../src/formats/csv-table.js';

describe('parseTable', () => {
  it('gives each row its line number, skipping comments and blank lines', () => {
    const table = parseTable('# standards\nscan,CO_ppm\n\na.csv,10\n"b,1.csv",20\n', 'm.csv');
    expect(table.columns).toEqual(['scan', 'CO_ppm']);
    expect(table.rows.map((r) => [r.line, r.cells.get('scan'), r.cells.get('co_ppm')])).toEqual([
      [4, 'a.csv', '10'],
      [5, 'b,1.csv', '20'],
    ]);
  });

  it('reads semicolon tables with decimal commas', () => {
    const table = parseTable('scan;CO_ppm\na.csv;10,5\n', 'm.csv');
    expect(table.delimiter).toBe(';');
    expect(table.decimalComma).toBe(true);
    expect(
      parseNumberCell(
        table.rows[0]!.cells.get('co_ppm')!,
        { file: 'm.csv', line: 2, column: 'CO_ppm' },
        { decimalComma: true },
      ),
    ).toBe(10.5);
  });

  it('refuses duplicate columns and ragged rows with the line', () => {
    expect(() => parseTable('scan,scan\na,b\n', 'm.csv')).toThrow(
      /m.csv line 1: column "scan" appears twice/,
    );
    expect(() => parseTable('scan,CO_ppm\na\n', 'm.csv')).toThrow(/m.csv line 2: 1 cells, the header has 2/);
    expect(() => parseTable('\n\n', 'm.csv')).toThrow(/empty/);
  });
});

describe('parseNumberCell', () => {
  it.each(['NaN', 'abc', '1e400', '', '1,000', 'Infinity', '0x10'])('refuses %j naming the cell', (text) => {
    expect(() => parseNumberCell(text, { file: 'm.csv', line: 3, column: 'CO_ppm' })).toThrow(
      /m.csv line 3: CO_ppm = /,
    );
  });
  it('accepts plain and exponent forms', () => {
    expect(parseNumberCell('-1.5e-3', { file: 'f', line: 1, column: 'c' })).toBe(-0.0015);
  });
});

describe('formatCsv', () => {
  it('guards formula-like text cells but not numbers (OWASP CSV injection guidance; common practice)', () => {
    expect(guardCell('=HYPERLINK("http://x","y")')).toBe('\'=HYPERLINK("http://x","y")');
    expect(guardCell('+cmd')).toBe("'+cmd");
    expect(guardCell('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(guardCell('-1.5')).toBe('-1.5');
    expect(guardCell('plain.csv')).toBe('plain.csv');
  });

  it('writes RFC 4180 quoting that papaparse reads back to the same cells (papaparse as the reference reader)', () => {
    const rows = [
      ['a,b', 'say "hi"', 1.25],
      ['line\nbreak', '', -3],
    ];
    const text = formatCsv(['x', 'y', 'z'], rows);
    const parsed = Papa.parse<string[]>(text.trimEnd(), { header: false }).data;
    expect(parsed).toEqual([
      ['x', 'y', 'z'],
      ['a,b', 'say "hi"', '1.25'],
      ['line\nbreak', '', '-3'],
    ]);
  });
});
