/**
 * Saturated (undefined) points and quantitative reference spectra at the spectrum level: NaN y
 * counted in the metadata, kept NaN through conversion and resampling, found and worded inside
 * windows, bridged by linear interpolation; absorbance per amount turned into absorbance by
 * Beer–Lambert and refused wherever a measured spectrum is needed.
 */
import { describe, expect, it } from 'vitest';
import { isBandwrightError } from '../../src/errors.js';
import {
  absorbanceFromReference,
  assertMeasuredSpectrum,
  makeSpectrum,
  resample,
  toAbsorbance,
  type Spectrum,
} from '../../src/spectrum/spectrum.js';
import {
  bridgeUndefinedPoints,
  describeUndefinedPoints,
  findUndefinedPoints,
} from '../../src/spectrum/undefined-points.js';

const grid = (n: number, from = 2000, step = 1) =>
  Float64Array.from({ length: n }, (_, i) => from + i * step);

function withNaN(y: number[], yKind: Spectrum['yKind'] = 'transmittance'): Spectrum {
  const saturatedPoints = y.filter(Number.isNaN).length;
  return makeSpectrum({
    x: grid(y.length),
    y: Float64Array.from(y),
    yKind,
    metadata: { source: 'cell.jdx', saturatedPoints },
  });
}

function thrown(action: () => unknown): Error {
  try {
    action();
  } catch (error) {
    return error as Error;
  }
  throw new Error('expected an error, none was thrown');
}

describe('saturated points in a spectrum', () => {
  it('makeSpectrum accepts NaN y at as many points as metadata.saturatedPoints counts, and no more', () => {
    const y = Float64Array.from([0.5, Number.NaN, Number.NaN, 0.5]);
    const metadata = { source: 'cell.jdx', saturatedPoints: 2 };
    expect(makeSpectrum({ x: grid(4), y, yKind: 'transmittance', metadata }).y).toBe(y);
    expect(() =>
      makeSpectrum({ x: grid(4), y, yKind: 'transmittance', metadata: { ...metadata, saturatedPoints: 1 } }),
    ).toThrow(/cell\.jdx: point 3: x = 2002, y = NaN, must be finite numbers/);
  });

  it('toAbsorbance keeps a saturated point NaN and converts the others (A = −log10 T; common practice)', () => {
    const absorbance = toAbsorbance(withNaN([0.1, Number.NaN, 0.01]));
    expect(absorbance.y[0]).toBeCloseTo(1, 14);
    expect(absorbance.y[1]).toBeNaN();
    expect(absorbance.y[2]).toBeCloseTo(2, 14);
    expect(absorbance.metadata.saturatedPoints).toBe(1);
  });

  it('resample: a grid point on a source point keeps its value beside a NaN; between a NaN and a point it is NaN; the count follows', () => {
    const source = withNaN([1, 2, Number.NaN, 4, 5], 'absorbance');
    // 2000, 2001 and 2003 coincide with finite source points; 2001.5 and 2002.5 lie beside the NaN at 2002.
    const out = resample(source, Float64Array.from([2000, 2001, 2001.5, 2002.5, 2003, 2003.5]));
    expect(Array.from(out.y)).toEqual([1, 2, Number.NaN, Number.NaN, 4, 4.5]);
    expect(out.metadata.saturatedPoints).toBe(2);
    // The result is a valid spectrum: its NaN are counted.
    expect(() => makeSpectrum(out)).not.toThrow();
  });

  it('findUndefinedPoints gives the count and the runs, inside windows when given (ends included)', () => {
    const y = [0, Number.NaN, Number.NaN, 0, Number.NaN, 0, 0, Number.NaN];
    const x = grid(y.length);
    expect(findUndefinedPoints(x, y)).toEqual({
      points: 4,
      runs: [
        [2001, 2002],
        [2004, 2004],
        [2007, 2007],
      ],
    });
    expect(findUndefinedPoints(x, y, [[2002, 2004]])).toEqual({
      points: 2,
      runs: [
        [2002, 2002],
        [2004, 2004],
      ],
    });
    expect(findUndefinedPoints(x, y, [[2005, 2006]])).toBeUndefined();
  });

  it('describeUndefinedPoints names the count and where, three runs at most', () => {
    expect(describeUndefinedPoints({ points: 1, runs: [[2143.25, 2143.25]] })).toBe(
      '1 saturated point at 2143.25 cm⁻¹',
    );
    expect(
      describeUndefinedPoints({
        points: 9,
        runs: [
          [2000, 2001],
          [2010, 2010],
          [2020, 2022],
          [2030, 2031],
          [2040, 2040],
        ],
      }),
    ).toBe('9 saturated points at 2000–2001, 2010, 2020–2022 cm⁻¹ and 2 more places');
  });

  it('bridgeUndefinedPoints interpolates linearly between the finite neighbours; a run at an end stays NaN', () => {
    const x = grid(7);
    const y = Float64Array.from([Number.NaN, 1, Number.NaN, Number.NaN, 4, 5, Number.NaN]);
    const bridged = bridgeUndefinedPoints(x, y);
    // Between (2001, 1) and (2004, 4) the line is y = x − 2000 (arithmetic).
    expect(Array.from(bridged)).toEqual([Number.NaN, 1, 2, 3, 4, 5, Number.NaN]);
    expect(y[2]).toBeNaN(); // the input is not modified
    const finite = Float64Array.from([1, 2]);
    expect(bridgeUndefinedPoints(grid(2), finite)).toBe(finite);
  });
});

describe('quantitative reference spectra (absorbance per µmol/mol per metre)', () => {
  const reference = makeSpectrum({
    x: grid(3, 2140),
    y: Float64Array.from([1e-4, 2.5e-4, 5e-5]),
    yKind: 'absorbance-per-amount',
    metadata: { source: 'co-reference.jdx', temperature_K: 296, pressure_kPa: 101.325 },
  });

  it('absorbanceFromReference: A = k·c·L (Beer–Lambert, DESIGN §3)', () => {
    const absorbance = absorbanceFromReference(reference, 400, 10);
    expect(absorbance.yKind).toBe('absorbance');
    // k = 2.5e-4 (µmol/mol)⁻¹ m⁻¹, c = 400 µmol/mol, L = 10 m: A = 2.5e-4 × 400 × 10 = 1.0 (arithmetic).
    expect(absorbance.y[1]).toBeCloseTo(1.0, 14);
    // 1e-4 × 400 × 10 = 0.4; 5e-5 × 400 × 10 = 0.2.
    expect(absorbance.y[0]).toBeCloseTo(0.4, 14);
    expect(absorbance.y[2]).toBeCloseTo(0.2, 14);
    expect(absorbance.metadata.pathLength_m).toBe(10);
    expect(absorbance.metadata.temperature_K).toBe(296);
    // Linear in amount and in path: doubling c·L doubles A.
    expect(absorbanceFromReference(reference, 200, 40).y[1]).toBeCloseTo(2.0, 14);
  });

  it('agrees with A = σ N L / ln 10 for a cross-section σ (DESIGN §3; k_B exact, CODATA 2018)', () => {
    // σ = 1e-18 cm²/molecule at 296 K and 101.325 kPa: N per µmol/mol = 1e-6 · P / (k_B T).
    const sigma_cm2 = 1e-18;
    const numberDensity_cm3 = (1e-6 * 101325) / (1.380649e-23 * 296) / 1e6; // ≈ 2.479e13 per ppm
    const perAmount = (sigma_cm2 * numberDensity_cm3 * 100) / Math.LN10; // per ppm per metre (100 cm)
    expect(perAmount).toBeCloseTo(1.0768e-3, 6);
    const spectrum = makeSpectrum({
      x: grid(2),
      y: Float64Array.from([perAmount, 0]),
      yKind: 'absorbance-per-amount',
      metadata: {},
    });
    // 50 ppm in a 2 m (200 cm) cell: A = σ · 50 N₁ · 200 / ln 10.
    const direct = (sigma_cm2 * 50 * numberDensity_cm3 * 200) / Math.LN10;
    expect(absorbanceFromReference(spectrum, 50, 2).y[0]).toBeCloseTo(direct, 14);
    expect(direct).toBeCloseTo(0.10768, 4);
  });

  it('absorbanceFromReference refuses another y-kind, a negative amount and a path that is not positive', () => {
    expect(() => absorbanceFromReference(withNaN([0.5, 0.5], 'absorbance'), 1, 1)).toThrow(
      /y-kind absorbance, must be absorbance-per-amount/,
    );
    expect(() => absorbanceFromReference(reference, -1, 1)).toThrow(
      /amount = -1 ppm, must be a finite number ≥ 0/,
    );
    expect(() => absorbanceFromReference(reference, 1, 0)).toThrow(
      /path length = 0 m, must be a finite number > 0/,
    );
  });

  it('is never plain absorbance: toAbsorbance and assertMeasuredSpectrum refuse it, naming the file and what it is', () => {
    const error = thrown(() => toAbsorbance(reference));
    expect(isBandwrightError(error, 'INVALID_VALUE')).toBe(true);
    expect(error.message).toMatch(
      /^co-reference\.jdx: a quantitative reference spectrum \(decadic absorbance per µmol\/mol per metre of path\)/,
    );
    expect(error.message).toMatch(/usable as a reference spectrum of its gas .* not as a scan$/);
    expect(() => assertMeasuredSpectrum(reference, 'standard')).toThrow(/not as a standard$/);
    expect(() => assertMeasuredSpectrum(withNaN([0.5, 0.5]), 'standard')).not.toThrow();
  });
});
