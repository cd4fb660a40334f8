import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { isBandwrightError } from '../../src/errors.js';
import { fftInPlace } from '../../src/simulate/fft.js';
import { convolveWithInstrument, instrumentLineShape } from '../../src/simulate/instrument.js';
import { lineList } from '../../src/simulate/lines.js';
import { simulateSpectrum, type SimulationOptions } from '../../src/simulate/simulate.js';
import type { Spectrum } from '../../src/spectrum/spectrum.js';

const BOLTZMANN = 1.380649e-23; // J/K, CODATA / SI 2019 (facts.md)
const CO_BAND_STRENGTH = 1.013e-17; // cm/molecule at 296 K, Zou & Varanasi, JQSRT 2002 (facts.md)

function trapezoid(spectrum: Spectrum, lo = -Infinity, hi = Infinity): number {
  const { x, y } = spectrum;
  let sum = 0;
  for (let i = 1; i < x.length; i++) {
    const a = x[i - 1] as number;
    const b = x[i] as number;
    if (a < lo || b > hi) continue;
    sum += 0.5 * ((y[i] as number) + (y[i - 1] as number)) * (b - a);
  }
  return sum;
}

function valueAt(spectrum: Spectrum, wavenumber: number): number {
  let best = 0;
  for (let i = 1; i < spectrum.x.length; i++)
    if (
      Math.abs((spectrum.x[i] as number) - wavenumber) < Math.abs((spectrum.x[best] as number) - wavenumber)
    )
      best = i;
  return spectrum.y[best] as number;
}

function maxIn(spectrum: Spectrum, lo: number, hi: number): number {
  let max = -Infinity;
  spectrum.x.forEach((x, i) => {
    if (x >= lo && x <= hi) max = Math.max(max, spectrum.y[i] as number);
  });
  return max;
}

function expectThrows(run: () => unknown, code: string, message: RegExp): void {
  try {
    run();
  } catch (error) {
    expect(isBandwrightError(error, code as never), String(error)).toBe(true);
    expect((error as Error).message).toMatch(message);
    return;
  }
  throw new Error(`expected a ${code} error`);
}

function deepFreeze<T>(value: T): T {
  if (typeof value === 'object' && value !== null) {
    for (const inner of Object.values(value)) deepFreeze(inner);
    Object.freeze(value);
  }
  return value;
}

const CO_CELL: SimulationOptions = {
  gases: [{ name: 'CO', ppm: 100 }],
  pathLength_m: 1,
  temperature_K: 296,
  pressure_kPa: 101.325,
  range_cm: [1900, 2400],
  resolution_cm: 0.5,
  apodization: 'triangular',
};

describe('instrument line shape', () => {
  it('FFT matches the direct DFT definition (common practice)', () => {
    const n = 16;
    const re = Float64Array.from({ length: n }, (_, k) => Math.sin(k) + 0.1 * k);
    const im = Float64Array.from({ length: n }, (_, k) => Math.cos(3 * k));
    const [r, i] = [re.slice(), im.slice()];
    fftInPlace(r, i);
    for (let k = 0; k < n; k++) {
      let sr = 0;
      let si = 0;
      for (let j = 0; j < n; j++) {
        const angle = (-2 * Math.PI * j * k) / n;
        sr += (re[j] as number) * Math.cos(angle) - (im[j] as number) * Math.sin(angle);
        si += (re[j] as number) * Math.sin(angle) + (im[j] as number) * Math.cos(angle);
      }
      expect(r[k]).toBeCloseTo(sr, 10);
      expect(i[k]).toBeCloseTo(si, 10);
    }
    fftInPlace(r, i, { inverse: true });
    r.forEach((v, k) => expect(v).toBeCloseTo(re[k] as number, 12));
  });

  it('has unit area on the grid and the sinc / sinc² shape for resolution = 1/OPD_max (standard FTIR practice, from memory)', () => {
    // With a power-of-two length and no padding the returned window is the whole FFT period,
    // so the kernel's long sinc tails are all inside it.
    const step = 0.01;
    const n = 8192;
    const centre = 4096;
    for (const apodization of ['boxcar', 'triangular'] as const) {
      const delta = new Float64Array(n);
      delta[centre] = 1 / step; // unit-area spike
      const out = convolveWithInstrument(delta, { step_cm: step, resolution_cm: 1, apodization, padding: 0 });
      const area = out.reduce((s, v) => s + v, 0) * step;
      expect(Math.abs(area - 1), `${apodization}: area ${area}`).toBeLessThan(1e-9);
      for (const offset of [0, 0.25, 0.5, 0.9, 1.5]) {
        const expected = instrumentLineShape(offset, 1, apodization);
        const actual = out[centre + Math.round(offset / step)] as number;
        expect(
          Math.abs(actual - expected),
          `${apodization} at ${offset} cm⁻¹: expected ${expected}, got ${actual}`,
        ).toBeLessThan(2e-3 * instrumentLineShape(0, 1, apodization));
      }
    }
    // FWHM: 0.603·Δν (sinc) and 0.886·Δν (sinc²) (standard FTIR practice, from memory).
    const halfWidth = (apodization: 'boxcar' | 'triangular'): number => {
      const half = instrumentLineShape(0, 1, apodization) / 2;
      let a = 0;
      let b = 0.5;
      for (let i = 0; i < 60; i++) {
        const m = (a + b) / 2;
        if (instrumentLineShape(m, 1, apodization) > half) a = m;
        else b = m;
      }
      return a + b;
    };
    expect(halfWidth('boxcar')).toBeCloseTo(0.603, 3);
    expect(halfWidth('triangular')).toBeCloseTo(0.886, 3);
  });
});

describe('simulateSpectrum: Beer–Lambert and curve of growth', () => {
  it('weak-absorption limit: ∫A dν = S·N·L/ln 10 within 0.5 % for CO at 0.5 and 2 cm⁻¹ (DESIGN §3; S from Zou & Varanasi 2002)', () => {
    const ppm = 0.1;
    const expected = (CO_BAND_STRENGTH * ppm * 1e-6 * (101325 / (BOLTZMANN * 296)) * 1e-6 * 100) / Math.LN10;
    for (const resolution_cm of [0.5, 2]) {
      for (const apodization of ['boxcar', 'triangular'] as const) {
        const result = simulateSpectrum({
          ...CO_CELL,
          gases: [{ name: 'CO', ppm }],
          range_cm: [1800, 2500],
          resolution_cm,
          apodization,
        });
        const area = trapezoid(result.spectrum);
        expect(
          Math.abs(area / expected - 1),
          `${resolution_cm} cm⁻¹ ${apodization}: area ${area}, S·N·L/ln10 ${expected}, tolerance 0.5 %`,
        ).toBeLessThan(0.005);
        expect(result.gases[0]?.weakLimitBandArea_AU_cm).toBeCloseTo(expected, 12);
      }
    }
  });

  it('curve of growth: the apparent band area grows less than linearly once lines saturate, more so at coarser resolution (DESIGN §3)', () => {
    const ratios: Record<number, number[]> = {};
    for (const resolution_cm of [0.5, 2]) {
      ratios[resolution_cm] = [10, 100, 1000, 10000].map((ppm) => {
        const result = simulateSpectrum({ ...CO_CELL, gases: [{ name: 'CO', ppm }], resolution_cm });
        return trapezoid(result.spectrum) / (result.gases[0]?.weakLimitBandArea_AU_cm ?? NaN);
      });
    }
    const fine = ratios[0.5] as number[];
    const coarse = ratios[2] as number[];
    for (const series of [fine, coarse]) {
      expect(series[0]).toBeGreaterThan(0.97);
      for (let i = 1; i < series.length; i++)
        expect(series[i], `area/(S·N·L/ln10) ${series.join(', ')}`).toBeLessThan(series[i - 1] as number);
    }
    for (let i = 1; i < 4; i++)
      expect(coarse[i], `0.5 cm⁻¹: ${fine.join(', ')}; 2 cm⁻¹: ${coarse.join(', ')}`).toBeLessThan(
        fine[i] as number,
      );
    expect(fine[3]).toBeLessThan(0.5);
  });

  it('number density follows x·P/(kT): doubling the path or the pressure at fixed x doubles the weak-limit area (DESIGN §3)', () => {
    const base =
      simulateSpectrum({ ...CO_CELL, gases: [{ name: 'CO', ppm: 0.1 }] }).gases[0]?.weakLimitBandArea_AU_cm ??
      NaN;
    expect(
      (simulateSpectrum({ ...CO_CELL, gases: [{ name: 'CO', ppm: 0.1 }], pathLength_m: 2 }).gases[0]
        ?.weakLimitBandArea_AU_cm ?? NaN) / base,
    ).toBeCloseTo(2, 12);
    expect(
      (simulateSpectrum({ ...CO_CELL, gases: [{ name: 'CO', ppm: 0.1 }], pressure_kPa: 202.65 }).gases[0]
        ?.weakLimitBandArea_AU_cm ?? NaN) / base,
    ).toBeCloseTo(2, 12);
  });
});

describe('simulateSpectrum: spectral features', () => {
  it('shows the CO band-origin gap at 2143.27 cm⁻¹ between P(1) and R(0) (no Q branch; facts.md positions)', () => {
    const spectrum = simulateSpectrum(CO_CELL).spectrum;
    const gap = valueAt(spectrum, 2143.27);
    expect(gap).toBeLessThan(0.3 * maxIn(spectrum, 2146.6, 2147.6));
    expect(gap).toBeLessThan(0.3 * maxIn(spectrum, 2138.9, 2139.9));
  });

  it('CO₂ gives its strong ν3 band near 2349 cm⁻¹ at ambient level (facts.md ν3 2349.1; 400 ppm ambient, common practice)', () => {
    const spectrum = simulateSpectrum({
      ...CO_CELL,
      gases: [{ name: 'CO2', ppm: 400 }],
      range_cm: [2000, 2450],
    }).spectrum;
    expect(maxIn(spectrum, 2300, 2400)).toBeGreaterThan(0.3);
    expect(maxIn(spectrum, 2000, 2200)).toBeLessThan(0.01 * maxIn(spectrum, 2300, 2400));
  });

  it('H₂O gives structure across 1300–2000 and 3500–4000 cm⁻¹ and is reported as approximate (facts.md H₂O bands)', () => {
    const result = simulateSpectrum({
      ...CO_CELL,
      gases: [{ name: 'H2O', ppm: 10000 }],
      range_cm: [1250, 4050],
    });
    expect(result.approximateGases).toEqual(['H2O']);
    expect(result.gases[0]?.approximate).toBe(true);
    expect(result.warnings.some((w) => w.startsWith('H2O: approximate band model'))).toBe(true);
    for (const [lo, hi] of [
      [1300, 2000],
      [3500, 4000],
    ] as const) {
      for (let a = lo; a < hi; a += 50) {
        const window = result.spectrum.x.reduce<number[]>(
          (values, x, i) => (x >= a && x < a + 50 ? [...values, result.spectrum.y[i] as number] : values),
          [],
        );
        const spread = Math.max(...window) - Math.min(...window);
        expect(spread, `H2O peak-to-valley in ${a}–${a + 50} cm⁻¹`).toBeGreaterThan(0.005);
      }
    }
  });

  it('a hotter cell widens the CO band: more absorbance far out in the R branch at 600 K (common practice)', () => {
    const cold = simulateSpectrum({ ...CO_CELL, gases: [{ name: 'CO', ppm: 10 }] }).spectrum;
    const hot = simulateSpectrum({
      ...CO_CELL,
      gases: [{ name: 'CO', ppm: 10 }],
      temperature_K: 600,
    }).spectrum;
    expect(trapezoid(hot, 2230, 2300)).toBeGreaterThan(3 * trapezoid(cold, 2230, 2300));
  });

  it('records the cell conditions in the metadata and gives decadic absorbance on the requested grid', () => {
    const { spectrum } = simulateSpectrum({ ...CO_CELL, pointSpacing_cm: 0.125, range_cm: [2000, 2010] });
    expect(spectrum.yKind).toBe('absorbance');
    expect(spectrum.metadata).toMatchObject({
      pathLength_m: 1,
      temperature_K: 296,
      pressure_kPa: 101.325,
      resolution_cm: 0.5,
    });
    expect(spectrum.x.length).toBe(81);
    expect(spectrum.x[0]).toBe(2000);
    expect(spectrum.x[80]).toBeCloseTo(2010, 12);
    expect(simulateSpectrum({ ...CO_CELL, range_cm: [2000, 2010] }).spectrum.x.length).toBe(41); // default spacing resolution/2
  });
});

describe('simulateSpectrum: baseline, noise, purity', () => {
  it('zero gas gives zero absorbance, for any conditions (I0 against itself; fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 200, max: 800, noNaN: true }),
        fc.double({ min: 1, max: 300, noNaN: true }),
        fc.constantFrom<'boxcar' | 'triangular'>('boxcar', 'triangular'),
        (temperature_K, pressure_kPa, apodization) => {
          const { spectrum } = simulateSpectrum({
            ...CO_CELL,
            gases: [{ name: 'CO', ppm: 0 }],
            temperature_K,
            pressure_kPa,
            apodization,
            range_cm: [2100, 2150],
          });
          return spectrum.y.every((v) => v === 0);
        },
      ),
      { seed: 424242, numRuns: 15 },
    );
  });

  it('adds the baseline polynomial about the range centre (AU per (cm⁻¹)^k)', () => {
    const { spectrum } = simulateSpectrum({
      gases: [],
      range_cm: [1000, 1100],
      baseline: [0.01, 1e-4, 2e-6],
    });
    spectrum.x.forEach((x, i) => {
      const u = x - 1050;
      expect(spectrum.y[i]).toBeCloseTo(0.01 + 1e-4 * u + 2e-6 * u * u, 14);
    });
  });

  it('seeded noise is reproducible, differs between seeds, and has the requested RMS within 4 standard errors (statistics, common practice)', () => {
    const options: SimulationOptions = {
      gases: [],
      range_cm: [1000, 3000],
      resolution_cm: 0.5,
      noiseRms_AU: 0.001,
      seed: 7,
    };
    const a = simulateSpectrum(options).spectrum.y;
    const b = simulateSpectrum(options).spectrum.y;
    const c = simulateSpectrum({ ...options, seed: 8 }).spectrum.y;
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(Array.from(a)).not.toEqual(Array.from(c));
    const n = a.length;
    const mean = a.reduce((s, v) => s + v, 0) / n;
    const rms = Math.sqrt(a.reduce((s, v) => s + v * v, 0) / n);
    // SE of a sample RMS ≈ σ/√(2n); SE of the mean = σ/√n.
    expect(
      Math.abs(rms - 0.001),
      `n = ${n}, RMS ${rms}, tolerance ${(4 * 0.001) / Math.sqrt(2 * n)}`,
    ).toBeLessThan((4 * 0.001) / Math.sqrt(2 * n));
    expect(Math.abs(mean)).toBeLessThan((4 * 0.001) / Math.sqrt(n));
  });

  it('does not mutate its options (frozen input; STYLE: no function mutates its input)', () => {
    const options = deepFreeze({
      ...CO_CELL,
      gases: [
        { name: 'CO', ppm: 50 },
        { name: 'H2O', ppm: 1000 },
      ],
      baseline: [0.001, 1e-6],
      noiseRms_AU: 1e-4,
      seed: 3,
    } satisfies SimulationOptions);
    const before = JSON.stringify(options);
    simulateSpectrum(options);
    expect(JSON.stringify(options)).toBe(before);
    const list = lineList('CO', 296);
    const copy = JSON.stringify(list);
    simulateSpectrum(CO_CELL);
    expect(JSON.stringify(lineList('CO', 296))).toBe(copy);
  });

  it('warns when peak absorbance is above 1 AU (saturation; DESIGN §3 default threshold 1.0)', () => {
    const result = simulateSpectrum({ ...CO_CELL, gases: [{ name: 'CO', ppm: 20000 }] });
    expect(result.warnings.some((w) => /above 1 AU/.test(w))).toBe(true);
    expect(simulateSpectrum(CO_CELL).warnings).toEqual([]);
  });
});

describe('simulateSpectrum: option validation', () => {
  const bad =
    (patch: Partial<SimulationOptions>): (() => unknown) =>
    () =>
      simulateSpectrum({ ...CO_CELL, ...patch });
  it('names the option, the value and the rule', () => {
    expectThrows(bad({ pathLength_m: -1 }), 'INVALID_VALUE', /^pathLength_m = -1, must be > 0$/);
    expectThrows(bad({ pressure_kPa: 0 }), 'INVALID_VALUE', /^pressure_kPa = 0, must be > 0$/);
    expectThrows(
      bad({ temperature_K: 20 }),
      'INVALID_VALUE',
      /^temperature_K = 20, must be between 50 and 3000 K$/,
    );
    expectThrows(
      bad({ resolution_cm: 0.001 }),
      'INVALID_VALUE',
      /^resolution_cm = 0.001, must be between 0.01 and 32 cm⁻¹$/,
    );
    expectThrows(
      bad({ range_cm: [2400, 1900] }),
      'INVALID_VALUE',
      /^range_cm = \[2400, 1900\], hi must be greater than lo$/,
    );
    expectThrows(
      bad({ apodization: 'gaussian' as never }),
      'INVALID_VALUE',
      /^apodization = "gaussian", must be one of boxcar, triangular$/,
    );
    expectThrows(bad({ noiseRms_AU: -0.1 }), 'INVALID_VALUE', /^noiseRms_AU = -0.1, must be >= 0$/);
    expectThrows(bad({ seed: 1.5 }), 'INVALID_VALUE', /^seed = 1.5, must be an integer$/);
    expectThrows(
      bad({ baseline: [0, Number.NaN] }),
      'INVALID_VALUE',
      /^baseline\[1\] = NaN, must be a finite number$/,
    );
    expectThrows(
      bad({ gases: [{ name: 'CO', ppm: -5 }] }),
      'INVALID_VALUE',
      /^gases\[0\]\.ppm = -5, must be between 0 and 1000000$/,
    );
    expectThrows(
      bad({
        gases: [
          { name: 'CO', ppm: 1 },
          { name: 'carbon monoxide', ppm: 2 },
        ],
      }),
      'INVALID_VALUE',
      /gases\[1\]\.name = "carbon monoxide", CO is already given as gases\[0\]/,
    );
    expectThrows(
      () => simulateSpectrum({ gases: [] }),
      'INVALID_VALUE',
      /range_cm = undefined, must be given when no gas is simulated/,
    );
  });

  it('refuses unknown and IR-inactive gases through the species table, and gases without a model', () => {
    expectThrows(
      bad({ gases: [{ name: 'unobtainium', ppm: 1 }] }),
      'UNKNOWN_GAS',
      /gases\[0\]\.name: gas "unobtainium" is not in the species table/,
    );
    expectThrows(
      bad({ gases: [{ name: 'N2', ppm: 1 }] }),
      'IR_INACTIVE',
      /gases\[0\]\.name: N2 \(nitrogen\) cannot be measured by infrared absorption/,
    );
    expectThrows(
      bad({ gases: [{ name: 'NO2', ppm: 1 }] }),
      'INVALID_VALUE',
      /gases\[0\]\.name = "NO2", the simulator has no spectral model for NO2/,
    );
  });

  it('refuses a fine grid beyond its limit with LIMIT, naming the range', () => {
    expectThrows(
      bad({ pressure_kPa: 0.01, range_cm: [1000, 4000] }),
      'LIMIT',
      /^range_cm = \[1000, 4000\] needs \d+ fine-grid points/,
    );
  });
});
