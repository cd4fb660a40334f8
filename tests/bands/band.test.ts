import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { evaluateBaseline, fitBaseline, measureBand } from '../../src/bands/band.js';
import { assertBandWindows } from '../../src/bands/windows.js';
import { BandwrightError } from '../../src/errors.js';
import { makeSpectrum, type Spectrum } from '../../src/spectrum/spectrum.js';

/** An absorbance spectrum on a uniform grid from a function of wavenumber. */
function spectrumOf(f: (x: number) => number, from = 1900, to = 2400, step = 0.25): Spectrum {
  const n = Math.round((to - from) / step) + 1;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = from + i * step;
    y[i] = f(x[i] as number);
  }
  return makeSpectrum({ x, y, yKind: 'absorbance', metadata: { source: 'synthetic' } });
}

// A Gaussian of height h and standard deviation s has area h·s·√(2π) (analytic; common practice).
const gaussian = (centre: number, height: number, sd: number) => (x: number) =>
  height * Math.exp(-0.5 * ((x - centre) / sd) ** 2);

describe('measureBand', () => {
  it('integrates a Gaussian band on a sloped baseline to its analytic area', () => {
    const band = gaussian(2143, 0.4, 12);
    const spectrum = spectrumOf((x) => band(x) + 0.05 + 1e-4 * (x - 2000));
    const features = measureBand(spectrum, [2040, 2245], {
      windows: [
        [1960, 2000],
        [2290, 2330],
      ],
      order: 1,
    });
    const analytic = 0.4 * 12 * Math.sqrt(2 * Math.PI);
    // Tails beyond ±8.5 s hold < 1e-16 of the area; the trapezoid rule on a 0.25 cm⁻¹ grid is exact to ~1e-10 here.
    expect(Math.abs(features.area - analytic) / analytic).toBeLessThan(1e-6);
    expect(features.height).toBeCloseTo(0.4, 6);
    expect(features.heightPosition_cm).toBe(2143);
    expect(features.baseline.rms_AU).toBeLessThan(1e-12);
  });

  it('does not jump when the band edges cross grid points (interpolated end points)', () => {
    const spectrum = spectrumOf((x) => 0.01 * (x - 2000));
    // A linear integrand is integrated exactly by the trapezoid rule with interpolated ends.
    fc.assert(
      fc.property(
        fc.double({ min: 2001, max: 2100, noNaN: true }),
        fc.double({ min: 1, max: 150, noNaN: true }),
        (low, width) => {
          const high = low + width;
          const features = measureBand(spectrum, [low, high], { windows: [] });
          const exact = 0.005 * ((high - 2000) ** 2 - (low - 2000) ** 2);
          return Math.abs(features.area - exact) <= 1e-9 * Math.max(1, Math.abs(exact));
        },
      ),
      { seed: 42, numRuns: 300 },
    );
  });

  it('removes any polynomial baseline of the fitted order exactly (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -0.5, max: 0.5, noNaN: true }), { minLength: 3, maxLength: 3 }),
        (coefficients) => {
          const band = gaussian(2143, 0.2, 10);
          const [c0, c1, c2] = coefficients as [number, number, number];
          const t = (x: number) => (x - 2150) / 200;
          const spectrum = spectrumOf((x) => band(x) + c0 + c1 * t(x) + c2 * t(x) ** 2);
          const features = measureBand(spectrum, [2070, 2215], {
            windows: [
              [1950, 2020],
              [2270, 2350],
            ],
            order: 2,
          });
          const clean = measureBand(spectrumOf(band), [2070, 2215], {
            windows: [
              [1950, 2020],
              [2270, 2350],
            ],
            order: 2,
          });
          return Math.abs(features.area - clean.area) < 1e-8;
        },
      ),
      { seed: 7, numRuns: 100 },
    );
  });

  it('evaluates the fitted baseline where it was fitted', () => {
    const spectrum = spectrumOf((x) => 0.2 + 0.001 * (x - 2100));
    const baseline = fitBaseline(spectrum, [2100, 2200], {
      windows: [
        [2000, 2050],
        [2250, 2300],
      ],
      order: 1,
    });
    expect(evaluateBaseline(baseline, 2150)).toBeCloseTo(0.25, 12);
  });

  it('refuses a band outside the scan, naming the window and the range', () => {
    const spectrum = spectrumOf(() => 0, 2000, 2100);
    expect(() => measureBand(spectrum, [2050, 2200], { windows: [] })).toThrow(
      /band 2050–2200 cm⁻¹ lies outside the scan's range 2000–2100 cm⁻¹/,
    );
  });

  it('refuses a baseline window outside the scan', () => {
    const spectrum = spectrumOf(() => 0, 2000, 2100);
    expect(() => measureBand(spectrum, [2040, 2060], { windows: [[1980, 2010]] })).toThrow(
      /baseline window 1 1980–2010 cm⁻¹ lies outside/,
    );
  });

  it('refuses non-absorbance input', () => {
    const s = spectrumOf(() => 0.5);
    const transmittance = { ...s, yKind: 'transmittance' as const };
    expect(() => measureBand(transmittance, [2040, 2060], { windows: [] })).toThrow(/need absorbance/);
  });
});

describe('assertBandWindows', () => {
  it('refuses a baseline window overlapping the band', () => {
    expect(() => assertBandWindows([2040, 2245], [[2000, 2050]], 'method')).toThrow(BandwrightError);
    expect(() => assertBandWindows([2040, 2245], [[2000, 2050]], 'method')).toThrow(
      /overlaps the band 2040–2245/,
    );
  });
  it('refuses an inverted window', () => {
    expect(() => assertBandWindows([2245, 2040], [], 'method')).toThrow(/inverted/);
  });
  it('refuses overlapping baseline windows', () => {
    expect(() =>
      assertBandWindows(
        [2100, 2200],
        [
          [2000, 2050],
          [2040, 2060],
        ],
        'method',
      ),
    ).toThrow(/overlap/);
  });
});
