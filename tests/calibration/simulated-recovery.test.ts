/**
 * Simulated standards → calibrate → quantify recovers the simulated concentrations within the
 * intervals. The truth is what the line-by-line simulator put in the cell (its physics is checked
 * against published constants in tests/simulate); the curve bends because lines saturate.
 */
import { describe, expect, it } from 'vitest';
import { buildBandCalibration, type StandardScan } from '../../src/calibration/build.js';
import { parseMethod, type BandMethod } from '../../src/calibration/method.js';
import { quantifyBandScan } from '../../src/calibration/quantify.js';
import { simulateSpectrum } from '../../src/simulate/index.js';

const cell = { pathLength_m: 1, resolution_cm: 0.5, range_cm: [1950, 2350] as const, noiseRms_AU: 3e-4 };
const method = parseMethod(
  {
    gases: [
      {
        name: 'CO',
        band: [2020, 2240],
        baseline: [
          [1960, 1990],
          [2260, 2290],
        ],
        model: 'quadratic',
      },
    ],
  },
  'method',
) as BandMethod;

function standards(): StandardScan[] {
  const levels = [0, 0, 20, 20, 50, 50, 100, 100, 200, 200, 350, 350, 500, 500];
  return levels.map((ppm, i) => ({
    scan: `std-${i}`,
    line: i + 2,
    spectrum: simulateSpectrum({
      ...cell,
      temperature_K: 296 + (i % 3) - 1,
      pressure_kPa: 101.325,
      gases: ppm === 0 ? [] : [{ name: 'CO', ppm }],
      seed: 10 + i,
    }).spectrum,
    concentrations: [{ gas: 'CO', unit: 'ppm' as const, value: ppm }],
    conditions: {},
  }));
}

describe('simulated CO standards → band calibration → quantify', () => {
  const calibration = buildBandCalibration(method, standards(), {
    inputs: [],
    createdAt: '2026-12-01T00:00:00Z',
  });

  it('recommends the second-order curve the saturating band needs (Mandel test)', () => {
    expect(calibration.gases[0]?.model.mandel?.significant).toBe(true);
  });

  it('recovers samples across the range, at other path lengths and temperatures, within their 95 % intervals', () => {
    const samples = [
      { ppm: 8, pathLength_m: 1, temperature_K: 296 },
      { ppm: 35, pathLength_m: 1, temperature_K: 300 },
      { ppm: 75, pathLength_m: 1, temperature_K: 293 },
      { ppm: 140, pathLength_m: 1, temperature_K: 296 },
      { ppm: 260, pathLength_m: 1, temperature_K: 298 },
      { ppm: 430, pathLength_m: 1, temperature_K: 296 },
      { ppm: 60, pathLength_m: 2, temperature_K: 296 },
      { ppm: 90, pathLength_m: 1, temperature_K: 296, pressure_kPa: 98 },
    ];
    const outcomes = samples.map((sample, i) => {
      const spectrum = simulateSpectrum({
        ...cell,
        pressure_kPa: 101.325,
        ...sample,
        gases: [{ name: 'CO', ppm: sample.ppm }],
        seed: 500 + i,
      }).spectrum;
      const result = quantifyBandScan(calibration, spectrum).gases[0]!;
      return {
        truth: sample.ppm,
        value: result.value,
        low: result.low,
        high: result.high,
        inside: result.low <= sample.ppm && sample.ppm <= result.high,
      };
    });
    // With independent 95 % intervals, all eight inside is the expected outcome (P ≈ 0.66 that
    // all are); allow one miss so the check is about calibration, not luck, but require small bias.
    expect(outcomes.filter((o) => o.inside).length, JSON.stringify(outcomes, null, 1)).toBeGreaterThanOrEqual(
      7,
    );
    for (const o of outcomes)
      expect(Math.abs(o.value - o.truth), JSON.stringify(o)).toBeLessThan(Math.max(2, 0.03 * o.truth));
  });
});
