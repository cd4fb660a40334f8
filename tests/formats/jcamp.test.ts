import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { convert } from 'jcampconverter';
import { describe, expect, it } from 'vitest';
import { isBandwrightError } from '../../src/errors.js';
import { parseJcamp } from '../../src/formats/jcamp/read.js';
import { difference, duplicate, formatJcamp, squeeze } from '../../src/formats/jcamp/write.js';
import { makeSpectrum, type Spectrum, type YKind } from '../../src/spectrum/spectrum.js';
import { expectError, expectSameDoubles } from '../helpers/expect.js';

const SEED = 20240517;
const fixturePath = (name: string): URL => new URL(`../fixtures/spectra/${name}`, import.meta.url);
const fixtureText = (name: string): string => readFileSync(fixturePath(name), 'utf8');

function expectClose(
  actual: ArrayLike<number>,
  expected: ArrayLike<number>,
  relative: number,
  label: string,
): void {
  expect(actual.length, `${label}: length`).toBe(expected.length);
  for (let i = 0; i < expected.length; i++) {
    const a = actual[i] as number;
    const e = expected[i] as number;
    const tolerance = relative * Math.max(Math.abs(e), Number.MIN_VALUE);
    if (!(Math.abs(a - e) <= tolerance))
      expect.fail(
        `${label}[${i}]: expected ${e}, got ${a}, difference ${Math.abs(a - e)}, tolerance ${tolerance}`,
      );
  }
}

/** jcampconverter (a general-purpose JCAMP-DX library) as the independent reading, ascending like ours. */
function jcampconverterXY(text: string): { x: number[]; y: number[] } {
  const data = convert(text).flatten[0]?.spectra[0]?.data as { x: number[]; y: number[] } | undefined;
  if (data === undefined) throw new Error('jcampconverter found no spectrum');
  const ascending = (data.x[1] as number) > (data.x[0] as number);
  return ascending ? { x: data.x, y: data.y } : { x: [...data.x].reverse(), y: [...data.y].reverse() };
}

const header = (fields: Record<string, string> = {}): string => {
  const base: Record<string, string> = {
    TITLE: 'test',
    'JCAMP-DX': '5.01',
    XUNITS: '1/CM',
    YUNITS: 'ABSORBANCE',
    XFACTOR: '1',
    YFACTOR: '1',
    FIRSTX: '1000',
    LASTX: '1009',
    DELTAX: '1',
    NPOINTS: '10',
    ...fields,
  };
  return Object.entries(base)
    .filter(([, value]) => value !== '')
    .map(([key, value]) => `##${key}=${value}`)
    .join('\n');
};
const file = (data: string, fields: Record<string, string> = {}): string =>
  `${header(fields)}\n##XYDATA=(X++(Y..Y))\n${data}\n##END=\n`;
const read = (text: string): Spectrum => parseJcamp(text, { source: 's.jdx' });

describe('JCAMP-DX ASDF: published vectors', () => {
  // McDonald & Wilks, Applied Spectroscopy 42 (1988) 151 (JCAMP-DX; the 5.01 revision keeps ASDF):
  // the ordinates 1 2 3 3 2 1 0 −1 −2 −3 are ABCCBA@abc in SQZ, AJJ%jjjjjj in DIF and AJT%jX in
  // DIF+DUP (as quoted in facts.md, "computed with an independent decoder").
  const expected = [1, 2, 3, 3, 2, 1, 0, -1, -2, -3];
  it('SQZ ABCCBA@abc', () => expectSameDoubles(read(file('1000 ABCCBA@abc')).y, expected, 'y'));
  it('DIF AJJ%jjjjjj (with its Y-check line)', () =>
    expectSameDoubles(read(file('1000 AJJ%jjjjjj\n1009 c')).y, expected, 'y'));
  it('DIF+DUP AJT%jX (with its Y-check line)', () =>
    expectSameDoubles(read(file('1000 AJT%jX\n1009 c')).y, expected, 'y'));
  it('our encoders write the same published strings', () => {
    expect(expected.map(squeeze).join('')).toBe('ABCCBA@abc');
    const difs = expected.slice(1).map((v, i) => difference(v - (expected[i] as number)));
    expect(squeeze(1) + difs.join('')).toBe('AJJ%jjjjjj');
    expect(`A${difference(1)}${duplicate(2)}${difference(0)}${difference(-1)}${duplicate(6)}`).toBe('AJT%jX');
  });
  it('jcampconverter decodes the three forms to the same values', () => {
    for (const data of ['1000 ABCCBA@abc', '1000 AJJ%jjjjjj\n1009 c', '1000 AJT%jX\n1009 c'])
      expectSameDoubles(jcampconverterXY(file(data)).y, expected, data);
  });
  it('mixed forms and PAC/AFFN separators on one line', () => {
    // PAC: + and - start a number; AFFN: space or comma separated (McDonald & Wilks 1988).
    expectSameDoubles(read(file('1000 1+2+3,3 2 1 0-1-2-3')).y, expected, 'PAC');
    expectSameDoubles(read(file('1000 ABC%jA@ab-3')).y, expected, 'SQZ/DIF/AFFN mixed');
    expectSameDoubles(
      read(file('1000 1.0E+00 2.0E+00 3.0E+00 3.0E+00 2.0E+00\n1005 1 0 -1 -2 -3')).y,
      expected,
      'AFFN with exponents',
    );
  });
});

describe('JCAMP-DX fixtures', () => {
  const xydata = ['absorbance-affn.jdx', 'absorbance-sqz.jdx', 'absorbance-difdup.dx'];
  it('AFFN, SQZ and DIF+DUP encodings of the same data give identical values', () => {
    const [affn, ...others] = xydata.map((name) =>
      parseJcamp(readFileSync(fixturePath(name)), { source: name }),
    );
    for (const other of others) {
      expectSameDoubles(other.x, (affn as Spectrum).x, 'x');
      expectSameDoubles(other.y, (affn as Spectrum).y, 'y');
    }
    // Ordinates Y/1000 with Y from the fixture README; YFACTOR = 0.001, so y = Y·0.001.
    const Y = [100, 120, 150, 190, 240, 240, 240, 200, 150, 110, 100, 100, 100, 100, 95, 90, 80, 70, 60, 50];
    expectSameDoubles(
      (affn as Spectrum).y,
      Y.map((v) => v * 0.001),
      'y',
    );
    expectSameDoubles(
      (affn as Spectrum).x,
      Y.map((_, i) => 2100 + i * 0.5),
      'x',
    );
  });

  for (const name of xydata) {
    it(`${name}: same x and y as jcampconverter to 1e-12 relative`, () => {
      const ours = parseJcamp(fixtureText(name), { source: name });
      const theirs = jcampconverterXY(fixtureText(name));
      expectClose(ours.x, theirs.x, 1e-12, 'x');
      expectClose(ours.y, theirs.y, 1e-12, 'y');
    });
  }

  it('sample labels by the JCAMP convention (cm, °C) and a $$ unit comment (bar)', () => {
    // Convention (facts.md, from memory): path length in cm, temperature in °C, pressure in atm
    // unless a trailing $$ comment names the unit. 10 cm = 0.1 m; 23.0 °C = 296.15 K; 1.0 bar = 100 kPa.
    const spectrum = parseJcamp(fixtureText('absorbance-affn.jdx'), { source: 'a.jdx' });
    expect(spectrum.metadata).toEqual({
      source: 'a.jdx',
      format: 'jcamp',
      title: 'synthetic band, AFFN',
      pathLength_m: 0.1,
      temperature_K: 23 + 273.15,
      pressure_kPa: 100,
      resolution_cm: 0.5,
    });
  });

  it('XYPOINTS on micrometres in % transmittance: ν = 10⁴/λ ascending, units from comments', () => {
    const spectrum = parseJcamp(fixtureText('transmittance-xypoints.jdx'), { source: 'p.jdx' });
    expect(spectrum.yKind).toBe('transmittance-percent');
    expectSameDoubles(
      spectrum.x,
      [4.8, 4.75, 4.7, 4.65, 4.6].map((l) => 1e4 / l),
      'x',
    );
    expectSameDoubles(spectrum.y, [98.9, 96.1, 95.2, 97.0, 98.5], 'y');
    // 25 mm = 0.025 m; 760 Torr = 1 atm = 101.325 kPa (Torr ≡ 101325/760 Pa by definition).
    expect(spectrum.metadata.pathLength_m).toBe(0.025);
    expect(spectrum.metadata.temperature_K).toBe(298.15);
    expect(spectrum.metadata.pressure_kPa).toBeCloseTo(101.325, 12);
    expect(spectrum.metadata.dateText).toBe('2024/05/17 10:30:00');
  });
});

describe('JCAMP-DX validation: each failure names the line and the rule', () => {
  it('a DIF Y-check mismatch is a YCHECK error, not silent garbage', () => {
    expectError(
      () => read(file('1000 AJT%jX\n1009 b')),
      'YCHECK',
      's.jdx line 13',
      'Y-check value -2',
      '(-3)',
    );
    // The same corruption mid-file: the second line's check value is 1 but the first line ended at 2.
    expectError(
      () => read(file('1000 AJT%j\n1004 AjX\n1009 c')),
      'YCHECK',
      'line 13',
      'Y-check value 1',
      '(2)',
    );
    // jcampconverter decodes the corrupt file without complaint (its behaviour, shown for contrast).
    expect(jcampconverterXY(file('1000 AJT%jX\n1009 b')).y.length).toBeGreaterThan(0);
  });

  it('wrong ##NPOINTS', () => {
    expectError(
      () => read(file('1000 1 2 3 3 2\n1005 1 0 -1 -2 -3', { NPOINTS: '11', LASTX: '1010' })),
      'PARSE',
      '##NPOINTS=11',
      'holds 10 points',
    );
  });

  it('a line X that disagrees with FIRSTX + i·DELTAX', () => {
    // Without ##NPOINTS or LASTX to confirm the count, the line starts are held to 0.1·DELTAX.
    const unconfirmed = { NPOINTS: '', LASTX: '' };
    expectError(
      () => read(file('1000 1 2 3 3 2\n1006 1 0 -1 -2 -3', unconfirmed)),
      'PARSE',
      's.jdx line 11',
      'X = 1006',
      'FIRSTX + 5·DELTAX = 1005',
      '1.5 when ##NPOINTS confirms the count',
    );
    expectError(
      () => read(file('1000.0 1 2 3 3 2\n1005.3 1 0 -1 -2 -3', unconfirmed)),
      'PARSE',
      'line 11',
      'X = 1005.3',
    );
    // Within 0.1·DELTAX plus half a unit of the printed last digit it is accepted silently.
    const close = read(file('1000 1 2 3 3 2\n1005.05 1 0 -1 -2 -3'));
    expect(close.x.length).toBe(10);
    expect(close.metadata.warnings).toBeUndefined();
    // With the count confirmed, a line that starts one step off is read on the header's grid, with
    // a warning saying how far off it was.
    const oneOff = read(file('1000 1 2 3 3 2\n1006 1 0 -1 -2 -3'));
    expectSameDoubles(oneOff.x, [1000, 1001, 1002, 1003, 1004, 1005, 1006, 1007, 1008, 1009], 'x');
    expect(oneOff.metadata.warnings?.map((w) => w.code)).toEqual(['line-start-x']);
    expect(oneOff.metadata.warnings?.[0]?.message).toContain('by up to 1.00 (1.00 steps, line 13)');
    // Two steps off cannot be reconciled with the header, confirmed count or not.
    // (The tolerance adds half a unit of the printed X: 1.5 + 0.5 steps for integer X here.)
    expectError(() => read(file('1000 1 2 3 3 2\n1008 1 0 -1 -2 -3')), 'PARSE', 'line 13', '3.00 steps away');
  });

  it('missing ##END=', () => {
    expectError(() => read(`${header()}\n##XYDATA=(X++(Y..Y))\n1000 ABCCBA@abc\n`), 'PARSE', 'no ##END=');
  });

  it('##TITLE first and ##JCAMP-DX second are required', () => {
    expectError(
      () => read('##JCAMP-DX=5.01\n##TITLE=x\n##END=\n'),
      'PARSE',
      'first label is ##JCAMP-DX',
      'must be ##TITLE=',
    );
    expectError(() => read('##TITLE=x\n##XUNITS=1/CM\n##END=\n'), 'PARSE', 'no ##JCAMP-DX= label');
    // Out of the standard's order, the version is read with a warning.
    const late = read(
      file('1000 ABCCBA@abc')
        .replace('##JCAMP-DX=5.01\n', '')
        .replace('##XFACTOR', '##JCAMP-DX=5.01\n##XFACTOR'),
    );
    expect(late.metadata.warnings?.map((w) => w.code)).toEqual(['label-order']);
    expectError(() => read('wavenumber,absorbance\n1,2\n'), 'PARSE', 'line 1', 'before the first label');
    expectError(() => read(file('1000 ABCCBA@abc', { 'JCAMP-DX': '6.00' })), 'PARSE', 'supported versions');
  });

  it('compound and multi-dimensional files: one infrared spectrum opens, anything else is refused for what it holds', () => {
    expectError(
      () => read('##TITLE=link\n##JCAMP-DX=5.01\n##DATA TYPE=LINK\n##BLOCKS=2\n##END=\n'),
      'UNSUPPORTED',
      'holds data of type "LINK"',
    );
    // A spectrum followed by a block without data: the spectrum is read, with a note.
    const withEmpty = read(`${file('1000 ABCCBA@abc')}##TITLE=second\n##END=\n`);
    expect(withEmpty.x.length).toBe(10);
    expect(withEmpty.metadata.warnings?.map((w) => w.code)).toEqual(['compound-block']);
    expectError(
      () => read(`${file('1000 ABCCBA@abc')}${file('1000 ABCCBA@abc', { TITLE: 'again' })}`),
      'UNSUPPORTED',
      '2 spectra in 2 blocks',
    );
    expectError(
      () => read('##TITLE=nd\n##JCAMP-DX=5.01\n##NTUPLES=INFRARED\n##END=\n'),
      'UNSUPPORTED',
      'NTUPLES',
    );
  });

  it('##FIRSTY must match the first ordinate within the YFACTOR step', () => {
    expect(read(file('1000 ABCCBA@abc', { FIRSTY: '1' })).y[0]).toBe(1);
    expectError(() => read(file('1000 ABCCBA@abc', { FIRSTY: '5' })), 'PARSE', '##FIRSTY=5', 'decodes to 1');
  });

  it('##DELTAX must agree with FIRSTX, LASTX and the count', () => {
    expectError(
      () => read(file('1000 ABCCBA@abc', { DELTAX: '2', NPOINTS: '' })),
      'PARSE',
      '##DELTAX=2 disagrees',
      'no ##NPOINTS confirms the count',
    );
    // With ##NPOINTS confirming the count, FIRSTX, LASTX and NPOINTS define the grid.
    const confirmed = read(file('1000 ABCCBA@abc', { DELTAX: '2' }));
    expect(confirmed.x[9]).toBe(1009);
    expect(confirmed.metadata.warnings?.map((w) => w.code)).toEqual(['deltax']);
    // DELTAX truncated to its printed digits (0.241 for 0.24106; over 3,000 points FIRSTX + (n−1)·DELTAX
    // misses LASTX by 0.18, more than half a step) is accepted with a warning.
    const n = 3000;
    const lines = Array.from(
      { length: n / 10 },
      (_, line) => `${(1000 + line * 10 * 0.24106).toFixed(3)} 1 2 3 4 5 6 7 8 9 10`,
    );
    const truncated = read(
      file(lines.join('\n'), { LASTX: (1000 + (n - 1) * 0.24106).toFixed(5), DELTAX: '0.241', NPOINTS: '' }),
    );
    expect(truncated.x.length).toBe(n);
    expect(truncated.metadata.warnings?.[0]?.message).toContain('rounded or truncated');
    // DELTAX alone (no LASTX) sets the spacing.
    expectSameDoubles(
      read(file('1000 ABCCBA@abc', { LASTX: '', DELTAX: '0.5' })).x,
      [1000, 1000.5, 1001, 1001.5, 1002, 1002.5, 1003, 1003.5, 1004, 1004.5],
      'x',
    );
  });

  it('ASDF syntax errors name the line', () => {
    expectError(() => read(file('1000 A%J?BC')), 'PARSE', 'line 12', "'?'");
    expectError(() => read(file('1000 JJJ')), 'PARSE', 'line 12', 'first ordinate must be absolute');
    expectError(() => read(file('1000 AST')), 'PARSE', 'line 12', 'follows another DUP');
    expectError(() => read(file('1000 A!B')), 'PARSE', 'line 12', 'unexpected character "!"');
    expectError(() => read(file('%12 B')), 'PARSE', 'line 12', 'must start with the X value');
  });

  it('units: NANOMETERS and MICROMETERS to ascending cm⁻¹; descending FIRSTX > LASTX is reversed; XFACTOR and YFACTOR apply', () => {
    // ν = 10⁷/(λ/nm) (definition); 2000…2009 nm → 5000 … 4975.6 cm⁻¹, reversed to ascend.
    const nm = read(file('2000 ABCCBA@abc', { XUNITS: 'NANOMETERS', FIRSTX: '2000', LASTX: '2009' }));
    expectSameDoubles(
      nm.x,
      Array.from({ length: 10 }, (_, i) => 1e7 / (2009 - i)),
      'x',
    );
    expectSameDoubles(nm.y, [-3, -2, -1, 0, 1, 2, 3, 3, 2, 1], 'y');
    const descending = read(file('1009 ABCCBA@abc', { FIRSTX: '1009', LASTX: '1000', DELTAX: '-1' }));
    expectSameDoubles(descending.x, [1000, 1001, 1002, 1003, 1004, 1005, 1006, 1007, 1008, 1009], 'x');
    expectSameDoubles(descending.y, [-3, -2, -1, 0, 1, 2, 3, 3, 2, 1], 'y');
    const factors = read(file('10000 ABCCBA@abc', { XFACTOR: '0.1', YFACTOR: '0.5' }));
    expectSameDoubles(factors.y, [0.5, 1, 1.5, 1.5, 1, 0.5, 0, -0.5, -1, -1.5], 'y');
    const microns = read(
      file('4 ABCCBA@abc', { XUNITS: 'MICROMETERS', FIRSTX: '4', LASTX: '4.9', DELTAX: '0.1' }),
    );
    expect(microns.x[9]).toBeCloseTo(1e4 / 4, 9);
    expectError(() => read(file('1000 ABCCBA@abc', { XUNITS: 'HZ' })), 'UNSUPPORTED', 'an NMR spectrum');
  });

  it('y-kinds: transmittance fraction, percent, natural log only when declared', () => {
    expect(read(file('1000 ABCCBA@abc', { YUNITS: 'TRANSMITTANCE', YFACTOR: '0.1' })).yKind).toBe(
      'transmittance',
    );
    expect(read(file('1000 ABCCBA@abc', { YUNITS: '% TRANSMITTANCE' })).yKind).toBe('transmittance-percent');
    expect(read(file('1000 ABCCBA@abc', { YUNITS: 'PERCENT TRANSMITTANCE' })).yKind).toBe(
      'transmittance-percent',
    );
    // Rule: TRANSMITTANCE is a fraction; values above 1.5 are refused as mislabelled percent.
    expectError(
      () => read(file('1000 ABCCBA@abc', { YUNITS: 'TRANSMITTANCE' })),
      'INVALID_VALUE',
      'reaches 3',
      '% TRANSMITTANCE',
    );
    expect(read(file('1000 ABCCBA@abc', { '$Y KIND': 'absorbance-natural' })).yKind).toBe(
      'absorbance-natural',
    );
    expectError(
      () => read(file('1000 ABCCBA@abc', { YUNITS: 'ABSORBANCE $$ natural log' })),
      'PARSE',
      '##$Y KIND=absorbance-natural',
    );
    expectError(
      () => read(file('1000 ABCCBA@abc', { YUNITS: 'TRANSMITTANCE', '$Y KIND': 'absorbance' })),
      'PARSE',
      'contradicts',
    );
    expectError(
      () => read(file('1000 ABCCBA@abc', { YUNITS: 'ARBITRARY UNITS' })),
      'UNSUPPORTED',
      'neither absorbance nor transmittance',
      'ABSORBANCE',
    );
  });

  it('sample-label units from comments, inline units, and label names compared the JCAMP way', () => {
    const labels = (extra: Record<string, string>): Spectrum => read(file('1000 ABCCBA@abc', extra));
    // 1 atm = 101.325 kPa, 1 psi = 6.894757293168361 kPa, 1 mmHg = 0.133322387415 kPa (definitions).
    expect(labels({ PRESSURE: '1' }).metadata.pressure_kPa).toBe(101.325);
    expect(labels({ PRESSURE: '14.7 $$ psi' }).metadata.pressure_kPa).toBeCloseTo(
      14.7 * 6.894757293168361,
      12,
    );
    expect(labels({ PRESSURE: '750 $$ mmHg' }).metadata.pressure_kPa).toBeCloseTo(750 * 0.133322387415, 12);
    expect(labels({ PRESSURE: '1013.25 $$ mbar' }).metadata.pressure_kPa).toBeCloseTo(101.325, 12);
    expect(labels({ PRESSURE: '101325 $$ Pa' }).metadata.pressure_kPa).toBeCloseTo(101.325, 12);
    expect(labels({ TEMPERATURE: '296 $$ K' }).metadata.temperature_K).toBe(296);
    expect(labels({ TEMPERATURE: '25 $$ °C' }).metadata.temperature_K).toBe(298.15);
    expect(labels({ 'PATH LENGTH': '5 $$ m' }).metadata.pathLength_m).toBe(5);
    expect(labels({ 'PATH LENGTH': '100 mm' }).metadata.pathLength_m).toBe(0.1);
    expect(labels({ Path_Length: '2' }).metadata.pathLength_m).toBe(0.02);
    expect(labels({ 'path-length': '2' }).metadata.pathLength_m).toBe(0.02);
    expectError(
      () => labels({ PRESSURE: '1 $$ furlongs' }),
      'INVALID_VALUE',
      '##PRESSURE',
      '"furlongs"',
      'atm, bar',
    );
    expectError(() => labels({ 'PATH LENGTH': '-1' }), 'INVALID_VALUE', 'must be > 0');
    expectError(() => labels({ TEMPERATURE: 'warm' }), 'INVALID_VALUE', '##TEMPERATURE', 'must be a number');
  });

  it('more points than maxPoints is a LIMIT error', () => {
    expectError(
      () => parseJcamp(file('1000 ABCCBA@abc'), { source: 's.jdx', maxPoints: 5 }),
      'LIMIT',
      'more than 5',
    );
    expectError(
      () => parseJcamp(file('1000 AS999999999', { NPOINTS: '' }), { source: 's.jdx', maxPoints: 100 }),
      'LIMIT',
      'DUP count',
    );
  });
});

describe('JCAMP-DX writer', () => {
  const grid = (n: number, first: number, step: number): Float64Array =>
    Float64Array.from({ length: n }, (_, i) => first + i * step);
  const band = (x: Float64Array): Float64Array =>
    Float64Array.from(x, (v) => 0.8 * Math.exp(-(((v - 2143) / 6) ** 2)) + 0.002 * Math.sin(v));
  const sample = (): Spectrum => {
    const x = grid(600, 2050, 0.482);
    return makeSpectrum({
      x,
      y: band(x),
      yKind: 'absorbance',
      metadata: { pathLength_m: 0.1, temperature_K: 296.15, pressure_kPa: 101.325, resolution_cm: 0.5 },
    });
  };

  it('writes 5.01 labels, unit comments, lines ≤ 80 characters and DIF Y-check lines', () => {
    const text = formatJcamp(sample(), {
      title: 'CO band',
      origin: 'Ridgeview test bench',
      owner: 'public domain',
    });
    const lines = text.trimEnd().split('\n');
    expect(lines.slice(0, 5)).toEqual([
      '##TITLE=CO band',
      '##JCAMP-DX=5.01',
      '##DATA TYPE=INFRARED SPECTRUM',
      '##ORIGIN=Ridgeview test bench',
      '##OWNER=public domain',
    ]);
    expect(lines).toContain('##PATH LENGTH=0.1 $$ m');
    expect(lines).toContain('##TEMPERATURE=296.15 $$ K');
    expect(lines).toContain('##PRESSURE=101.325 $$ kPa');
    expect(lines).toContain('##YUNITS=ABSORBANCE');
    expect(lines).toContain('##YFACTOR=1E-9');
    expect(lines.at(-1)).toBe('##END=');
    for (const line of lines) expect(line.length, line).toBeLessThanOrEqual(80);
    const data = lines.slice(lines.indexOf('##XYDATA=(X++(Y..Y))') + 1, -1);
    expect(data.length).toBeGreaterThan(5);
    // Each line starts where the previous one ended (the Y check repeats that point's abscissa).
    const back = parseJcamp(text, { source: 'w.jdx' });
    expect(back.metadata).toMatchObject({
      pathLength_m: 0.1,
      temperature_K: 296.15,
      pressure_kPa: 101.325,
      resolution_cm: 0.5,
      title: 'CO band',
    });
  });

  it('chooses YFACTOR for about 9 significant digits of the largest |y|', () => {
    // max |y| ≈ 0.8 → YFACTOR 1E-9 → largest integer ≈ 8·10⁸ (9 digits).
    const text = formatJcamp(sample(), { title: 't', compression: 'affn' });
    const data = text.split('##XYDATA=(X++(Y..Y))\n')[1] as string;
    const integers = data
      .split('\n')
      .filter((l) => l !== '' && !l.startsWith('##'))
      .flatMap((l) => l.split(' ').slice(1).map(Number));
    const largest = Math.max(...integers.map(Math.abs));
    expect(String(largest).length).toBe(9);
  });

  for (const compression of ['affn', 'sqz', 'dif-dup'] as const) {
    it(`${compression}: jcampconverter reads what we write, same x and y to 1e-12 relative`, () => {
      const text = formatJcamp(sample(), { title: 't', compression });
      const ours = parseJcamp(text, { source: 'w.jdx' });
      const theirs = jcampconverterXY(text);
      expectClose(ours.x, theirs.x, 1e-12, 'x');
      expectClose(ours.y, theirs.y, 1e-12, 'y');
    });
  }

  it('refuses single-beam spectra and a bad yFactor; writes natural-log absorbance with its declaration', () => {
    const x = grid(3, 1000, 1);
    const single = makeSpectrum({
      x,
      y: Float64Array.of(1, 2, 3),
      yKind: 'single-beam',
      background: Float64Array.of(2, 2, 3),
      metadata: {},
    });
    expectError(() => formatJcamp(single, { title: 't' }), 'INVALID_VALUE', 'single-beam');
    const natural = makeSpectrum({
      x,
      y: Float64Array.of(0.1, 0.2, 0.3),
      yKind: 'absorbance-natural',
      metadata: {},
    });
    expect(parseJcamp(formatJcamp(natural, { title: 't' }), { source: 'n' }).yKind).toBe(
      'absorbance-natural',
    );
    expectError(() => formatJcamp(natural, { title: 't', yFactor: -1 }), 'INVALID_VALUE', 'yFactor = -1');
    expectError(
      () => formatJcamp(natural, { title: 't', yFactor: 1e-20 }),
      'INVALID_VALUE',
      'beyond exact integers',
    );
  });

  it('an uneven grid is written as XYPOINTS and read back exactly', () => {
    const x = Float64Array.from([1000, 1001, 1003, 1004.5]);
    const spectrum = makeSpectrum({
      x,
      y: Float64Array.of(0.1, 0.25, 0.0625, 1e-7),
      yKind: 'transmittance',
      metadata: {},
    });
    const text = formatJcamp(spectrum, { title: 'uneven' });
    expect(text).toContain('##XYPOINTS=(XY..XY)');
    const back = parseJcamp(text, { source: 'u' });
    expectSameDoubles(back.x, x, 'x');
    expectSameDoubles(back.y, spectrum.y, 'y');
  });

  it('arbitrary spectra written in every compression read back the same (property, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 400 }),
        fc.double({ min: 100, max: 8000, noNaN: true }),
        fc.double({ min: 0.01, max: 8, noNaN: true }),
        fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 400, maxLength: 400 }),
        fc.integer({ min: 0, max: 3 }),
        fc.constantFrom<YKind>('absorbance', 'transmittance-percent'),
        (n, first, step, values, plateau, yKind) => {
          const x = grid(n, first, step);
          // Plateaus (repeated values) exercise DUP; a few exact zeros exercise '@' and '%'.
          // Transmittance stays above zero: at or below it a reader makes the point undefined.
          const y = Float64Array.from({ length: n }, (_, i) =>
            plateau > 0 && i % 7 < plateau
              ? 0.25
              : yKind === 'absorbance'
                ? (values[i] as number)
                : Math.abs(values[i] as number) + 0.01,
          );
          const spectrum = makeSpectrum({ x, y, yKind, metadata: { pathLength_m: 0.05 } });
          const decoded = (['affn', 'sqz', 'dif-dup'] as const).map((compression) =>
            parseJcamp(formatJcamp(spectrum, { title: 'p', compression }), { source: compression }),
          );
          const [affn, sqz, difDup] = decoded as [Spectrum, Spectrum, Spectrum];
          expectSameDoubles(sqz.y, affn.y, 'sqz vs affn');
          expectSameDoubles(difDup.y, affn.y, 'dif-dup vs affn');
          expectSameDoubles(difDup.x, affn.x, 'x');
          // Quantisation: |y − Y·YFACTOR| ≤ YFACTOR/2 (+ rounding of the product), YFACTOR = 10^(ceil(log10 max|y|) − 9).
          const maxAbs = Math.max(...Array.from(y, Math.abs));
          const yFactor = maxAbs === 0 ? 1 : Number(`1E${Math.ceil(Math.log10(maxAbs)) - 9}`);
          for (let i = 0; i < n; i++) {
            const error = Math.abs((affn.y[i] as number) - (y[i] as number));
            if (!(error <= yFactor / 2 + 1e-15 * maxAbs))
              expect.fail(`y[${i}]: ${y[i]} came back as ${affn.y[i]}, error ${error} > ${yFactor / 2}`);
            const xError = Math.abs((affn.x[i] as number) - (x[i] as number));
            if (!(xError <= 1e-9 * step + 1e-12 * (x[i] as number)))
              expect.fail(`x[${i}]: ${x[i]} came back as ${affn.x[i]}`);
          }
          return true;
        },
      ),
      { seed: SEED, numRuns: 300 },
    );
  });

  it('arbitrary text gives a spectrum or a BandwrightError, never another exception (property, fixed seed)', () => {
    const valid = formatJcamp(sample(), { title: 'fuzz', compression: 'dif-dup' });
    const tokens = [
      '##TITLE=a',
      '##JCAMP-DX=5.01',
      '##XUNITS=1/CM',
      '##YUNITS=ABSORBANCE',
      '##FIRSTX=1',
      '##LASTX=9',
      '##NPOINTS=',
      '##XYDATA=(X++(Y..Y))',
      '##XYPOINTS=(XY..XY)',
      '##END=',
      '\n',
      ' ',
      '1',
      '-',
      '+',
      '.',
      'E',
      'e',
      '@',
      'A',
      'J',
      'j',
      '%',
      'S',
      's',
      '?',
      '$$',
      ',',
      ';',
      '9999999999999999999999',
      '##BLOCKS=1',
      '##PATH LENGTH=',
      '$$ bar',
    ];
    const structured = fc.array(fc.constantFrom(...tokens), { maxLength: 80 }).map((parts) => parts.join(''));
    const mutated = fc
      .tuple(
        fc.integer({ min: 0, max: valid.length - 1 }),
        fc.integer({ min: 0, max: 40 }),
        fc.string({ maxLength: 6 }),
      )
      .map(([at, remove, insert]) => valid.slice(0, at) + insert + valid.slice(at + remove));
    fc.assert(
      fc.property(fc.oneof(fc.string({ maxLength: 200 }), structured, mutated), (text) => {
        try {
          const spectrum = parseJcamp(text, { source: 'fuzz.jdx', maxPoints: 5000 });
          return spectrum.x.length >= 2;
        } catch (error) {
          if (!isBandwrightError(error)) throw error;
          return true;
        }
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });
});
