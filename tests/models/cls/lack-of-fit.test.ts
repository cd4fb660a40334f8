/**
 * Separation checks under lack of fit, and the lack-of-fit diagnosis.
 *
 * Why (DESIGN §3, common practice): the instrument line shape acts on transmittance, so lines
 * narrower than the resolution saturate and a linear K-matrix leaves a residual that is lack of
 * fit, concentrated on the saturated lines, not noise spread over all channels. A check that
 * compares a weak gas's spectrum with the residual pooled over every channel then calls a gas
 * that absorbs clearly "noise"; the checks weight each channel by the residual level around it,
 * judge a second-order component on both its terms, and say when lack of fit is the cause.
 *
 * Data: the project's line-by-line simulator (`src/simulate/`: CO, CO2 and N2O lines from
 * molecular constants, Voigt profiles, triangular apodisation, seeded noise) in a 2 m cell at
 * 453.15 K and 0.5 cm⁻¹ (synthetic, known truth). Zero-gas standards give the noise alone.
 */
import { describe, expect, it } from 'vitest';
import { fitCls, predictCls, type ClsData, type ClsModel } from '../../../src/models/cls/spectral.js';
import { isBandwrightError } from '../../../src/errors.js';
import { simulateSpectrum } from '../../../src/simulate/index.js';

const NOISE_AU = 3e-4;

function simulator(range: readonly [number, number]) {
  const scan = (gases: Record<string, number>, seed: number, noise = NOISE_AU): Float64Array =>
    simulateSpectrum({
      pathLength_m: 2,
      temperature_K: 453.15,
      pressure_kPa: 101.325,
      resolution_cm: 0.5,
      apodization: 'triangular',
      range_cm: range,
      noiseRms_AU: noise,
      seed,
      gases: Object.entries(gases)
        .filter(([, ppm]) => ppm > 0)
        .map(([name, ppm]) => ({ name, ppm })),
    }).spectrum.y;
  const x = simulateSpectrum({ gases: [], range_cm: range, resolution_cm: 0.5, temperature_K: 453.15 })
    .spectrum.x;
  return { scan, x };
}

/** Channels of `x` inside the regions, with their region labels. */
function channelsIn(x: Float64Array, regions: readonly (readonly [number, number])[]) {
  const picked: number[] = [];
  const regionOf: number[] = [];
  x.forEach((wavenumber, j) => {
    const r = regions.findIndex(([low, high]) => wavenumber >= low && wavenumber <= high);
    if (r >= 0) {
      picked.push(j);
      regionOf.push(r);
    }
  });
  return {
    grid: Float64Array.from(picked, (j) => x[j]!),
    regionOf,
    pick: (y: Float64Array) => Float64Array.from(picked, (j) => y[j]!),
  };
}

/** The signal ratio the earlier, pooled check used: ‖k_t‖² over s² (XᵀX)⁻¹_tt τ_B, one term alone. */
function pooledSingleTermRatio(model: ClsModel, term: number): number {
  const statistics = model.calibration;
  const baseCount = statistics.residualCount / (statistics.standards - model.terms.length);
  const energy = model.pureSpectra[term]!.reduce((sum, value) => sum + value * value, 0);
  return energy / (statistics.residualVariance * model.concentrationGramInverse[term]![term]! * baseCount);
}

function refusal(action: () => unknown): string {
  try {
    action();
  } catch (error) {
    expect(isBandwrightError(error, 'SINGULAR'), `expected SINGULAR, got ${String(error)}`).toBe(true);
    return (error as Error).message;
  }
  throw new Error('expected a SINGULAR refusal, the fit was accepted');
}

describe('a component with a second-order term is judged on both terms together (simulator, known truth)', () => {
  // CO2 ν3 P-branch lines at 2205–2240 cm⁻¹; standards zero twice and 8–12 %: over such levels
  // u and u² are nearly collinear, so neither term's pure spectrum alone is well determined.
  const { scan, x } = simulator([2190, 2260]);
  const { grid, pick } = channelsIn(x, [[2205, 2240]]);
  const levels = [0, 0, 8, 9, 10, 11, 12];
  const data: ClsData = {
    channels: grid,
    spectra: levels.map((pct, i) => pick(scan({ CO2: pct * 1e4 }, 300 + i))),
    concentrations: levels.map((pct) => [pct]),
    phi: levels.map(() => 1),
    components: [{ name: 'CO2', reported: true, unit: 'pct' }],
  };

  it('accepts the band (joint ratio far above 4) although its linear term alone reads below 4', () => {
    const model = fitCls(data, { secondOrder: ['CO2'] });
    const joint = model.calibration.signalRatio[0]!;
    const single = pooledSingleTermRatio(model, 0);
    expect(joint, `joint ${joint}, linear term alone ${single}`).toBeGreaterThan(20);
    expect(single, `linear term alone ${single}`).toBeLessThan(4);
    // The linear model sees the same band clearly: the second-order term does not hide it.
    expect(fitCls(data).calibration.signalRatio[0]!).toBeGreaterThan(20);
  });

  it('still refuses a second-order component that is absent from the spectra, by name', () => {
    const withAbsent: ClsData = {
      ...data,
      concentrations: levels.map((pct, i) => [pct, [0, 0, 40, 10, 30, 0, 20][i]!]),
      components: [...data.components, { name: 'CO', reported: true, unit: 'ppm' }],
    };
    // The CO standards above hold no CO: its pure spectrum is residual alone.
    const message = refusal(() => fitCls(withAbsent, { secondOrder: ['CO2', 'CO'] }));
    expect(message).toMatch(/pure spectrum of CO \(first and second order together\) is not distinguishable/);
    expect(message).toMatch(/does not absorb measurably/);
  });
});

describe('a weak gas away from saturated lines is not called noise because of their lack of fit (simulator, known truth)', () => {
  // CO modelled linearly over its strong lines 2080–2130 cm⁻¹ at 0–1000 ppm (2000 ppm·m): the
  // residual is lack of fit on CO's lines. CO2 at 0.5–2 % absorbs only in 2228–2250 cm⁻¹.
  const { scan, x } = simulator([2070, 2260]);
  const regions = [
    [2080, 2130],
    [2228, 2250],
  ] as const;
  const { grid, regionOf, pick } = channelsIn(x, regions);
  const design = [
    [0, 0],
    [0, 0],
    [250, 0],
    [500, 0],
    [1000, 0],
    [0, 5000],
    [0, 10000],
    [0, 20000],
    [500, 10000],
    [250, 20000],
    [1000, 5000],
  ];
  const data: ClsData = {
    channels: grid,
    regionOf,
    spectra: design.map(([co, co2], i) => pick(scan({ CO: co!, CO2: co2! }, 100 + i))),
    concentrations: design,
    phi: design.map(() => 1),
    components: [
      { name: 'CO', reported: true, unit: 'ppm' },
      { name: 'CO2', reported: false, unit: 'ppm' },
    ],
  };
  const linear = fitCls(data);
  const secondOrder = fitCls(data, { secondOrder: ['CO'] });

  it('accepts CO2: weighted by the local residual its ratio is above 4, where the pooled one (the earlier check) was below', () => {
    const weighted = linear.calibration.signalRatio[1]!;
    const pooled = pooledSingleTermRatio(linear, 1);
    expect(weighted, `weighted ${weighted}, pooled ${pooled}`).toBeGreaterThan(10);
    expect(pooled, `pooled ${pooled}`).toBeLessThan(4);
  });

  it('diagnoses the lack of fit: residual far above the zero-gas noise, removed by a second-order CO term, said in a warning', () => {
    const lackOfFit = linear.calibration.lackOfFit;
    expect(lackOfFit.blanks).toBe(2);
    // The blanks' noise is the simulator's 3e-4 AU (within 15 %: 2 blanks × ~280 channels).
    expect(Math.sqrt(lackOfFit.blankVariance!) / NOISE_AU).toBeGreaterThan(0.85);
    expect(Math.sqrt(lackOfFit.blankVariance!) / NOISE_AU).toBeLessThan(1.15);
    expect(lackOfFit.residualOverBlank!).toBeGreaterThan(100);
    expect(lackOfFit.residualOverBlank!).toBeGreaterThan(lackOfFit.residualOverBlankLimit!);
    const co = lackOfFit.secondOrderGains.find((gain) => gain.component === 'CO')!;
    expect(co.fStatistic).toBeGreaterThan(co.fLimit);
    expect(co.residualReduction).toBeGreaterThan(0.9);
    const co2 = lackOfFit.secondOrderGains.find((gain) => gain.component === 'CO2')!;
    expect(co2.fStatistic).toBeLessThan(co2.fLimit);
    expect(lackOfFit.detected).toBe(true);
    expect(linear.warnings.join('\n')).toMatch(
      /lack of fit: .* times the noise of the 2 zero-gas standard\(s\).*a second-order term would remove 9\d % of it for CO.*give CO a second-order term/,
    );
  });

  it('with the second-order CO term the residual falls by more than 10 times and CO is no longer a candidate', () => {
    const before = linear.calibration.lackOfFit.residualOverBlank!;
    const after = secondOrder.calibration.lackOfFit.residualOverBlank!;
    expect(after, `residual/noise variance ${before} → ${after}`).toBeLessThan(before / 10);
    expect(secondOrder.calibration.lackOfFit.secondOrderGains.map((gain) => gain.component)).not.toContain(
      'CO',
    );
    // CO2 is then estimated within its interval (truth 1.2 %).
    const sample = predictCls(secondOrder, pick(scan({ CO: 400, CO2: 12000 }, 7)), { phi: 1 });
    const estimate = sample.interferents[0]!;
    expect(estimate.low).toBeLessThanOrEqual(12000);
    expect(estimate.high).toBeGreaterThanOrEqual(12000);
  });

  it('still refuses a gas that does not absorb there, saying so even under lack of fit', () => {
    const withAbsent: ClsData = {
      ...data,
      concentrations: design.map((row, i) => [...row, [0, 0, 10, 0, 30, 20, 0, 10, 30, 0, 20][i]!]),
      components: [...data.components, { name: 'N2O', reported: true, unit: 'ppm' }],
    };
    const message = refusal(() => fitCls(withAbsent));
    expect(message).toMatch(/pure spectrum of N2O is not distinguishable from the calibration residual/);
    expect(message).toMatch(/not even after a second-order term for CO removes the lack of fit/);
    expect(message).toMatch(/does not absorb measurably/);
  });
});

describe('a weak gas under saturated lines is masked by lack of fit, and the refusal names the cure (simulator, known truth)', () => {
  // N2O at 1–4 ppm among CO's strong R-branch lines (2160–2230 cm⁻¹), CO linear at 0–1000 ppm.
  const { scan, x } = simulator([2150, 2240]);
  const { grid, pick } = channelsIn(x, [[2160, 2230]]);
  const design = [
    [0, 0],
    [0, 0],
    [250, 0],
    [500, 0],
    [1000, 0],
    [0, 1],
    [0, 2],
    [0, 4],
    [500, 2],
    [250, 4],
    [1000, 1],
  ];
  const data: ClsData = {
    channels: grid,
    spectra: design.map(([co, n2o], i) => pick(scan({ CO: co!, N2O: n2o! }, 100 + i))),
    concentrations: design,
    phi: design.map(() => 1),
    components: [
      { name: 'CO', reported: true, unit: 'ppm' },
      { name: 'N2O', reported: true, unit: 'ppm' },
    ],
  };

  it('refuses N2O as masked by lack of fit (not as noise) and says a second-order CO term makes it distinguishable', () => {
    const message = refusal(() => fitCls(data));
    expect(message).toMatch(/pure spectrum of N2O cannot be told from the calibration's lack of fit/);
    expect(message).toMatch(
      /with a second-order term for CO its signal ratio would be [\d.]+: give CO a second-order term/,
    );
    expect(message).not.toMatch(/calibration noise/);
  });

  it('with that term the calibration is accepted and recovers N2O within its interval', () => {
    const model = fitCls(data, { secondOrder: ['CO'] });
    expect(model.calibration.signalRatio[1]!).toBeGreaterThan(4);
    const estimate = predictCls(model, pick(scan({ CO: 300, N2O: 3 }, 9)), { phi: 1 }).estimates[1]!;
    expect(estimate.low).toBeLessThanOrEqual(3);
    expect(estimate.high).toBeGreaterThanOrEqual(3);
  });
});

describe('no lack of fit on a clean calibration (simulator, known truth)', () => {
  it('weak CO lines within their linear range: the residual is the blanks’ noise and nothing is flagged', () => {
    // High-J P-branch lines 2030–2060 cm⁻¹ at 0–50 ppm (100 ppm·m): well inside the linear range.
    const { scan, x } = simulator([2020, 2070]);
    const { grid, pick } = channelsIn(x, [[2030, 2060]]);
    const levels = [0, 0, 10, 20, 30, 40, 50];
    const model = fitCls({
      channels: grid,
      spectra: levels.map((ppm, i) => pick(scan({ CO: ppm }, 400 + i))),
      concentrations: levels.map((ppm) => [ppm]),
      phi: levels.map(() => 1),
      components: [{ name: 'CO', reported: true, unit: 'ppm' }],
    });
    const lackOfFit = model.calibration.lackOfFit;
    expect(lackOfFit.residualOverBlank!).toBeLessThan(lackOfFit.residualOverBlankLimit!);
    expect(lackOfFit.detected).toBe(false);
    expect(model.warnings).toEqual([]);
  });
});
