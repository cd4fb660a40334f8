/**
 * What real instruments and other programs write that the JCAMP-DX standard (JCAMP-DX 4.24/5.01,
 * McDonald & Wilks, Appl. Spectrosc. 42 (1988) 151) does not: each quirk opens with a warning that
 * says what was accepted, or is refused with a typed message. The files here are small ones written
 * for these tests, each reproducing one quirk seen in real exports; the real files themselves are
 * read in place by jcamp-corpus.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { parseJcamp } from '../../src/formats/jcamp/read.js';
import { formatJcamp } from '../../src/formats/jcamp/write.js';
import { absorbanceFromReference, toAbsorbance, type Spectrum } from '../../src/spectrum/spectrum.js';
import { expectError, expectSameDoubles } from '../helpers/expect.js';

const header = (fields: Record<string, string> = {}): string =>
  Object.entries({
    TITLE: 'quirk',
    'JCAMP-DX': '5.01',
    'DATA TYPE': 'INFRARED SPECTRUM',
    XUNITS: '1/CM',
    YUNITS: 'ABSORBANCE',
    FIRSTX: '1000',
    LASTX: '1009',
    DELTAX: '1',
    NPOINTS: '10',
    ...fields,
  })
    .filter(([, value]) => value !== '')
    .map(([key, value]) => `##${key}=${value}`)
    .join('\n');

/** A block with the ten ordinates given (AFFN, one line). */
const block = (ys: readonly number[], fields: Record<string, string> = {}): string =>
  `${header(fields)}\n##XYDATA=(X++(Y..Y))\n1000 ${ys.join(' ')}\n##END=\n`;

const read = (text: string | Uint8Array): Spectrum => parseJcamp(text, { source: 'q.jdx' });
const codes = (spectrum: Spectrum): string[] => (spectrum.metadata.warnings ?? []).map((w) => w.code);
const message = (spectrum: Spectrum, code: string): string =>
  spectrum.metadata.warnings?.find((w) => w.code === code)?.message ?? '';

const PERCENT = [88, 87.5, 80, 42, 12, 30, 75, 86, 88, 88.5];
const FRACTION = [0.88, 0.875, 0.8, 0.42, 0.12, 0.3, 0.75, 0.86, 0.88, 0.885];

describe('transmittance scale and saturation', () => {
  it('percent values under YUNITS=TRANSMITTANCE are read as percent, with a warning', () => {
    const spectrum = read(block(PERCENT, { YUNITS: 'TRANSMITTANCE' }));
    expect(spectrum.yKind).toBe('transmittance-percent');
    expect(codes(spectrum)).toEqual(['percent-transmittance']);
    // A = −log10(T/100) (Beer–Lambert, decadic): 42 % → 0.3768; same as the fraction file.
    expectSameDoubles(
      toAbsorbance(spectrum).y,
      toAbsorbance(read(block(FRACTION, { YUNITS: 'TRANSMITTANCE' }))).y,
      'A',
    );
  });

  it('a fraction spectrum with one spike above 1.5 is not percent: kept, with a warning', () => {
    const spiked = read(block([0.88, 0.875, 1.8, ...FRACTION.slice(3)], { YUNITS: 'TRANSMITTANCE' }));
    expect(spiked.yKind).toBe('transmittance');
    expect(codes(spiked)).toEqual(['transmittance-above-one']);
    expect(message(spiked, 'transmittance-above-one')).toContain('1002.00 cm⁻¹');
  });

  it('a fraction spectrum with a few points a little above 1 opens silently as a fraction', () => {
    const noisy = read(
      block([1.02, 1.01, 0.8, 0.42, 0.12, 0.3, 0.75, 0.86, 1.03, 0.99], { YUNITS: 'TRANSMITTANCE' }),
    );
    expect(noisy.yKind).toBe('transmittance');
    expect(noisy.metadata.warnings).toBeUndefined();
  });

  it('many values above 1.5 in a fraction-scale spectrum cannot be read either way: refused', () => {
    expectError(
      () => read(block([0.5, 0.4, 1.8, 1.9, 2, 0.3, 0.2, 0.1, 0.2, 0.3], { YUNITS: 'TRANSMITTANCE' })),
      'INVALID_VALUE',
      'reaches 2',
    );
  });

  it('transmittance at or below zero becomes undefined (NaN) and saturated, the warning naming count and place', () => {
    const spectrum = read(
      block([0.9, 0.5, 0.01, 0, -0.002, 0.01, 0.5, 0.9, 0, 0.9], { YUNITS: 'TRANSMITTANCE' }),
    );
    expect(spectrum.metadata.saturatedPoints).toBe(3);
    expect(Array.from(spectrum.y, Number.isNaN)).toEqual([
      false,
      false,
      false,
      true,
      true,
      false,
      false,
      false,
      true,
      false,
    ]);
    expect(message(spectrum, 'saturated')).toContain('3 point(s)');
    expect(message(spectrum, 'saturated')).toContain('2 run(s), at 1003.00–1004.00, 1008.00 cm⁻¹');
    // Saturated points stay undefined in absorbance; the others convert (−log10 0.5 = 0.30103).
    const absorbance = toAbsorbance(spectrum);
    expect(Number.isNaN(absorbance.y[3])).toBe(true);
    expect(absorbance.y[1]).toBeCloseTo(0.30103, 5);
    // Written back, a saturated point is 0 and reads back saturated.
    expect(
      read(formatJcamp(spectrum, { title: 'again', compression: 'affn' })).metadata.saturatedPoints,
    ).toBe(3);
  });

  it('absorbance no instrument measures (a peak of 6168) is kept with a warning', () => {
    const spectrum = read(block([0.1, 0.2, 6168, 0.2, 0.1, 0, 0, 0, 0, 0]));
    expect(codes(spectrum)).toEqual(['implausible-absorbance']);
    expect(message(spectrum, 'implausible-absorbance')).toContain('6168 at 1002.00 cm⁻¹');
  });
});

describe('absorbance per amount: quantitative reference spectra', () => {
  const reference = block([0, 1e-6, 4e-6, 2e-6, 0, 0, 0, 0, 0, 0], {
    YUNITS: '(micromol/mol)-1m-1 (base 10)',
  });

  it('reads as absorbance-per-amount, never as plain absorbance', () => {
    const spectrum = read(reference);
    expect(spectrum.yKind).toBe('absorbance-per-amount');
    expectError(() => toAbsorbance(spectrum), 'INVALID_VALUE', 'quantitative reference spectrum');
  });

  it('gives the absorbance of an amount in a path: A = k·c·L (Beer–Lambert)', () => {
    // k = 4e-6 per µmol/mol per m at 1002 cm⁻¹; 250 µmol/mol in 2 m: A = 4e-6 · 250 · 2 = 2e-3.
    const absorbance = absorbanceFromReference(read(reference), 250, 2);
    expect(absorbance.yKind).toBe('absorbance');
    expect(absorbance.y[2]).toBeCloseTo(2e-3, 15);
    expect(absorbance.metadata.pathLength_m).toBe(2);
  });

  it('the unit must say decadic (base 10); a natural-log reference is refused', () => {
    expectError(
      () => read(block([0, 1, 0, 0, 0, 0, 0, 0, 0, 0], { YUNITS: '(micromol/mol)-1m-1 (base e)' })),
      'PARSE',
      'not stated as decadic',
    );
  });

  it('writes back with its unit', () => {
    const again = read(formatJcamp(read(reference), { title: 'reference' }));
    expect(again.yKind).toBe('absorbance-per-amount');
  });
});

describe('labels and their values', () => {
  it('free text after a value and its unit is ignored with a warning (##PATH LENGTH=18 CM CELL)', () => {
    const spectrum = read(block(FRACTION, { YUNITS: 'TRANSMITTANCE', 'PATH LENGTH': '18 CM CELL' }));
    expect(spectrum.metadata.pathLength_m).toBeCloseTo(0.18, 15);
    expect(message(spectrum, 'label-text')).toContain('"CELL"');
  });

  it('a label given twice: accepted when equal, refused naming both when they differ', () => {
    const twice = (second: string): string =>
      block(PERCENT, { YUNITS: '%T' }).replace('##XYDATA', `##NPOINTS=${second}\n##XYDATA`);
    expect(codes(read(twice('10')))).toEqual(['duplicate-label']);
    expectError(() => read(twice('11')), 'PARSE', '##NPOINTS=11 contradicts ##NPOINTS=10 on line 9');
  });

  it('units written in header values are read, never assumed: Pa, bar, mbar, Torr, mmHg; mm, m; °C, K', () => {
    // Definitions: 1 bar = 100 kPa, 1 mbar = 0.1 kPa, 1 Torr = 101.325/760 kPa, 1 mmHg = 0.133322387415 kPa.
    const at = (fields: Record<string, string>): Spectrum =>
      read(block(FRACTION, { YUNITS: 'TRANSMITTANCE', ...fields }));
    expect(at({ PRESSURE: '98500 Pa' }).metadata.pressure_kPa).toBeCloseTo(98.5, 12);
    expect(at({ PRESSURE: '1.013 bar' }).metadata.pressure_kPa).toBeCloseTo(101.3, 12);
    expect(at({ PRESSURE: '1013 mbar' }).metadata.pressure_kPa).toBeCloseTo(101.3, 12);
    expect(at({ PRESSURE: '760 Torr' }).metadata.pressure_kPa).toBeCloseTo(101.325, 12);
    expect(at({ PRESSURE: '750 mmHg' }).metadata.pressure_kPa).toBeCloseTo(750 * 0.133322387415, 12);
    expect(at({ 'PATH LENGTH': '100 mm' }).metadata.pathLength_m).toBeCloseTo(0.1, 15);
    expect(at({ 'PATH LENGTH': '10 m' }).metadata.pathLength_m).toBe(10);
    expect(at({ TEMPERATURE: '23 C' }).metadata.temperature_K).toBeCloseTo(296.15, 12);
    expect(at({ TEMPERATURE: '296 K' }).metadata.temperature_K).toBe(296);
  });

  it('a condition no gas cell has is reported with what it probably meant, and not used', () => {
    const pascal = read(block(FRACTION, { YUNITS: 'TRANSMITTANCE', PRESSURE: '101.3 Pa' }));
    expect(pascal.metadata.pressure_kPa).toBeUndefined();
    expect(message(pascal, 'implausible-condition')).toContain('0.1013 kPa as written');
    expect(message(pascal, 'implausible-condition')).toContain('probably 101.3 kPa was meant');
    const kelvin = read(block(FRACTION, { YUNITS: 'TRANSMITTANCE', TEMPERATURE: '23 K' }));
    expect(kelvin.metadata.temperature_K).toBeUndefined();
    expect(message(kelvin, 'implausible-condition')).toContain('probably 23 °C was meant');
  });
});

describe('file structure', () => {
  it('trailing bytes after the last ##END= (DOS end-of-file 0x1A, blank lines, NUL padding) are ignored with a warning', () => {
    for (const tail of ['\x1a', '\n\n\x1a\n', '\0\0\0\0']) {
      const spectrum = read(`${block(PERCENT, { YUNITS: '%T' })}${tail}`);
      expect(codes(spectrum)).toEqual(['trailing-bytes']);
    }
    expect(read(`${block(PERCENT, { YUNITS: '%T' })}\n\n`).metadata.warnings).toBeUndefined();
  });

  it('text after ##END= in an infrared file is still refused', () => {
    expectError(
      () => read(`${block(PERCENT, { YUNITS: '%T' })}stack trace at line 3\n`),
      'PARSE',
      'after ##END=',
    );
  });

  it('old Mac OS line ends (CR alone), a bare ##END, a stray character before ##TITLE= and private flags without a value', () => {
    const text = block(PERCENT, { YUNITS: '%T' });
    expect(codes(read(text.replace(/\n/g, '\r')))).toEqual(['line-ends']);
    expect(read(text.replace('##END=', '##END')).x.length).toBe(10);
    expect(codes(read(`I${text}`))).toEqual(['leading-bytes']);
    expect(read(text.replace('##XYDATA', '##$CONTENT\n##XYDATA')).x.length).toBe(10);
  });
});

describe('files that are not a single infrared spectrum are refused for what they hold', () => {
  const cases: [string, Record<string, string>, string][] = [
    ['NMR by data type', { 'DATA TYPE': 'NMR SPECTRUM', XUNITS: 'HZ' }, 'nmr'],
    [
      'mass spectrum by x unit',
      { 'DATA TYPE': '', XUNITS: 'M/Z', YUNITS: 'RELATIVE ABUNDANCE' },
      'mass-spectrum',
    ],
    ['UV/Vis', { 'DATA TYPE': 'UV/VIS SPECTRUM', XUNITS: 'NANOMETERS' }, 'uv-vis'],
    ['Raman', { 'DATA TYPE': 'RAMAN SPECTRUM' }, 'raman'],
    ['reflectance', { YUNITS: 'REFLECTANCE' }, 'reflectance'],
    ['chromatogram', { 'DATA TYPE': 'GC CHROMATOGRAM', XUNITS: 'MINUTES' }, 'chromatogram'],
  ];
  for (const [what, fields, content] of cases) {
    it(what, () => {
      const error = expectError(() => read(block(PERCENT, fields)), 'UNSUPPORTED', 'holds');
      expect(error.location.content).toBe(content);
    });
  }

  it('a compound file with one infrared spectrum and a peak table opens the spectrum, with a note', () => {
    const peaks =
      '##TITLE=peaks\n##JCAMP-DX=5.01\n##DATA TYPE=PEAK TABLE\n##PEAK TABLE=(XY..XY)\n1002,4\n##END=\n';
    const compound = `##TITLE=link\n##JCAMP-DX=5.01\n##DATA TYPE=LINK\n##BLOCKS=2\n${block(PERCENT, { YUNITS: '%T' })}${peaks}##END=\n`;
    const spectrum = read(compound);
    expect(spectrum.x.length).toBe(10);
    expect(codes(spectrum)).toEqual(['compound-block']);
    expect(message(spectrum, 'compound-block')).toContain('a compound file of 2 blocks');
  });
});
