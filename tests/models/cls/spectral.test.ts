/**
 * Spectral CLS: recovery, invariants, refusals and validation.
 *
 * Data: synthetic, known truth (tests/helpers/synthetic-bands.ts). The model is the K-matrix
 * method of DESIGN §3 (classical least squares, Haaland & Easterling, Applied Spectroscopy 34
 * (1980) 539 — from memory); here the checks are against the generating truth, not a library.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fitCls, predictCls, type ClsData, type ClsModel } from '../../../src/models/cls/spectral.js';
import { isBandwrightError } from '../../../src/errors.js';
import {
  correlatedNoise,
  cosine,
  gaussianBand,
  mixtureDesign,
  normalGenerator,
  overlappingMixture,
  plus,
  withLinearBaseline,
} from '../../helpers/synthetic-bands.js';

const scenario = overlappingMixture();
const { grid } = scenario;
const channelCount = grid.length;

function noisyStandards(options: {
  seed: number;
  rms: number;
  count?: number;
  phi?: readonly number[];
}): ClsData {
  const normal = normalGenerator(options.seed);
  const concentrations = mixtureDesign(options.count ?? 10);
  const phi = options.phi ?? concentrations.map(() => 1);
  const spectra = concentrations.map((c, i) => {
    const clean = withLinearBaseline(
      scenario.spectrumOf(c, phi[i % phi.length]),
      grid,
      0.02 * normal(),
      2e-5 * normal(),
    );
    return options.rms > 0
      ? plus(clean, correlatedNoise(channelCount, { rms: options.rms, halfWidth: 2, normal }))
      : clean;
  });
  return {
    channels: grid,
    spectra,
    concentrations,
    phi: concentrations.map((_, i) => phi[i % phi.length]!),
    components: scenario.components,
  };
}

function expectSingular(action: () => unknown, names: readonly string[]): string {
  try {
    action();
  } catch (error) {
    expect(isBandwrightError(error, 'SINGULAR'), `expected SINGULAR, got ${String(error)}`).toBe(true);
    const message = (error as Error).message;
    for (const name of names) expect(message, message).toContain(name);
    return message;
  }
  throw new Error('expected a SINGULAR error, none was thrown');
}

describe('fitCls / predictCls: recovery (synthetic, known truth)', () => {
  it('the scenario really has strongly overlapping bands', () => {
    // CO and N2O pure spectra share most of their shape: cosine of the angle > 0.7.
    const overlap = cosine(scenario.pure[0]!, scenario.pure[1]!);
    expect(overlap, `cosine(CO, N2O) = ${overlap}`).toBeGreaterThan(0.7);
  });

  it('recovers each gas within 2 % (or 0.5 ppm) with overlapping bands and an interferent, and does not report the interferent', () => {
    const model = fitCls(noisyStandards({ seed: 11, rms: 1e-3 }), { baselineOrder: 1 });
    const normal = normalGenerator(99);
    const truths = [
      [80, 40, 3000],
      [150, 10, 4500],
      [5, 90, 2500],
    ];
    for (const truth of truths) {
      const sample = plus(
        withLinearBaseline(scenario.spectrumOf(truth), grid, 0.05, -3e-5),
        correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal }),
      );
      const result = predictCls(model, sample, { phi: 1 });
      expect(result.estimates.map((e) => e.name)).toEqual(['CO', 'N2O']);
      expect(result.interferents.map((e) => e.name)).toEqual(['H2O']);
      result.estimates.forEach((estimate, j) => {
        const tolerance = Math.max(0.02 * truth[j]!, 0.5);
        expect(
          Math.abs(estimate.value - truth[j]!),
          `${estimate.name}: truth ${truth[j]}, got ${estimate.value}, tolerance ${tolerance}`,
        ).toBeLessThanOrEqual(tolerance);
        expect(estimate.low).toBeLessThan(estimate.value);
        expect(estimate.high).toBeGreaterThan(estimate.value);
        expect(estimate.se).toBeGreaterThan(0);
      });
      expect(result.flags).toEqual([]);
    }
  });

  it('fit-then-predict on noise-free standards returns the truth (property, fast-check seed 7)', () => {
    const model = fitCls(noisyStandards({ seed: 1, rms: 0 }), { baselineOrder: 1 });
    fc.assert(
      fc.property(
        fc.tuple(
          fc.double({ min: 0, max: 250, noNaN: true }),
          fc.double({ min: 0, max: 120, noNaN: true }),
          fc.double({ min: 0, max: 6000, noNaN: true }),
        ),
        (truth) => {
          const result = predictCls(model, scenario.spectrumOf(truth), { phi: 1 });
          const values = [...result.estimates, ...result.interferents].map((e) => e.value);
          values.forEach((value, j) => {
            // Tolerance: double-precision round-off relative to the largest concentration of the range.
            expect(
              Math.abs(value - truth[j]!),
              `component ${j}: truth ${truth[j]}, got ${value}`,
            ).toBeLessThanOrEqual(1e-8 * [250, 120, 6000][j]!);
          });
        },
      ),
      { seed: 7, numRuns: 50 },
    );
  });

  it('scales with φ: standards at several φ, a sample at φ = 2.5 predicted with phi 2.5 gives its own concentrations', () => {
    // Beer–Lambert: absorbance ∝ c·φ with φ = (L/L_ref)(P/P_ref)(T_ref/T) (DESIGN §3).
    const model = fitCls(noisyStandards({ seed: 2, rms: 0, phi: [0.8, 1, 1.25, 2] }), { baselineOrder: 1 });
    const truth = [60, 30, 2000];
    const atPhi = predictCls(model, scenario.spectrumOf(truth, 2.5), { phi: 2.5 });
    [...atPhi.estimates, ...atPhi.interferents].forEach((estimate, j) => {
      expect(Math.abs(estimate.value - truth[j]!), `${estimate.name}`).toBeLessThanOrEqual(1e-8 * truth[j]!);
    });
    // The same spectrum read as φ = 1 gives 2.5 times the concentration.
    const asUnity = predictCls(model, scenario.spectrumOf(truth, 2.5), { phi: 1 });
    asUnity.estimates.forEach((estimate, j) => {
      expect(estimate.value / atPhi.estimates[j]!.value).toBeCloseTo(2.5, 9);
    });
  });

  it('φ also scales the standard error and interval of a noisy sample', () => {
    const model = fitCls(noisyStandards({ seed: 3, rms: 1e-3 }), { baselineOrder: 1 });
    const normal = normalGenerator(5);
    const sample = plus(
      scenario.spectrumOf([50, 50, 3000], 2),
      correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal }),
    );
    const two = predictCls(model, sample, { phi: 2 });
    const one = predictCls(model, sample, { phi: 1 });
    two.estimates.forEach((estimate, j) => {
      const reference = one.estimates[j]!;
      expect(estimate.value).toBeCloseTo(reference.value / 2, 10);
      expect(estimate.se).toBeCloseTo(reference.se / 2, 10);
      expect(estimate.high - estimate.low).toBeCloseTo((reference.high - reference.low) / 2, 10);
    });
  });
});

describe('baseline invariance (property, fast-check seed 42; synthetic, known truth)', () => {
  const model = fitCls(noisyStandards({ seed: 4, rms: 1e-3 }), { baselineOrder: 1 });
  const normal = normalGenerator(8);
  const sample = plus(
    scenario.spectrumOf([70, 45, 3500]),
    correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal }),
  );
  const reference = predictCls(model, sample, { phi: 1 });

  it('an added offset and slope change neither the estimates nor the residual', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -1, max: 1, noNaN: true }),
        fc.double({ min: -2e-3, max: 2e-3, noNaN: true }),
        (offset, slope) => {
          const shifted = withLinearBaseline(sample, grid, offset, slope);
          const result = predictCls(model, shifted, { phi: 1 });
          result.estimates.forEach((estimate, j) => {
            const expected = reference.estimates[j]!;
            // Tolerance: round-off of removing a baseline up to 1 AU from a 1e-3 AU-noise spectrum.
            expect(
              Math.abs(estimate.value - expected.value),
              `offset ${offset}, slope ${slope}: ${estimate.name}`,
            ).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(expected.value)));
            expect(Math.abs(estimate.se - expected.se)).toBeLessThanOrEqual(1e-7 * expected.se);
          });
          expect(Math.abs(result.residualRms - reference.residualRms)).toBeLessThanOrEqual(1e-9);
        },
      ),
      { seed: 42, numRuns: 40 },
    );
  });

  it('with two regions, each region’s own offset and slope are removed separately', () => {
    const regionOf = Float64Array.from(grid, (x) => (x < 2150 ? 0 : 1));
    const data = { ...noisyStandards({ seed: 5, rms: 1e-3 }), regionOf };
    const twoRegion = fitCls(data, { baselineOrder: 1 });
    const base = predictCls(twoRegion, sample, { phi: 1 });
    fc.assert(
      fc.property(
        fc.double({ min: -1, max: 1, noNaN: true }),
        fc.double({ min: -1, max: 1, noNaN: true }),
        fc.double({ min: -2e-3, max: 2e-3, noNaN: true }),
        (first, second, slope) => {
          const stepped = Float64Array.from(
            sample,
            (value, j) =>
              value +
              (regionOf[j] === 0 ? first + slope * (grid[j]! - 2075) : second - slope * (grid[j]! - 2200)),
          );
          const result = predictCls(twoRegion, stepped, { phi: 1 });
          result.estimates.forEach((estimate, j) => {
            expect(Math.abs(estimate.value - base.estimates[j]!.value)).toBeLessThanOrEqual(
              1e-7 * Math.max(1, Math.abs(base.estimates[j]!.value)),
            );
          });
        },
      ),
      { seed: 42, numRuns: 25 },
    );
  });

  it('an offset step between two regions biases a one-region model but not a two-region one (the basis really is per region)', () => {
    const regionOf = Float64Array.from(grid, (x) => (x < 2150 ? 0 : 1));
    const stepped = Float64Array.from(sample, (value, j) => value + (regionOf[j] === 0 ? 0 : 0.2));
    const one = predictCls(model, stepped, { phi: 1 });
    expect(Math.abs(one.estimates[0]!.value - reference.estimates[0]!.value)).toBeGreaterThan(1);
    expect(one.flags).toContain('poor-fit');
  });
});

describe('extrapolation (synthetic, known truth)', () => {
  it('flags a gas above the calibrated range, not one inside it', () => {
    const model = fitCls(noisyStandards({ seed: 14, rms: 1e-3 }), { baselineOrder: 1 });
    const result = predictCls(model, scenario.spectrumOf([400, 40, 3000]), { phi: 1 });
    expect(result.estimates[0]!.flags).toEqual(['extrapolated']);
    expect(result.estimates[1]!.flags).toEqual([]);
    // The range is judged on φ-scaled values (what the spectrum shows): a 150 ppm spectrum read
    // at φ = 0.5 reports 300 ppm, yet its absorbance lies inside the calibrated 0–200 ppm·φ range.
    const scaled = predictCls(model, scenario.spectrumOf([150, 40, 3000]), { phi: 0.5 });
    expect(scaled.estimates[0]!.value).toBeCloseTo(300, 0);
    expect(scaled.estimates[0]!.flags).toEqual([]);
  });
});

describe('poor fit (synthetic, known truth)', () => {
  const model = fitCls(noisyStandards({ seed: 6, rms: 1e-3 }), { baselineOrder: 1 });
  const normal = normalGenerator(17);

  it('a sample with an absorber missing from the method is flagged poor-fit; clean samples are not', () => {
    // Unmodelled band: a Gaussian at 2160 cm⁻¹, peak 0.02 AU (20 times the noise RMS).
    const stranger = gaussianBand(grid, { centre: 2160, hwhm: 4, peak: 0.02 });
    const truth = [80, 40, 3000];
    const contaminated = plus(
      plus(scenario.spectrumOf(truth), stranger),
      correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal }),
    );
    const flagged = predictCls(model, contaminated, { phi: 1 });
    expect(flagged.flags, `fit ratio ${flagged.fitRatio}, limit ${flagged.fitRatioLimit}`).toEqual([
      'poor-fit',
    ]);
    expect(flagged.residualRms).toBeGreaterThan(2 * model.calibration.residualRms);
    for (let repeat = 0; repeat < 20; repeat++) {
      const clean = plus(
        scenario.spectrumOf(truth),
        correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal }),
      );
      const result = predictCls(model, clean, { phi: 1 });
      expect(
        result.flags,
        `repeat ${repeat}: fit ratio ${result.fitRatio}, limit ${result.fitRatioLimit}`,
      ).toEqual([]);
    }
  });

  it('the residual spectrum shows the missing absorber where it is', () => {
    const stranger = gaussianBand(grid, { centre: 2160, hwhm: 4, peak: 0.02 });
    const result = predictCls(model, plus(scenario.spectrumOf([80, 40, 3000]), stranger), { phi: 1 });
    let peakIndex = 0;
    result.residual.forEach((value, j) => {
      if (value > result.residual[peakIndex]!) peakIndex = j;
    });
    expect(Math.abs(grid[peakIndex]! - 2160)).toBeLessThanOrEqual(1);
  });
});

describe('refusals: gases that cannot be separated (synthetic, known truth)', () => {
  it('collinear standards (CO and N2O always in the ratio 2:1) are refused naming both gases', () => {
    const data = noisyStandards({ seed: 7, rms: 1e-3 });
    const concentrations = data.concentrations.map((c) => [c[0]!, c[0]! / 2, c[2]!]);
    const spectra = concentrations.map((c) =>
      plus(
        scenario.spectrumOf(c),
        correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal: normalGenerator(3) }),
      ),
    );
    const message = expectSingular(() => fitCls({ ...data, concentrations, spectra }), ['CO', 'N2O']);
    expect(message).not.toContain('H2O');
  });

  it('nearly collinear standards beyond the condition limit are refused too', () => {
    const data = noisyStandards({ seed: 7, rms: 1e-3 });
    const concentrations = data.concentrations.map((c, i) => [
      c[0]!,
      c[0]! / 2 + (i % 2 === 0 ? 1e-4 : -1e-4),
      c[2]!,
    ]);
    expectSingular(() => fitCls({ ...data, concentrations }), ['CO', 'N2O']);
  });

  it('coinciding bands (N2O with exactly the shape of CO) are refused naming both gases', () => {
    const concentrations = mixtureDesign(10);
    const pure = [scenario.pure[0]!, scenario.pure[0]!.map((v) => 1.3 * v), scenario.pure[2]!];
    const spectra = concentrations.map((c) =>
      Float64Array.from(grid, (_, j) => c[0]! * pure[0]![j]! + c[1]! * pure[1]![j]! + c[2]! * pure[2]![j]!),
    );
    const message = expectSingular(
      () =>
        fitCls({
          channels: grid,
          spectra,
          concentrations,
          phi: concentrations.map(() => 1),
          components: scenario.components,
        }),
      ['CO', 'N2O'],
    );
    expect(message).toMatch(/coincide/);
  });

  it('coinciding bands are refused also when noise keeps the fitted pure spectra from being exactly parallel', () => {
    const concentrations = mixtureDesign(10);
    const normal = normalGenerator(21);
    const pure = [scenario.pure[0]!, scenario.pure[0]!.map((v) => 1.3 * v), scenario.pure[2]!];
    const spectra = concentrations.map((c) =>
      plus(
        Float64Array.from(grid, (_, j) => c[0]! * pure[0]![j]! + c[1]! * pure[1]![j]! + c[2]! * pure[2]![j]!),
        correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal }),
      ),
    );
    const message = expectSingular(
      () =>
        fitCls({
          channels: grid,
          spectra,
          concentrations,
          phi: concentrations.map(() => 1),
          components: scenario.components,
        }),
      ['CO', 'N2O'],
    );
    expect(message).toMatch(/coincide/);
  });

  it('a component present in no standard is refused by name', () => {
    const data = noisyStandards({ seed: 7, rms: 1e-3 });
    const concentrations = data.concentrations.map((c) => [c[0]!, 0, c[2]!]);
    expectSingular(() => fitCls({ ...data, concentrations }), ['N2O']);
  });
});

describe('model contents and purity', () => {
  it('is plain JSON: a JSON round trip gives an equal object that predicts identically', () => {
    const model = fitCls(noisyStandards({ seed: 9, rms: 1e-3 }), { baselineOrder: 2 });
    const copy = JSON.parse(JSON.stringify(model)) as ClsModel;
    expect(copy).toEqual(model);
    const sample = plus(
      scenario.spectrumOf([30, 60, 4000]),
      correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal: normalGenerator(1) }),
    );
    const a = predictCls(model, sample, { phi: 1 });
    const b = predictCls(copy, sample, { phi: 1 });
    expect(b.estimates).toEqual(a.estimates);
    expect(Array.from(b.residual)).toEqual(Array.from(a.residual));
  });

  it('records conditioning, cross-validation and the noise model', () => {
    const model = fitCls(noisyStandards({ seed: 9, rms: 1e-3 }), { baselineOrder: 1 });
    expect(model.calibration.conditionConcentrations).toBeGreaterThanOrEqual(1);
    expect(model.calibration.conditionPureSpectra).toBeGreaterThanOrEqual(1);
    expect(model.crossValidation.predictions).toBe(10);
    model.crossValidation.rmsecv.forEach((value) => expect(value).toBeGreaterThan(0));
    // White noise smoothed by a triangular kernel of half-width 2 (weights 1 2 3 2 1) has
    // lag-1 autocorrelation (2+6+6+2)/19 = 0.842 (computed from the kernel).
    expect(model.noiseCorrelation[1]).toBeCloseTo(16 / 19, 1);
    expect(model.components).toEqual(scenario.components);
  });

  it('neither fitCls nor predictCls modifies its inputs', () => {
    const data = noisyStandards({ seed: 10, rms: 1e-3 });
    const background = gaussianBand(grid, { centre: 2050, hwhm: 20, peak: 0.01 });
    const snapshot = JSON.stringify({
      ...data,
      channels: Array.from(grid),
      spectra: data.spectra.map((s) => Array.from(s)),
      background: Array.from(background),
    });
    const options = { baselineOrder: 1, background, secondOrder: ['CO'] };
    const optionsSnapshot = JSON.stringify({ ...options, background: Array.from(background) });
    const model = fitCls(data, options);
    expect(
      JSON.stringify({
        ...data,
        channels: Array.from(grid),
        spectra: data.spectra.map((s) => Array.from(s)),
        background: Array.from(background),
      }),
    ).toBe(snapshot);
    expect(JSON.stringify({ ...options, background: Array.from(background) })).toBe(optionsSnapshot);
    const modelSnapshot = JSON.stringify(model);
    const sample = scenario.spectrumOf([10, 20, 3000]);
    const sampleSnapshot = Array.from(sample);
    predictCls(model, sample, { phi: 1.5 });
    expect(Array.from(sample)).toEqual(sampleSnapshot);
    expect(JSON.stringify(model)).toBe(modelSnapshot);
  });

  it('a background spectrum with a different amount in every spectrum is absorbed by its free coefficient', () => {
    // Background: a broad feature (e.g. a window deposit) whose amount varies scan to scan.
    const background = gaussianBand(grid, { centre: 2140, hwhm: 30, peak: 0.01 });
    const concentrations = mixtureDesign(10);
    const normal = normalGenerator(12);
    const spectra = concentrations.map((c) =>
      plus(
        plus(
          scenario.spectrumOf(c),
          background.map((v) => v * (1 + normal())),
        ),
        correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal }),
      ),
    );
    const data = {
      channels: grid,
      spectra,
      concentrations,
      phi: concentrations.map(() => 1),
      components: scenario.components,
    };
    const withBackground = fitCls(data, { background });
    const truth = [80, 40, 3000];
    const sample = plus(
      plus(
        scenario.spectrumOf(truth),
        background.map((v) => 2.5 * v),
      ),
      correlatedNoise(channelCount, { rms: 1e-3, halfWidth: 2, normal }),
    );
    const result = predictCls(withBackground, sample, { phi: 1 });
    result.estimates.forEach((estimate, j) => {
      expect(Math.abs(estimate.value - truth[j]!), `${estimate.name}: ${estimate.value}`).toBeLessThanOrEqual(
        Math.max(0.02 * truth[j]!, 0.5),
      );
    });
    expect(result.flags).toEqual([]);
  });
});

describe('input validation names the standard, channel or component', () => {
  const base = noisyStandards({ seed: 13, rms: 1e-3 });
  const cases: Array<{
    name: string;
    data?: Partial<ClsData>;
    options?: Parameters<typeof fitCls>[1];
    code: string;
    pattern: RegExp;
  }> = [
    {
      name: 'non-finite absorbance',
      data: {
        spectra: base.spectra.map((s, i) =>
          i === 3 ? Float64Array.from(s, (v, j) => (j === 17 ? Number.NaN : v)) : s,
        ),
      },
      code: 'INVALID_VALUE',
      pattern: /spectra\[3\] \(standard 4\) channel 17 = NaN, must be a finite number/,
    },
    {
      name: 'wrong spectrum length',
      data: { spectra: base.spectra.map((s, i) => (i === 2 ? Array.from(s).slice(1) : s)) },
      code: 'INVALID_VALUE',
      pattern: /spectra\[2\] \(standard 3\) has 500 channels, must have 501/,
    },
    {
      name: 'negative concentration',
      data: { concentrations: base.concentrations.map((c, i) => (i === 1 ? [c[0]!, -5, c[2]!] : c)) },
      code: 'INVALID_VALUE',
      pattern: /concentrations\[1\]\[1\] \(standard 2, N2O\) = -5, must be a finite number >= 0 ppm/,
    },
    {
      name: 'φ of zero',
      data: { phi: base.concentrations.map((_, i) => (i === 4 ? 0 : 1)) },
      code: 'INVALID_VALUE',
      pattern: /phi\[4\] \(standard 5\) = 0, must be a finite number > 0/,
    },
    {
      name: 'labels in messages',
      data: {
        phi: base.concentrations.map((_, i) => (i === 4 ? -1 : 1)),
        standardLabels: base.concentrations.map((_, i) => `std-${i + 1}.jdx`),
      },
      code: 'INVALID_VALUE',
      pattern: /standard 5 \(std-5\.jdx\)\) = -1/,
    },
    {
      name: 'duplicate component',
      data: { components: [scenario.components[0]!, scenario.components[0]!, scenario.components[2]!] },
      code: 'INVALID_VALUE',
      pattern: /"CO" appears twice/,
    },
    {
      name: 'too few standards',
      data: {
        spectra: base.spectra.slice(0, 3),
        concentrations: base.concentrations.slice(0, 3),
        phi: [1, 1, 1],
      },
      code: 'INSUFFICIENT_DATA',
      pattern: /3 standard\(s\) for 3 model term\(s\).*at least 4/,
    },
    {
      name: 'unknown second-order gas',
      options: { secondOrder: ['SO2'] },
      code: 'INVALID_VALUE',
      pattern: /secondOrder names "SO2", which is not among the components \(CO, N2O, H2O\)/,
    },
    {
      name: 'baseline order 4',
      options: { baselineOrder: 4 },
      code: 'INVALID_VALUE',
      pattern: /baselineOrder = 4, must be an integer 0…3/,
    },
    {
      name: 'level 95',
      options: { level: 95 },
      code: 'INVALID_VALUE',
      pattern: /level = 95, must be strictly between 0 and 1/,
    },
    {
      name: 'background that is a baseline',
      options: { background: new Float64Array(channelCount).fill(0.1) },
      code: 'INVALID_VALUE',
      pattern: /background spectrum is a polynomial/,
    },
  ];
  for (const testCase of cases) {
    it(testCase.name, () => {
      try {
        fitCls({ ...base, ...testCase.data }, testCase.options);
      } catch (error) {
        expect(isBandwrightError(error, testCase.code as never), String(error)).toBe(true);
        expect((error as Error).message).toMatch(testCase.pattern);
        return;
      }
      throw new Error('no error thrown');
    });
  }

  it('predictCls refuses a spectrum of the wrong length, a NaN, and φ ≤ 0', () => {
    const model = fitCls(base);
    expect(() => predictCls(model, new Float64Array(10), { phi: 1 })).toThrow(
      /sample has 10 channels, the model was fitted on 501/,
    );
    const withNaN = scenario.spectrumOf([1, 1, 1]);
    withNaN[5] = Number.POSITIVE_INFINITY;
    expect(() => predictCls(model, withNaN, { phi: 1 })).toThrow(
      /sample channel 5 = Infinity, must be a finite number/,
    );
    expect(() => predictCls(model, scenario.spectrumOf([1, 1, 1]), { phi: 0 })).toThrow(
      /phi = 0, must be a finite number > 0/,
    );
    expect(() => predictCls(model, scenario.spectrumOf([1, 1, 1]), { phi: 1, level: 1 })).toThrow(
      /level = 1/,
    );
  });
});
