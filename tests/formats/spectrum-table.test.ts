import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { isBandwrightError } from '../../src/errors.js';
import { DECIMAL_COMMA, DECIMAL_POINT, parseNumberText, scanNumber } from '../../src/formats/number-parse.js';
import { formatSpectrumCsv } from '../../src/formats/spectrum-csv-write.js';
import { parseSpectrumTable, type SpectrumTableOptions } from '../../src/formats/spectrum-table/read.js';
import { makeSpectrum, type Spectrum, type YKind } from '../../src/spectrum/spectrum.js';
import { expectError, expectSameDoubles } from '../helpers/expect.js';

const SEED = 20240517;
const fixture = (name: string): Uint8Array =>
  readFileSync(new URL(`../fixtures/spectra/${name}`, import.meta.url));
const bytesOf = (text: string): Uint8Array => new TextEncoder().encode(text);
const parse = (text: string, options: Partial<SpectrumTableOptions> = {}): Spectrum =>
  parseSpectrumTable(bytesOf(text), { source: 't.csv', ...options });

/**
 * Independent reading of a table: papaparse (a general-purpose CSV library) splits the text,
 * `Number()` converts each cell (ECMAScript's correctly rounded decimal conversion).
 */
function papaColumns(
  text: string,
  options: { delimiter: string; decimalComma?: boolean; header: boolean },
): number[][] {
  const result = Papa.parse<string[]>(text.replace(/^\ufeff/, ''), {
    delimiter: options.delimiter,
    comments: '#',
    skipEmptyLines: true,
  });
  expect(result.errors, JSON.stringify(result.errors)).toEqual([]);
  const rows = options.header ? result.data.slice(1) : result.data;
  const columns: number[][] = rows[0]?.map(() => []) ?? [];
  for (const row of rows) {
    row.forEach((cell, k) =>
      columns[k]?.push(Number(options.decimalComma ? cell.trim().replace(',', '.') : cell.trim())),
    );
  }
  return columns;
}

describe('number parsing from bytes', () => {
  // ECMAScript Number() is correctly rounded (ECMA-262 §7.1.4.1.1); it is the reference here.
  it('reads plain, signed, exponent and decimal-comma literals exactly as Number() does', () => {
    for (const text of [
      '0',
      '-0',
      '+1',
      '1.',
      '.5',
      '-.5',
      '2143.2561',
      '1e-3',
      '1E+21',
      '-4.9e-324',
      '5e-324',
      '1.7976931348623157e308',
      '123456789012345678901234567890',
      '0.30000000000000004',
    ]) {
      expect(Object.is(parseNumberText(text), Number(text)), text).toBe(true);
    }
    expect(parseNumberText('1,25', DECIMAL_COMMA)).toBe(1.25);
    expect(parseNumberText('1e400')).toBe(Infinity);
  });

  it('refuses what is not exactly one number', () => {
    for (const text of ['', ' ', '-', '.', 'e5', '1e', '1..2', '1,5', 'NaN', 'Infinity', '0x10', '1 2']) {
      expect(Number.isNaN(parseNumberText(text)), JSON.stringify(text)).toBe(true);
    }
  });

  it('stops at the first byte after the number and does not consume a bare exponent marker', () => {
    const cursor = { end: 0 };
    const bytes = bytesOf('12.5e;3');
    expect(scanNumber(bytes, 0, bytes.length, DECIMAL_POINT, cursor)).toBe(12.5);
    expect(cursor.end).toBe(4);
  });

  it('is correctly rounded for arbitrary doubles written by String() and toExponential() (property, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.double({ noNaN: true, noDefaultInfinity: true }),
        fc.integer({ min: 0, max: 20 }),
        (value, digits) => {
          for (const text of [
            String(value),
            value.toExponential(),
            value.toExponential(digits),
            value.toPrecision(digits + 1),
          ]) {
            if (!Object.is(parseNumberText(text), Number(text))) return false;
          }
          // String(-0) is "0": the sign of zero is not in the text, so −0 cannot come back from it.
          return Object.is(value, -0) || Object.is(parseNumberText(String(value)), value);
        },
      ),
      { seed: SEED, numRuns: 5000 },
    );
  });
});

describe('spectrum tables: fixtures against papaparse', () => {
  // Each fixture is read by papaparse + Number() independently; values must agree exactly.
  const cases: { file: string; delimiter: string; decimalComma?: boolean; yKind: YKind; header: boolean }[] =
    [
      { file: 'absorbance-header.csv', delimiter: ',', yKind: 'absorbance', header: true },
      {
        file: 'semicolon-decimal-comma.csv',
        delimiter: ';',
        decimalComma: true,
        yKind: 'absorbance',
        header: true,
      },
      { file: 'transmittance-percent.tsv', delimiter: '\t', yKind: 'transmittance-percent', header: true },
      { file: 'single-beam.csv', delimiter: ',', yKind: 'single-beam', header: true },
    ];
  for (const entry of cases) {
    it(`${entry.file}: ${entry.yKind}, same numbers as papaparse`, () => {
      const bytes = fixture(entry.file);
      const spectrum = parseSpectrumTable(bytes, { source: entry.file });
      const columns = papaColumns(new TextDecoder().decode(bytes), entry);
      expect(spectrum.yKind).toBe(entry.yKind);
      expect(spectrum.metadata).toMatchObject({ source: entry.file, format: 'csv' });
      expectSameDoubles(spectrum.x, columns[0] as number[], 'x');
      expectSameDoubles(spectrum.y, columns[1] as number[], 'y');
      if (entry.yKind === 'single-beam')
        expectSameDoubles(spectrum.background as Float64Array, columns[2] as number[], 'background');
    });
  }

  it('reads the # key = value conditions of absorbance-header.csv into metadata', () => {
    const spectrum = parseSpectrumTable(fixture('absorbance-header.csv'), { source: 'a.csv' });
    expect(spectrum.metadata).toEqual({
      source: 'a.csv',
      format: 'csv',
      pathLength_m: 0.1,
      temperature_K: 296.15,
      pressure_kPa: 101.325,
    });
  });

  it('descending.csv is reversed to ascending and equals the ascending file', () => {
    const ascending = parseSpectrumTable(fixture('absorbance-header.csv'), { source: 'a' });
    const descending = parseSpectrumTable(fixture('descending.csv'), { source: 'd' });
    expectSameDoubles(descending.x, ascending.x, 'x');
    expectSameDoubles(descending.y, ascending.y, 'y');
  });

  it('micrometres.csv: ν = 10⁴/λ (cm⁻¹ from µm); λ descending gives ν ascending, kept in order', () => {
    const bytes = fixture('micrometres.csv');
    const spectrum = parseSpectrumTable(bytes, { source: 'um.csv' });
    const [lambda, y] = papaColumns(new TextDecoder().decode(bytes), { delimiter: ',', header: true }) as [
      number[],
      number[],
    ];
    expectSameDoubles(
      spectrum.x,
      lambda.map((l) => 1e4 / l),
      'x',
    );
    expectSameDoubles(spectrum.y, y, 'y');
    // λ was rounded to 6 decimals of 10⁴/x, so ν is within 1e-3 cm⁻¹ of the grid 2100 + 0.5 i.
    spectrum.x.forEach((nu, i) => expect(Math.abs(nu - (2100 + 0.5 * i))).toBeLessThan(1e-3));
  });

  it('a table without header needs the y-kind: refused without it, read with yKind or an explicit defaultYKind', () => {
    const bytes = fixture('absorbance-no-header.csv');
    expectError(
      () => parseSpectrumTable(bytes, { source: 'n.csv' }),
      'PARSE',
      'n.csv',
      'no header line',
      'absorbance (or A)',
      'give the y-kind',
    );
    expect(parseSpectrumTable(bytes, { source: 'n.csv', yKind: 'absorbance' }).yKind).toBe('absorbance');
    expect(parseSpectrumTable(bytes, { source: 'n.csv', defaultYKind: 'transmittance' }).yKind).toBe(
      'transmittance',
    );
  });
});

describe('spectrum tables: generated files of several shapes against papaparse (property, fixed seed)', () => {
  const finite = fc.double({ noNaN: true, noDefaultInfinity: true });
  const shape = fc.record({
    delimiter: fc.constantFrom(',', ';', '\t'),
    decimalComma: fc.boolean(),
    header: fc.boolean(),
    crlf: fc.boolean(),
    bom: fc.boolean(),
    descending: fc.boolean(),
    singleBeam: fc.boolean(),
    trailingBlank: fc.boolean(),
    comments: fc.boolean(),
    format: fc.constantFrom('string', 'exponential', 'fixed'),
  });
  it('reads every shape exactly as papaparse + Number() does', () => {
    fc.assert(
      fc.property(
        shape,
        fc.uniqueArray(finite, { minLength: 2, maxLength: 40, comparator: (a, b) => a === b }),
        fc.array(finite, { minLength: 40, maxLength: 80 }),
        (s, xsRaw, ysRaw) => {
          const decimalComma = s.decimalComma && s.delimiter !== ',';
          const format = (v: number): string => {
            const text =
              s.format === 'string'
                ? String(v)
                : s.format === 'exponential'
                  ? v.toExponential()
                  : Math.abs(v) < 1e15
                    ? v.toFixed(6)
                    : String(v);
            return decimalComma ? text.replace('.', ',') : text;
          };
          let xs = [...xsRaw].sort((a, b) => a - b);
          if (s.format === 'fixed')
            xs = [...new Set(xs.map((v) => Number(format(v).replace(',', '.'))))].sort((a, b) => a - b);
          if (xs.length < 2) return true;
          const rows = xs.map((x, i) => {
            const cells = [format(x), format(ysRaw[i] ?? 0)];
            if (s.singleBeam) cells.push(format(ysRaw[i + 40] ?? 1));
            return cells.join(s.delimiter);
          });
          if (s.descending) rows.reverse();
          const eol = s.crlf ? '\r\n' : '\n';
          const lines = [
            ...(s.comments ? ['# generated', '# note = free text'] : []),
            ...(s.header
              ? [
                  s.singleBeam
                    ? ['nu', 'sample', 'background'].join(s.delimiter)
                    : `wavenumber${s.delimiter}A`,
                ]
              : []),
            ...rows,
          ];
          const text = `${s.bom ? '\ufeff' : ''}${lines.join(eol)}${eol}${s.trailingBlank ? eol : ''}`;
          const spectrum = parseSpectrumTable(bytesOf(text), {
            source: 'g.csv',
            yKind: s.singleBeam ? 'single-beam' : 'absorbance',
          });
          const columns = papaColumns(text, { delimiter: s.delimiter, decimalComma, header: s.header });
          const order = (values: number[]): number[] => (s.descending ? values.slice().reverse() : values);
          expectSameDoubles(spectrum.x, order(columns[0] as number[]), 'x');
          expectSameDoubles(spectrum.y, order(columns[1] as number[]), 'y');
          if (s.singleBeam)
            expectSameDoubles(
              spectrum.background as Float64Array,
              order(columns[2] as number[]),
              'background',
            );
          return true;
        },
      ),
      { seed: SEED, numRuns: 1000 },
    );
  });

  it('quoted fields: papaparse agrees, and a quoted decimal comma with a comma delimiter is read', () => {
    const text = 'wavenumber,absorbance\n"2000.5","0.25"\n"2001.5","-1e-3"\n';
    const columns = papaColumns(text, { delimiter: ',', header: true });
    const spectrum = parse(text);
    expectSameDoubles(spectrum.x, columns[0] as number[], 'x');
    expectSameDoubles(spectrum.y, columns[1] as number[], 'y');
    const comma = parse('wavenumber,absorbance\n"2000,5","0,25"\n"2001,5","0,5"\n');
    expectSameDoubles(comma.x, [2000.5, 2001.5], 'x');
    expectSameDoubles(comma.y, [0.25, 0.5], 'y');
  });
});

describe('spectrum tables: y-kind and x unit from the header', () => {
  const kinds: [string, YKind][] = [
    ['absorbance', 'absorbance'],
    ['A', 'absorbance'],
    ['absorbance_natural', 'absorbance-natural'],
    ['ln', 'absorbance-natural'],
    ['transmittance', 'transmittance'],
    ['T', 'transmittance'],
    ['transmittance_pct', 'transmittance-percent'],
    ['%T', 'transmittance-percent'],
  ];
  for (const [name, kind] of kinds) {
    it(`header "${name}" → ${kind}`, () => {
      expect(parse(`wavenumber_cm-1,${name}\n2000,0.5\n2001,0.6\n`).yKind).toBe(kind);
    });
  }

  it('a sample/background pair in either order is single-beam with a background', () => {
    const a = parse('x,sample,background\n2000,1,2\n2001,3,4\n');
    expect(a.yKind).toBe('single-beam');
    expectSameDoubles(a.y, [1, 3], 'sample');
    expectSameDoubles(a.background as Float64Array, [2, 4], 'background');
    const b = parse('x,single_beam_background,single_beam_sample\n2000,2,1\n2001,4,3\n');
    expectSameDoubles(b.y, [1, 3], 'sample');
    expectSameDoubles(b.background as Float64Array, [2, 4], 'background');
  });

  it('the header wins over defaultYKind; a header that contradicts yKind is an error', () => {
    expect(parse('x,%T\n1,50\n2,60\n', { defaultYKind: 'absorbance' }).yKind).toBe('transmittance-percent');
    expectError(
      () => parse('x,%T\n1,50\n2,60\n', { yKind: 'absorbance' }),
      'PARSE',
      't.csv line 1',
      'transmittance-percent',
      'absorbance',
      'agree',
    );
  });

  it('an unrecognised y name takes the option, or is refused naming the accepted names', () => {
    expect(parse('x,intensity\n1,5\n2,6\n', { yKind: 'absorbance' }).yKind).toBe('absorbance');
    expectError(
      () => parse('x,intensity\n1,5\n2,6\n'),
      'PARSE',
      '"intensity" does not name a y-kind',
      'transmittance_pct',
    );
  });

  it('micrometres and nanometres by name; a wavelength without a unit is refused', () => {
    // ν/cm⁻¹ = 10⁴/(λ/µm) = 10⁷/(λ/nm): definition of the wavenumber.
    expectSameDoubles(parse('micrometers,A\n4,0.1\n5,0.2\n').x, [1e4 / 5, 1e4 / 4], 'x');
    expectSameDoubles(parse('wavelength (µm),A\n4,0.1\n5,0.2\n').x, [1e4 / 5, 1e4 / 4], 'x');
    expectSameDoubles(parse('wavelength_nm,A\n4000,0.1\n5000,0.2\n').x, [1e7 / 5000, 1e7 / 4000], 'x');
    expectError(() => parse('wavelength,A\n4,0.1\n5,0.2\n'), 'PARSE', 'wavelength without a unit');
    expectError(() => parse('wavelength_um,A\n0,0.1\n5,0.2\n'), 'INVALID_VALUE', 'must be > 0');
  });

  it('transmittance as a fraction above 1.5 is refused as mislabelled percent', () => {
    expectError(() => parse('x,T\n1,0.5\n2,87.5\n'), 'INVALID_VALUE', 'reaches 87.5', 'transmittance_pct');
    expect(parse('x,T\n1,0.5\n2,1.02\n').yKind).toBe('transmittance');
  });
});

describe('spectrum tables: every malformed line names the line, the value and the rule', () => {
  const table: [string, string, string, string[]][] = [
    [
      'non-numeric cell',
      'x,A\n1,2\n2,abc\n',
      'PARSE',
      ['t.csv line 3', 'column 2 (A) = "abc"', 'not a number'],
    ],
    ['empty cell', 'x,A\n1,2\n2,\n', 'PARSE', ['t.csv line 3', 'column 2 (A) is empty']],
    ['NaN', 'x,A\n1,2\n2,NaN\n', 'INVALID_VALUE', ['t.csv line 3', '"NaN"', 'must be a finite number']],
    ['Infinity', 'x,A\n1,2\n-Infinity,2\n', 'INVALID_VALUE', ['t.csv line 3', '"-Infinity"', 'finite']],
    ['1e400 overflow', 'x,A\n1,2\n2,1e400\n', 'INVALID_VALUE', ['t.csv line 3', '"1e400"', 'overflows']],
    ['too many fields', 'x,A\n1,2\n2,3,4\n', 'PARSE', ['t.csv line 3', '3 fields, expected 2']],
    ['too few fields', 'x,A\n1,2\n2\n', 'PARSE', ['t.csv line 3', '1 field(s), expected 2']],
    ['mixed delimiters', 'x,A\n1,2\n2;3\n', 'PARSE', ['t.csv line 3', "';'", 'mixed delimiters']],
    [
      'mixed tab in a semicolon table',
      'x;A\n1;2\n2\t3\n',
      'PARSE',
      ['t.csv line 3', 'tab', 'mixed delimiters'],
    ],
    ['duplicate x', 'x,A\n1,2\n1,3\n', 'NOT_MONOTONIC', ['t.csv line 3', 'duplicate x']],
    ['reversal', 'x,A\n1,2\n2,3\n1.5,3\n', 'NOT_MONOTONIC', ['t.csv line 4', 'x = 1.5 after 2', 'strictly']],
    [
      'decimal comma with comma delimiter',
      'x,A\n1,5,2,5\n',
      'PARSE',
      ['t.csv line 2', '4 fields', 'decimal comma', 'ambiguous'],
    ],
    [
      'point in a decimal-comma file',
      'x;A\n1,5;2,5\n2.5;3\n',
      'PARSE',
      ['t.csv line 3', '"2.5"', "decimal separator is ','"],
    ],
    [
      'blank line inside the data',
      'x,A\n1,2\n\n2,3\n',
      'PARSE',
      ['t.csv line 4', 'blank line 3', 'contiguous'],
    ],
    [
      'comment inside the data',
      'x,A\n1,2\n# later\n2,3\n',
      'PARSE',
      ['t.csv line 3', 'only before the data'],
    ],
    ['header only', 'x,A\n', 'PARSE', ['no data lines']],
    ['no delimiter', 'x\n1\n2\n', 'PARSE', ['t.csv line 1', 'no delimiter']],
    ['one point', 'x,A\n1,2\n', 'INVALID_VALUE', ['at least 2']],
    [
      'bad condition comment',
      '# path_length_m = -1\nx,A\n1,2\n2,3\n',
      'INVALID_VALUE',
      ['t.csv line 1', 'path_length_m = "-1"', 'must be > 0'],
    ],
    [
      'condition given twice',
      '# pressure_kPa = 100\n# pressure_kPa = 101\nx,A\n1,2\n2,3\n',
      'PARSE',
      ['t.csv line 2', 'first on line 1'],
    ],
    ['UTF-16', '\ufeffx,A\n1,2\n', 'PARSE', ['UTF-16']],
  ];
  for (const [name, text, code, fragments] of table) {
    it(name, () => {
      const bytes = name === 'UTF-16' ? new Uint8Array(Buffer.from(text, 'utf16le')) : bytesOf(text);
      expectError(
        () => parseSpectrumTable(bytes, { source: 't.csv', defaultYKind: 'absorbance' }),
        code,
        ...fragments,
      );
    });
  }

  it('more points than maxPoints is a LIMIT error naming the line', () => {
    expectError(
      () => parse('x,A\n1,2\n2,3\n3,4\n', { maxPoints: 2 }),
      'LIMIT',
      't.csv line 4',
      'more than 2',
    );
    expect(parse('x,A\n1,2\n2,3\n', { maxPoints: 2 }).x.length).toBe(2);
  });

  it('a decimal comma forced with a comma delimiter needs quoted fields', () => {
    expectError(
      () => parse('x,A\n1,2\n2,3\n', { decimal: ',' }),
      'PARSE',
      'line 2',
      'must be quoted',
      'ambiguous',
    );
  });

  it('arbitrary bytes either parse or throw BandwrightError, never another exception (property, fixed seed)', () => {
    const alphabet = [
      '0',
      '1',
      '9',
      '.',
      ',',
      ';',
      '\t',
      ' ',
      '\n',
      '\r\n',
      '-',
      '+',
      'e',
      'E',
      '#',
      '"',
      'x',
      'A',
      '%T',
      'NaN',
      '1e400',
      '=',
      'path_length_m',
      '\ufeff',
      'wavelength_um',
      'sample',
      'background',
    ];
    const structured = fc
      .array(fc.constantFrom(...alphabet), { maxLength: 120 })
      .map((parts) => bytesOf(parts.join('')));
    const options = fc.record({
      yKind: fc.option(fc.constantFrom<YKind>('absorbance', 'transmittance', 'single-beam'), {
        nil: undefined,
      }),
      defaultYKind: fc.option(fc.constantFrom<YKind>('absorbance', 'transmittance-percent'), {
        nil: undefined,
      }),
      delimiter: fc.option(fc.constantFrom<',' | ';' | '\t'>(',', ';', '\t'), { nil: undefined }),
      decimal: fc.option(fc.constantFrom<'.' | ','>('.', ','), { nil: undefined }),
    });
    fc.assert(
      fc.property(fc.oneof(fc.uint8Array({ maxLength: 300 }), structured), options, (bytes, raw) => {
        const chosen: SpectrumTableOptions = { source: 'fuzz.csv', maxPoints: 50 };
        if (raw.yKind !== undefined) chosen.yKind = raw.yKind;
        if (raw.defaultYKind !== undefined) chosen.defaultYKind = raw.defaultYKind;
        if (raw.delimiter !== undefined) chosen.delimiter = raw.delimiter;
        if (raw.decimal !== undefined) chosen.decimal = raw.decimal;
        try {
          const spectrum = parseSpectrumTable(bytes, chosen);
          return (
            spectrum.x.length >= 2 && spectrum.x.every((v, i) => i === 0 || v > (spectrum.x[i - 1] as number))
          );
        } catch (error) {
          return isBandwrightError(error);
        }
      }),
      { seed: SEED, numRuns: 3000 },
    );
  });
});

describe('CSV writer → table reader round trip', () => {
  it('gives back the same doubles, y-kind and conditions (property, fixed seed)', () => {
    const finite = fc.double({ noNaN: true, noDefaultInfinity: true });
    fc.assert(
      fc.property(
        fc.uniqueArray(finite, { minLength: 2, maxLength: 30, comparator: (a, b) => a === b }),
        fc.array(finite, { minLength: 60, maxLength: 60 }),
        fc.constantFrom<YKind>('absorbance', 'absorbance-natural', 'transmittance-percent', 'single-beam'),
        fc.constantFrom<',' | ';' | '\t'>(',', ';', '\t'),
        fc.record({
          pathLength_m: fc.double({ min: 1e-3, max: 1e3, noNaN: true }),
          temperature_K: fc.double({ min: 1, max: 2000, noNaN: true }),
          pressure_kPa: fc.double({ min: 0.01, max: 1e4, noNaN: true }),
        }),
        (xsRaw, ys, yKind, delimiter, conditions) => {
          const x = Float64Array.from([...xsRaw].sort((a, b) => a - b));
          const y = Float64Array.from(x, (_, i) => ys[i] as number);
          const background = Float64Array.from(x, (_, i) => ys[i + 30] as number);
          const metadata = { title: 'round trip', ...conditions, resolution_cm: 0.5 };
          const spectrum = makeSpectrum(
            yKind === 'single-beam' ? { x, y, yKind, background, metadata } : { x, y, yKind, metadata },
          );
          const text = formatSpectrumCsv(spectrum, { delimiter });
          const back = parseSpectrumTable(bytesOf(text), { source: 'rt.csv' });
          expect(back.yKind).toBe(yKind);
          expectSameDoubles(back.x, x, 'x');
          expectSameDoubles(back.y, y, 'y');
          if (yKind === 'single-beam')
            expectSameDoubles(back.background as Float64Array, background, 'background');
          expect(back.metadata).toEqual({ source: 'rt.csv', format: 'csv', ...metadata });
          return true;
        },
      ),
      { seed: SEED, numRuns: 1000 },
    );
  });

  it('writes the header and the condition comments', () => {
    const spectrum = makeSpectrum({
      x: Float64Array.of(2000, 2001),
      y: Float64Array.of(0.1, 0.2),
      yKind: 'absorbance',
      metadata: { pathLength_m: 0.1, temperature_K: 296.15 },
    });
    expect(formatSpectrumCsv(spectrum)).toBe(
      '# path_length_m = 0.1\n# temperature_K = 296.15\nwavenumber_cm-1,absorbance\n2000,0.1\n2001,0.2\n',
    );
  });
});
