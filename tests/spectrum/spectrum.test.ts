import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  interpolateAt,
  makeSpectrum,
  resample,
  toAbsorbance,
  toTransmittance,
  type Spectrum,
} from '../../src/spectrum/spectrum.js';

const grid = (n: number, from = 2000, step = 1) =>
  Float64Array.from({ length: n }, (_, i) => from + i * step);

function spectrum(y: number[], yKind: Spectrum['yKind'], background?: number[]): Spectrum {
  return makeSpectrum({
    x: grid(y.length),
    y: Float64Array.from(y),
    yKind,
    ...(background === undefined ? {} : { background: Float64Array.from(background) }),
    metadata: { source: 'test' },
  });
}

describe('y-kind conversion (Beer–Lambert, A = −log10 T; common practice)', () => {
  it('converts transmittance fraction and percent to decadic absorbance', () => {
    expect(Array.from(toAbsorbance(spectrum([1, 0.1, 0.01], 'transmittance')).y)).toEqual([-0, 1, 2]);
    const percent = toAbsorbance(spectrum([100, 10, 50], 'transmittance-percent')).y;
    expect(percent[0]).toBeCloseTo(0, 15);
    expect(percent[1]).toBeCloseTo(1, 15);
    expect(percent[2]).toBeCloseTo(Math.log10(2), 15);
  });

  it('converts natural-log absorbance: A10 = Ae / ln 10', () => {
    expect(toAbsorbance(spectrum([Math.LN10, 0], 'absorbance-natural')).y[0]).toBeCloseTo(1, 15);
  });

  it('gives zero absorbance for a single-beam sample measured against itself (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 1e-6, max: 1e6, noNaN: true }), { minLength: 2, maxLength: 50 }),
        (intensity) => {
          const a = toAbsorbance(spectrum(intensity, 'single-beam', intensity)).y;
          return a.every((v) => v === 0);
        },
      ),
      { seed: 3, numRuns: 200 },
    );
  });

  it('gives −log10(I/I0) for a single-beam pair', () => {
    expect(toAbsorbance(spectrum([50, 1], 'single-beam', [100, 1000])).y).toEqual(
      Float64Array.from([Math.log10(2), 3]),
    );
  });

  it('round-trips absorbance → transmittance → absorbance (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -0.5, max: 4, noNaN: true }), { minLength: 2, maxLength: 50 }),
        (a) => {
          const back = toAbsorbance(toTransmittance(spectrum(a, 'absorbance'))).y;
          return a.every((v, i) => Math.abs((back[i] as number) - v) <= 1e-12 * Math.max(1, Math.abs(v)));
        },
      ),
      { seed: 4, numRuns: 200 },
    );
  });

  it('refuses transmittance ≤ 0, naming the point, instead of inventing an absorbance', () => {
    expect(() => toAbsorbance(spectrum([0.5, 0, 0.2], 'transmittance'))).toThrow(
      /test: point 2 \(x = 2001 cm⁻¹\): transmittance = 0, must be > 0/,
    );
    expect(() => toAbsorbance(spectrum([1, 2], 'single-beam', [1, -1]))).toThrow(/background intensity = -1/);
  });

  it('does not mutate its input', () => {
    const input = spectrum([0.5, 0.25], 'transmittance');
    const copy = Float64Array.from(input.y);
    toAbsorbance(input);
    expect(input.y).toEqual(copy);
  });
});

describe('makeSpectrum', () => {
  it('refuses duplicate and non-monotonic x, non-finite values, and a single-beam scan without background', () => {
    const make = (x: number[], y: number[]) =>
      makeSpectrum({
        x: Float64Array.from(x),
        y: Float64Array.from(y),
        yKind: 'absorbance',
        metadata: { source: 's' },
      });
    expect(() => make([1, 2, 2], [0, 0, 0])).toThrow(/point 3: x = 2 after 2, duplicate x value/);
    expect(() => make([1, 3, 2], [0, 0, 0])).toThrow(/strictly increasing/);
    expect(() => make([1, 2], [0, Number.NaN])).toThrow(/must be finite/);
    expect(() => make([1], [0])).toThrow(/at least 2/);
    expect(() => makeSpectrum({ x: grid(2), y: grid(2), yKind: 'single-beam', metadata: {} })).toThrow(
      /needs a background/,
    );
  });
});

describe('interpolation and resampling', () => {
  it('reproduces a straight line exactly and gives NaN outside the grid', () => {
    const line = makeSpectrum({
      x: grid(11),
      y: Float64Array.from({ length: 11 }, (_, i) => 3 + 0.5 * i),
      yKind: 'absorbance',
      metadata: {},
    });
    expect(interpolateAt(line.x, line.y, 2004.25)).toBeCloseTo(3 + 0.5 * 4.25, 14);
    expect(interpolateAt(line.x, line.y, 1999)).toBeNaN();
    const fine = resample(
      line,
      Float64Array.from({ length: 41 }, (_, i) => 2000 + i * 0.25),
    );
    fine.y.forEach((v, i) => expect(v).toBeCloseTo(3 + 0.5 * (i * 0.25), 12));
  });

  it('refuses a target grid outside the source range, naming both', () => {
    const s = spectrum([0, 0, 0], 'absorbance');
    expect(() => resample(s, Float64Array.from([1999, 2001]))).toThrow(
      /covers 2000–2002 cm⁻¹, cannot be resampled onto 1999–2001 cm⁻¹/,
    );
  });
});
