/**
 * The batch scan reader gives what `readScan` gives — the reference here, itself checked against
 * papaparse and jcampconverter in spectrum-table.test.ts and jcamp.test.ts — for CSV and JCAMP-DX,
 * for every y-kind path and error, with its buffers reused or not.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { formatJcamp } from '../../src/formats/jcamp/write.js';
import { readScan } from '../../src/store/scan-file.js';
import { createScanReader } from '../../src/batch/scan-reader.js';
import { formatSpectrumCsv } from '../../src/formats/spectrum-csv-write.js';
import { makeSpectrum, type Spectrum } from '../../src/spectrum/spectrum.js';
import { temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-reader-');
const at = (name: string) => join(folder.path, name);
afterAll(() => folder.cleanup());

function spectrum(
  n: number,
  offset: number,
  yKind: 'absorbance' | 'transmittance' = 'absorbance',
  descending = false,
): Spectrum {
  const x = Float64Array.from({ length: n }, (_, i) => 1900 + i * 0.5);
  const y = Float64Array.from(
    { length: n },
    (_, i) => (yKind === 'transmittance' ? 0.9 : 0) + offset + 1e-3 * Math.sin(i),
  );
  if (descending) {
    x.reverse();
    y.reverse();
  }
  return { x, y, yKind, metadata: { pathLength_m: 1, temperature_K: 296, pressure_kPa: 101.325 } };
}

beforeAll(() => {
  mkdirSync(at('sub'));
  writeFileSync(at('a.csv'), formatSpectrumCsv(makeSpectrum(spectrum(801, 0.01))));
  writeFileSync(at('b.jdx'), formatJcamp(makeSpectrum(spectrum(1201, 0.02)), { title: 'b' }));
  writeFileSync(at('t.jdx'), formatJcamp(makeSpectrum(spectrum(401, 0, 'transmittance')), { title: 't' }));
  // A descending table (read back reversed) and one without a y-kind in its header.
  const descending = spectrum(300, 0.03, 'absorbance', true);
  writeFileSync(
    at('d.csv'),
    `x,y\n${Array.from(descending.x, (x, i) => `${x},${descending.y[i]}`).join('\n')}\n`,
  );
  writeFileSync(at('bad.csv'), 'wavenumber_cm-1,absorbance\n2000,0.1\n2001,abc\n');
});

describe('createScanReader', () => {
  const plain = createScanReader({ defaultYKind: 'absorbance' });
  const reusing = createScanReader({ defaultYKind: 'absorbance', reuseOutput: true });
  it.each(['a.csv', 'b.jdx', 't.jdx', 'd.csv'])('reads %s exactly as readScan', (name) => {
    const expected = readScan(at(name), { defaultYKind: 'absorbance' });
    for (const read of [plain, reusing]) {
      const actual = read(at(name));
      expect(actual.yKind).toBe(expected.yKind);
      expect(actual.metadata).toEqual(expected.metadata);
      expect(Array.from(actual.x)).toEqual(Array.from(expected.x));
      expect(Array.from(actual.y)).toEqual(Array.from(expected.y));
    }
  });

  it('fails with the messages of readScan', () => {
    const messageOf = (run: () => unknown): string => {
      try {
        run();
      } catch (error) {
        return (error as Error).message;
      }
      return 'no error';
    };
    for (const [path, options] of [
      [at('bad.csv'), {}],
      [at('missing.csv'), {}],
      [at('sub'), {}],
      [at('b.jdx'), { yKind: 'transmittance' as const }],
      [at('a.csv'), { maxBytes: 100 }],
    ] as const) {
      expect(messageOf(() => createScanReader({ ...options, reuseOutput: true })(path))).toBe(
        messageOf(() => readScan(path, options)),
      );
    }
  });

  it('with reuseOutput, hands out views that the next read overwrites; without, arrays of their own', () => {
    const first = reusing(at('a.csv'));
    const copy = Float64Array.from(first.y);
    reusing(at('d.csv'));
    expect(Array.from(first.y.subarray(0, 10))).not.toEqual(Array.from(copy.subarray(0, 10)));
    const own = plain(at('a.csv'));
    plain(at('d.csv'));
    expect(Array.from(own.y)).toEqual(Array.from(copy));
  });
});
