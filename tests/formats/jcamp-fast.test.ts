/**
 * The JCAMP-DX reader decodes ordinary ASDF lines (an AFFN X followed by SQZ, DIF and DUP tokens)
 * in a single pass and leaves every other line to its general token loop. These checks show that
 * the single pass gives bit-identical spectra and the same refusals.
 *
 * Reference: the general token loop, reached by writing the first ordinate of every data line in
 * AFFN after a blank (`2100 1000` instead of `2100A000`), which JCAMP-DX 5.01 (McDonald & Wilks,
 * Applied Spectroscopy 42 (1988) 151) allows on any line and which decodes to the same integer;
 * and jcampconverter (a general-purpose JCAMP-DX library from the npm registry) for the values.
 */
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { convert } from 'jcampconverter';
import { describe, expect, it } from 'vitest';
import { BandwrightError } from '../../src/errors.js';
import { JcampReader, parseJcamp } from '../../src/formats/jcamp/read.js';
import { formatJcamp } from '../../src/formats/jcamp/write.js';
import type { Spectrum } from '../../src/spectrum/spectrum.js';

const SEED = 20261202;
const fixtureText = (name: string): string =>
  readFileSync(new URL(`../fixtures/spectra/${name}`, import.meta.url), 'utf8');

const SQZ_VALUE: Record<string, string> = {
  '@': '0',
  A: '1',
  B: '2',
  C: '3',
  D: '4',
  E: '5',
  F: '6',
  G: '7',
  H: '8',
  I: '9',
  a: '-1',
  b: '-2',
  c: '-3',
  d: '-4',
  e: '-5',
  f: '-6',
  g: '-7',
  h: '-8',
  i: '-9',
};

/** The same file with the first ordinate of each XYDATA line written as an AFFN integer between blanks. */
function withAffnFirstOrdinates(text: string): { text: string; rewritten: number } {
  let inData = false;
  let rewritten = 0;
  const lines = text.split('\n').map((line) => {
    if (line.startsWith('##')) {
      inData = line.startsWith('##XYDATA');
      return line;
    }
    if (!inData) return line;
    const match = /^(\s*[+-]?[\d.]+)([@A-Ia-i])(\d*)(.*)$/s.exec(line);
    if (match === null) return line;
    rewritten++;
    const [, x, lead, digits, rest] = match as unknown as [string, string, string, string, string];
    const value = SQZ_VALUE[lead] as string;
    // '@' stands for 0 as the first digit: @5 is 05 = 5. The blank after the number keeps a
    // following E/e token from reading as an exponent.
    return `${x} ${value === '0' && digits !== '' ? '' : value}${digits} ${rest}`;
  });
  return { text: lines.join('\n'), rewritten };
}

function outcome(run: () => Spectrum): { spectrum?: Spectrum; error?: string } {
  try {
    return { spectrum: run() };
  } catch (error) {
    if (error instanceof BandwrightError) return { error: `${error.code} ${error.message}` };
    throw error;
  }
}

function expectSameSpectrum(actual: Spectrum, expected: Spectrum, label: string): void {
  expect(actual.x.length, `${label}: points`).toBe(expected.x.length);
  for (let i = 0; i < expected.x.length; i++) {
    if (!Object.is(actual.x[i], expected.x[i]) || !Object.is(actual.y[i], expected.y[i])) {
      expect.fail(
        `${label} point ${i + 1}: expected (${expected.x[i]}, ${expected.y[i]}), got (${actual.x[i]}, ${actual.y[i]}) (exact)`,
      );
    }
  }
  expect(actual.yKind).toBe(expected.yKind);
  expect(actual.metadata).toEqual(expected.metadata);
}

/**
 * Readers kept across cases, so that their buffers carry what earlier files left in them: one
 * pair handing out arrays of their own, one pair handing out views on its buffers. Each way of
 * decoding has its own reader, so a spectrum is never compared with a view on the same memory.
 */
const readers = [false, true].map((reuseOutput) => ({
  fast: new JcampReader({ reuseOutput }),
  general: new JcampReader({ reuseOutput }),
}));

/** Reads a file both ways and requires the same spectrum to the last bit, or the same refusal. */
function expectSameBothWays(text: string, label: string, options: { maxPoints?: number } = {}): void {
  const { text: reference, rewritten } = withAffnFirstOrdinates(text);
  expect(rewritten, `${label}: no SQZ line to rewrite`).toBeGreaterThan(0);
  for (const reader of readers) {
    const fast = outcome(() => reader.fast.read(text, { source: 'f.jdx', ...options }));
    const general = outcome(() => reader.general.read(reference, { source: 'f.jdx', ...options }));
    if (general.spectrum === undefined) {
      expect(fast.error, `${label}: refusal`).toBe(general.error);
    } else {
      expect(fast.error, `${label}: unexpected refusal`).toBeUndefined();
      expectSameSpectrum(fast.spectrum as Spectrum, general.spectrum, label);
    }
  }
}

/** Ordinates with runs (DUP), steps (DIF) and zeros, as integers times 1e-4 AU. */
const ordinates = fc.array(
  fc.oneof(
    fc.integer({ min: -99_999, max: 99_999 }),
    fc.constantFrom(0, 1, -1),
    fc.integer({ min: -3, max: 3 }).map((v) => v * 1000),
  ),
  { minLength: 2, maxLength: 600 },
);

function spectrumOf(values: number[], first: number, step: number): Spectrum {
  const x = Float64Array.from(values, (_, i) => first + i * step);
  // Runs of equal values and of equal differences make the writer use DUP.
  const y = Float64Array.from(values, (v, i) => (i % 7 < 3 ? (values[i - (i % 7)] as number) : v) * 1e-4);
  return { x, y, yKind: 'absorbance', metadata: {} };
}

describe('JCAMP-DX single-pass ASDF lines against the general token loop', () => {
  for (const name of ['absorbance-difdup.dx', 'absorbance-sqz.jdx']) {
    it(`${name}: identical spectrum`, () => expectSameBothWays(fixtureText(name), name));
  }

  it('random DIF/DUP and SQZ files from our writer: identical spectra (fixed seed)', () => {
    fc.assert(
      fc.property(
        ordinates,
        fc.constantFrom(0.5, -0.5, 0.24287449103507394, 1.9285),
        fc.constantFrom<'dif-dup' | 'sqz'>('dif-dup', 'sqz'),
        (values, step, compression) => {
          const text = formatJcamp(spectrumOf(values, 600, step), { title: 't', compression, yFactor: 1e-4 });
          expectSameBothWays(text, `${compression}, ${values.length} points, step ${step}`);
        },
      ),
      { seed: SEED, numRuns: 300 },
    );
  });

  it('a 14,000-point DIF/DUP scan: identical, and the values match jcampconverter', () => {
    const values = Array.from({ length: 14_000 }, (_, i) =>
      Math.round(8000 * Math.exp(-(((i - 5000) / 300) ** 2)) + 40 * Math.sin(i / 3)),
    );
    const text = formatJcamp(spectrumOf(values, 600, 3400 / 13_999), {
      title: 't',
      compression: 'dif-dup',
      yFactor: 1e-4,
    });
    expectSameBothWays(text, '14,000 points');
    const ours = parseJcamp(text, { source: 'f.jdx' });
    const theirs = convert(text).flatten[0]?.spectra[0]?.data as { x: number[]; y: number[] };
    // Same integers times the same YFACTOR: equal within one rounding of the product.
    for (let i = 0; i < ours.y.length; i++)
      expect(Math.abs((ours.y[i] as number) - (theirs.y[i] as number))).toBeLessThanOrEqual(
        1e-15 * Math.max(1, Math.abs(theirs.y[i] as number)),
      );
  });

  it('damaged lines the single pass must hand on: the same refusal as before', () => {
    const header = (extra = ''): string =>
      `##TITLE=t\n##JCAMP-DX=5.01\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XFACTOR=1\n##YFACTOR=1\n##FIRSTX=1000\n##LASTX=1009\n##NPOINTS=10\n${extra}##XYDATA=(X++(Y..Y))\n`;
    const read = (data: string, extra = '', maxPoints?: number): string => {
      const result = outcome(() =>
        parseJcamp(`${header(extra)}${data}\n##END=\n`, {
          source: 's.jdx',
          ...(maxPoints === undefined ? {} : { maxPoints }),
        }),
      );
      return result.error ?? 'accepted';
    };
    // Each as written by hand from the ASDF rules (JCAMP-DX 5.01): the general loop's wording.
    expect(read('1000A%J?BC')).toMatch(/^PARSE .*line 11: '\?'/);
    expect(read('1000AST')).toMatch(/^PARSE .*follows another DUP/);
    expect(read('1000JJJ')).toMatch(/^PARSE .*first ordinate must be absolute/);
    expect(read('1000A.5BC')).toMatch(/^PARSE .*decimal point after the ASDF value/);
    expect(read('1000AJT%jX\n1009b')).toMatch(/^YCHECK .*Y-check value -2/);
    expect(read('1000AJJ%jjjjjj\n1009c')).toBe('accepted');
    expect(read('1000AJZ', '', 5)).toMatch(/^LIMIT /);
    expect(read('1000A!B')).toMatch(/^PARSE .*unexpected character "!"/);
  });

  it('x that the reader builds must still be strictly monotonic and y finite', () => {
    const file = (fields: string, x: string): string =>
      `##TITLE=t\n##JCAMP-DX=5.01\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XFACTOR=1\n${fields}##NPOINTS=4\n##XYDATA=(X++(Y..Y))\n${x}AJJJ\n##END=\n`;
    // 1e17 + 1 rounds back to 1e17 in IEEE doubles (spacing 16 there): a repeated x.
    expect(
      outcome(() =>
        parseJcamp(file('##YFACTOR=1\n##FIRSTX=1E17\n##DELTAX=1\n', '100000000000000000'), {
          source: 's.jdx',
        }),
      ).error,
    ).toMatch(/^NOT_MONOTONIC .*duplicate x value/);
    // 4 × 1e308 overflows a double.
    expect(
      outcome(() =>
        parseJcamp(file('##YFACTOR=1E308\n##FIRSTX=1000\n##DELTAX=1\n', '1000'), { source: 's.jdx' }),
      ).error,
    ).toMatch(/^INVALID_VALUE .*must be finite/);
  });
});
