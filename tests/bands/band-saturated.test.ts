/**
 * Band features of a spectrum with saturated (undefined, NaN) points: the baseline is fitted
 * without them, the band bridges them linearly from their neighbours (so its area and height are
 * lower bounds), and the features say how many there were and where.
 */
import { describe, expect, it } from 'vitest';
import { measureBand } from '../../src/bands/band.js';
import { isBandwrightError } from '../../src/errors.js';
import { makeSpectrum, type Spectrum } from '../../src/spectrum/spectrum.js';

const STEP = 0.25;

/** An absorbance spectrum on 1900–2400 cm⁻¹ with NaN at the given wavenumbers. */
function spectrumOf(f: (x: number) => number, undefinedAt: readonly number[] = []): Spectrum {
  const n = Math.round((2400 - 1900) / STEP) + 1;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = 1900 + i * STEP;
    y[i] = undefinedAt.includes(x[i] as number) ? Number.NaN : f(x[i] as number);
  }
  return makeSpectrum({
    x,
    y,
    yKind: 'absorbance',
    metadata: { source: 'cell.jdx', saturatedPoints: undefinedAt.length },
  });
}

// A Gaussian of height h and standard deviation s has area h·s·√(2π) (analytic; common practice).
const band = (x: number) => 2 * Math.exp(-0.5 * ((x - 2143) / 12) ** 2);
const baseline = (x: number) => 0.05 + 1e-4 * (x - 2000);
const spec = {
  windows: [
    [1960, 2000],
    [2290, 2330],
  ] as [number, number][],
  order: 1,
};
const BAND: [number, number] = [2040, 2245];

describe('measureBand with saturated points', () => {
  it('bridges points in the band linearly: the area is the trapezoid over the bridged values, a lower bound', () => {
    const top = [2142.5, 2142.75, 2143, 2143.25, 2143.5];
    const whole = measureBand(
      spectrumOf((x) => band(x) + baseline(x)),
      BAND,
      spec,
    );
    const saturated = measureBand(
      spectrumOf((x) => band(x) + baseline(x), top),
      BAND,
      spec,
    );
    expect(saturated.undefinedPoints).toEqual({ points: 5, runs: [[2142.5, 2143.5]] });
    expect(saturated.baseline.undefinedPoints).toBeUndefined();
    // The cap of a concave peak lies above its chord: bridging loses area and height.
    expect(saturated.area).toBeLessThan(whole.area);
    expect(saturated.height).toBeLessThan(whole.height);
    // The loss is the cap over the chord from 2142.25 to 2143.75: ∫(g − chord) by the trapezoid rule on
    // the grid is Σ over the 5 inner points of 0.25·(g − chord) (arithmetic: chord exact at the ends).
    const g = (x: number) => band(x);
    const chord = (x: number) => g(2142.25) + ((g(2143.75) - g(2142.25)) * (x - 2142.25)) / 1.5;
    const lost = top.reduce((sum, x) => sum + STEP * (g(x) - chord(x)), 0);
    expect(whole.area - saturated.area).toBeCloseTo(lost, 10);
  });

  it('leaves saturated points in a baseline window out of the fit: a straight baseline is still exact', () => {
    const features = measureBand(
      spectrumOf((x) => band(x) + baseline(x), [1970, 1970.25]),
      BAND,
      spec,
    );
    expect(features.baseline.undefinedPoints).toEqual({ points: 2, runs: [[1970, 1970.25]] });
    expect(features.undefinedPoints).toBeUndefined();
    expect(features.baseline.rms_AU).toBeLessThan(1e-12);
    // 40 cm⁻¹ at 0.25 spacing, ends included: 161 points per window, 2 left out (arithmetic).
    expect(features.baseline.points).toBe(161 + 161 - 2);
    const analytic = 2 * 12 * Math.sqrt(2 * Math.PI);
    expect(Math.abs(features.area - analytic) / analytic).toBeLessThan(1e-6);
  });

  it('counts a saturated point just outside the band: it enters through the interpolated end value', () => {
    const features = measureBand(
      spectrumOf((x) => band(x) + baseline(x), [2039.75]),
      [2039.9, 2245],
      spec,
    );
    expect(features.undefinedPoints).toEqual({ points: 1, runs: [[2039.75, 2039.75]] });
    expect(Number.isFinite(features.area)).toBe(true);
  });

  it('refuses a band whose saturated points run to the end of the scan (nothing to bridge from)', () => {
    const edge = [2399.5, 2399.75, 2400];
    try {
      measureBand(
        spectrumOf((x) => band(x) + baseline(x), edge),
        [2300, 2400],
        { windows: [] },
      );
      throw new Error('expected an error');
    } catch (error) {
      expect(isBandwrightError(error, 'WINDOW')).toBe(true);
      expect((error as Error).message).toMatch(
        /cell\.jdx: band 2300–2400 cm⁻¹ holds 3 saturated points at 2399\.5–2400 cm⁻¹ that reach the end of the scan/,
      );
    }
  });

  it('refuses a baseline window left with too few defined points, saying how many were saturated', () => {
    const window: [number, number][] = [[1960, 1960.5]];
    expect(() =>
      measureBand(
        spectrumOf((x) => band(x) + baseline(x), [1960, 1960.25]),
        BAND,
        { windows: window, order: 1 },
      ),
    ).toThrow(
      /hold 1 point\(s\) besides 2 saturated points at 1960–1960\.25 cm⁻¹, an order-1 baseline needs at least 2/,
    );
  });
});
