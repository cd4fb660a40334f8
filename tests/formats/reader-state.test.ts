/**
 * The scan readers keep reusable buffers only in reader objects that their caller owns, never in
 * the module: reads on different readers may interleave (two batches, two generators, a one-shot
 * parse while a batch holds a spectrum whose arrays are views on its reader's buffers), and each
 * gives the same bytes as a read on its own.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { JcampReader, parseJcamp } from '../../src/formats/jcamp/read.js';
import { formatJcamp } from '../../src/formats/jcamp/write.js';
import { ScanParser, parseScan } from '../../src/formats/scan.js';
import { formatSpectrumCsv } from '../../src/formats/spectrum-csv-write.js';
import { SpectrumTableReader, parseSpectrumTable } from '../../src/formats/spectrum-table/read.js';
import { makeSpectrum, type Spectrum } from '../../src/spectrum/spectrum.js';

const fixture = (name: string): Uint8Array =>
  readFileSync(new URL(`../fixtures/spectra/${name}`, import.meta.url));
const encoder = new TextEncoder();

/** A smooth band on a sloped baseline, n points from 600 cm⁻¹ (sizes differ so buffers grow and shrink). */
function band(n: number, height: number): Spectrum {
  const x = Float64Array.from({ length: n }, (_, i) => 600 + i * 0.5);
  const y = Float64Array.from(x, (v, i) => height * Math.exp(-(((i - n / 2) / (n / 10)) ** 2)) + 1e-5 * v);
  return makeSpectrum({ x, y, yKind: 'absorbance', metadata: {} });
}

const JCAMP_FILES: [string, Uint8Array][] = [
  ['absorbance-difdup.dx', fixture('absorbance-difdup.dx')],
  ['absorbance-sqz.jdx', fixture('absorbance-sqz.jdx')],
  ['absorbance-affn.jdx', fixture('absorbance-affn.jdx')],
  ['transmittance-xypoints.jdx', fixture('transmittance-xypoints.jdx')],
  ...[3000, 40, 14_000, 801].map((n, k): [string, Uint8Array] => [
    `band-${n}.jdx`,
    encoder.encode(formatJcamp(band(n, 0.2 + k / 10), { title: `band ${n}` })),
  ]),
];

const TABLE_FILES: [string, Uint8Array][] = [
  ['absorbance-header.csv', fixture('absorbance-header.csv')],
  ['descending.csv', fixture('descending.csv')],
  ['micrometres.csv', fixture('micrometres.csv')],
  ['single-beam.csv', fixture('single-beam.csv')],
  ['semicolon-decimal-comma.csv', fixture('semicolon-decimal-comma.csv')],
  ...[2500, 60, 14_000, 777].map((n, k): [string, Uint8Array] => [
    `band-${n}.csv`,
    encoder.encode(formatSpectrumCsv(band(n, 0.3 + k / 10))),
  ]),
];

const bytesOf = (array: Float64Array): Buffer =>
  Buffer.from(array.buffer, array.byteOffset, array.byteLength);

/** Requires the same arrays to the last bit, the same kind and the same metadata. */
function expectSameBytes(actual: Spectrum, expected: Spectrum, label: string): void {
  expect(bytesOf(actual.x).equals(bytesOf(expected.x)), `${label}: x`).toBe(true);
  expect(bytesOf(actual.y).equals(bytesOf(expected.y)), `${label}: y`).toBe(true);
  expect(actual.background === undefined, `${label}: background present`).toBe(
    expected.background === undefined,
  );
  if (actual.background !== undefined && expected.background !== undefined)
    expect(bytesOf(actual.background).equals(bytesOf(expected.background)), `${label}: background`).toBe(
      true,
    );
  expect(actual.yKind).toBe(expected.yKind);
  expect(actual.metadata).toEqual(expected.metadata);
}

/** Reads each file in turn with one reader, yielding what it read. */
function* readEach(
  files: [string, Uint8Array][],
  read: (bytes: Uint8Array, source: string) => Spectrum,
): Generator<[string, Spectrum]> {
  for (const [name, bytes] of files) yield [name, read(bytes, name)];
}

describe('JCAMP-DX readers own their buffers', () => {
  const alone = (name: string): Spectrum =>
    parseJcamp(JCAMP_FILES.find(([n]) => n === name)?.[1] as Uint8Array, { source: name });

  it('two readers handing out views, used alternately, give the bytes of separate reads', () => {
    const first = new JcampReader({ reuseOutput: true });
    const second = new JcampReader({ reuseOutput: true });
    const forward = readEach(JCAMP_FILES, (bytes, source) => first.read(bytes, { source }));
    const backward = readEach([...JCAMP_FILES].reverse(), (bytes, source) => second.read(bytes, { source }));
    for (let k = 0; k < JCAMP_FILES.length; k++) {
      // Both spectra are held while the other reader reads, then compared before their reader reads on.
      const [nameA, a] = forward.next().value as [string, Spectrum];
      const [nameB, b] = backward.next().value as [string, Spectrum];
      expectSameBytes(a, alone(nameA), `${nameA} (first reader)`);
      expectSameBytes(b, alone(nameB), `${nameB} (second reader)`);
    }
  });

  it("a one-shot parse started while a reader's view is held leaves that view intact", () => {
    const reader = new JcampReader({ reuseOutput: true });
    for (const [name, bytes] of JCAMP_FILES) {
      const held = reader.read(bytes, { source: name });
      const expected = alone(name);
      // Other reads of every kind, some of them larger, while `held` is still in use.
      for (const [other, otherBytes] of JCAMP_FILES) parseJcamp(otherBytes, { source: other });
      new JcampReader().read(fixture('absorbance-difdup.dx'), { source: 'other.dx' });
      expectSameBytes(held, expected, name);
    }
  });

  it('a reader that hands out arrays of their own gives arrays no later read touches', () => {
    const reader = new JcampReader();
    const kept = JCAMP_FILES.map(([name, bytes]) => [name, reader.read(bytes, { source: name })] as const);
    for (const [name, spectrum] of kept) expectSameBytes(spectrum, alone(name), name);
  });
});

describe('spectrum-table readers own their buffers', () => {
  const alone = (name: string): Spectrum =>
    parseSpectrumTable(TABLE_FILES.find(([n]) => n === name)?.[1] as Uint8Array, {
      source: name,
      defaultYKind: 'absorbance',
    });

  it('two readers handing out views, used alternately, give the bytes of separate reads', () => {
    const first = new SpectrumTableReader({ reuseOutput: true });
    const second = new SpectrumTableReader({ reuseOutput: true });
    const options = (source: string): { source: string; defaultYKind: 'absorbance' } => ({
      source,
      defaultYKind: 'absorbance',
    });
    const forward = readEach(TABLE_FILES, (bytes, source) => first.read(bytes, options(source)));
    const backward = readEach([...TABLE_FILES].reverse(), (bytes, source) =>
      second.read(bytes, options(source)),
    );
    for (let k = 0; k < TABLE_FILES.length; k++) {
      const [nameA, a] = forward.next().value as [string, Spectrum];
      const [nameB, b] = backward.next().value as [string, Spectrum];
      expectSameBytes(a, alone(nameA), `${nameA} (first reader)`);
      expectSameBytes(b, alone(nameB), `${nameB} (second reader)`);
    }
  });

  it("a one-shot parse started while a reader's view is held leaves that view intact", () => {
    const reader = new SpectrumTableReader({ reuseOutput: true });
    for (const [name, bytes] of TABLE_FILES) {
      const held = reader.read(bytes, { source: name, defaultYKind: 'absorbance' });
      const expected = alone(name);
      for (const [other, otherBytes] of TABLE_FILES)
        parseSpectrumTable(otherBytes, { source: other, defaultYKind: 'absorbance' });
      expectSameBytes(held, expected, name);
    }
  });
});

describe('scan parsers own their buffers', () => {
  it('two parsers over mixed formats, interleaved, give the bytes of parseScan', () => {
    const mixed = JCAMP_FILES.flatMap((file, k) => [file, TABLE_FILES[k] ?? file]);
    const parsers = [new ScanParser({ reuseOutput: true }), new ScanParser({ reuseOutput: true })];
    const streams = parsers.map((parser, p) =>
      readEach(p === 0 ? mixed : [...mixed].reverse(), (bytes, source) =>
        parser.parse(bytes, { source, defaultYKind: 'absorbance' }),
      ),
    );
    for (let k = 0; k < mixed.length; k++) {
      const held = streams.map((stream) => stream.next().value as [string, Spectrum]);
      for (const [name, spectrum] of held) {
        const bytes = mixed.find(([n]) => n === name)?.[1] as Uint8Array;
        expectSameBytes(spectrum, parseScan(bytes, { source: name, defaultYKind: 'absorbance' }), name);
      }
    }
  });
});
