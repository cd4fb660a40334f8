/**
 * Fuzzing the scan readers (spectrum tables and JCAMP-DX) with arbitrary bytes, token soup near
 * each grammar, and byte edits of valid files written by our own writers: every case either gives
 * a spectrum that keeps the Spectrum invariants (≥ 2 points, strictly ascending finite x, finite
 * y, a background exactly for single-beam, positive finite conditions) or throws a
 * BandwrightError with a code. The existing reader tests check exact values; this checks safety.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { parseJcamp } from '../../src/formats/jcamp/read.js';
import { formatJcamp } from '../../src/formats/jcamp/write.js';
import { formatSpectrumCsv } from '../../src/formats/spectrum-csv-write.js';
import { parseSpectrumTable } from '../../src/formats/spectrum-table/read.js';
import { Y_KINDS, makeSpectrum, type Spectrum } from '../../src/spectrum/spectrum.js';
import {
  FUZZ_PARAMETERS,
  FUZZ_RUNS,
  FUZZ_SEED,
  FuzzTally,
  allFinite,
  invariant,
  mutated,
  tokenText,
} from './harness.js';

const encoder = new TextEncoder();
const summaries: string[] = [];
afterAll(() => summaries.forEach((line) => console.log(line)));

function checkSpectrum(spectrum: Spectrum): void {
  const { x, y } = spectrum;
  invariant(x.length >= 2 && x.length === y.length, 'at least two points, x and y of equal length');
  invariant(allFinite(x) && allFinite(y), 'finite x and y');
  for (let i = 1; i < x.length; i++)
    invariant((x[i] as number) > (x[i - 1] as number), 'strictly ascending x');
  invariant(Y_KINDS.includes(spectrum.yKind), 'a known y-kind');
  invariant(
    (spectrum.yKind === 'single-beam') === (spectrum.background !== undefined),
    'a background exactly for single-beam',
  );
  if (spectrum.background !== undefined)
    invariant(
      spectrum.background.length === x.length && allFinite(spectrum.background),
      'finite background on the grid',
    );
  const m = spectrum.metadata;
  for (const value of [m.pathLength_m, m.temperature_K, m.pressure_kPa])
    invariant(value === undefined || (Number.isFinite(value) && value > 0), 'conditions positive and finite');
}

/** Small valid spectra for the writers (invented shapes; only their safety is tested). */
const smallSpectrum = fc
  .record({
    n: fc.integer({ min: 2, max: 24 }),
    start: fc.double({ min: 400, max: 4000, noNaN: true }),
    step: fc.double({ min: 0.1, max: 8, noNaN: true }),
    values: fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: 24, maxLength: 24 }),
    kind: fc.constantFrom('absorbance', 'transmittance-percent', 'absorbance-natural'),
    pathLength: fc.option(fc.double({ min: 0.01, max: 100, noNaN: true }), { nil: undefined }),
  })
  .map(({ n, start, step, values, kind, pathLength }) => {
    const x = Float64Array.from({ length: n }, (_, i) => start + i * step);
    const y = Float64Array.from({ length: n }, (_, i) =>
      kind === 'transmittance-percent' ? 50 + 10 * (values[i] as number) : (values[i] as number),
    );
    return makeSpectrum({
      x,
      y,
      yKind: kind,
      metadata:
        pathLength === undefined ? {} : { pathLength_m: pathLength, temperature_K: 296, pressure_kPa: 101.3 },
    });
  });

const tableTokens = [
  '0',
  '1',
  '7',
  '.',
  ',',
  ';',
  '\t',
  ' ',
  '\n',
  '\r\n',
  '\r',
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
  'Infinity',
  '1e400',
  '-0',
  '1e-320',
  '=',
  '# path_length_m = ',
  '# temperature_C = ',
  'wavenumber_cm-1',
  'absorbance',
  'transmittance',
  'wavelength_um',
  'wavelength_nm',
  'sample',
  'background',
  '\ufeff',
  'é',
  '\u0000',
];
const tableText = fc.oneof(
  { weight: 2, arbitrary: tokenText(tableTokens, 100) },
  {
    weight: 3,
    arbitrary: mutated(
      fc
        .tuple(smallSpectrum, fc.constantFrom<',' | ';' | '\t'>(',', ';', '\t'))
        .map(([s, d]) => formatSpectrumCsv(s, { delimiter: d })),
      tableTokens,
    ),
  },
  { weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 200 }) },
);

describe(`spectrum table reader fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('returns a valid spectrum or a BandwrightError with a code, for every case', () => {
    const tally = new FuzzTally('spectrum tables');
    fc.assert(
      fc.property(
        fc.oneof(
          tableText.map((t) => encoder.encode(t)),
          fc.uint8Array({ maxLength: 200 }),
        ),
        fc.constantFrom(undefined, 'absorbance', 'single-beam'),
        (bytes, yKind) => {
          tally.attempt(
            () =>
              parseSpectrumTable(bytes, {
                source: 'fuzz.csv',
                maxPoints: 200,
                ...(yKind === undefined ? {} : { yKind: yKind }),
              }),
            checkSpectrum,
          );
        },
      ),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    // Enough valid files among the noise that the accepting path is exercised too.
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 50);
  });
});

const jcampTokens = [
  '##',
  '=',
  '\n',
  '\r\n',
  ' ',
  '$$',
  'TITLE',
  'JCAMP-DX',
  '4.24',
  '5.01',
  'XUNITS',
  '1/CM',
  'MICROMETERS',
  'YUNITS',
  'ABSORBANCE',
  'TRANSMITTANCE',
  'FIRSTX',
  'LASTX',
  'DELTAX',
  'NPOINTS',
  'XFACTOR',
  'YFACTOR',
  'FIRSTY',
  'XYDATA',
  '(X++(Y..Y))',
  'XYPOINTS',
  '(XY..XY)',
  'END',
  'PATH LENGTH',
  'TEMPERATURE',
  'PRESSURE',
  '0',
  '1',
  '9',
  '-',
  '.',
  'E',
  '1E400',
  '?',
  '@',
  'A',
  'J',
  'j',
  '%',
  'S',
  'Z',
  's',
  ',',
  ';',
  'NTUPLES',
  'LINK',
  '\ufeff',
];
const jcampText = fc.oneof(
  { weight: 2, arbitrary: tokenText(jcampTokens, 120) },
  {
    weight: 4,
    arbitrary: mutated(
      fc
        .tuple(smallSpectrum, fc.constantFrom<'affn' | 'sqz' | 'dif-dup'>('affn', 'sqz', 'dif-dup'))
        .map(([s, compression]) => formatJcamp(s, { title: 'fuzz', compression })),
      jcampTokens,
    ),
  },
  { weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 200 }) },
);

describe(`JCAMP-DX reader fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('returns a valid spectrum or a BandwrightError with a code, for every case', () => {
    const tally = new FuzzTally('JCAMP-DX');
    fc.assert(
      fc.property(
        fc.oneof(
          { weight: 6, arbitrary: jcampText.map((t) => encoder.encode(t)) },
          { weight: 1, arbitrary: fc.uint8Array({ maxLength: 200 }) },
        ),
        (bytes) => {
          tally.attempt(() => parseJcamp(bytes, { source: 'fuzz.jdx', maxPoints: 200 }), checkSpectrum);
        },
      ),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    // Enough valid files among the noise that the accepting path is exercised too.
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 50);
  });
});
