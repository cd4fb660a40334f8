import { describe, expect, it } from 'vitest';
import { findSpecies } from '../../src/gas/species.js';
import {
  correctToReferenceOxygen,
  fromPpm,
  molarVolume_L,
  ppmToMgPerM3,
  toDryBasis,
  toPpm,
} from '../../src/gas/units.js';

const CO = findSpecies('CO');

describe('mass concentration', () => {
  // facts.md: 1 ppm CO in mg/m³ at 0 / 20 / 25 °C = 1.2497 / 1.1644 / 1.1449, computed with
  // M(CO) = 28.010 g/mol and R = 8.314462618 J/(mol·K) (CODATA 2018); printed to 5 digits.
  it.each([
    [273.15, 1.2497],
    [293.15, 1.1644],
    [298.15, 1.1449],
  ])('1 ppm CO at %f K is %f mg/m³ (facts.md, computed)', (temperature_K, expected) => {
    expect(CO?.molarMass_g_mol).toBeCloseTo(28.01, 3);
    expect(ppmToMgPerM3(1, 28.01, { temperature_K, pressure_kPa: 101.325 })).toBeCloseTo(expected, 4);
  });

  it('agrees with the NIOSH Pocket Guide conversion for CO, 1 ppm = 1.15 mg/m³ at 25 °C', () => {
    // The Pocket Guide rounds M/24.45 L/mol = 1.1456 to three digits, so agreement within 0.01 is what it supports.
    const value = ppmToMgPerM3(1, CO?.molarMass_g_mol ?? 0, { temperature_K: 298.15, pressure_kPa: 101.325 });
    expect(Math.abs(value - 1.15)).toBeLessThan(0.01);
  });

  // facts.md: molar volume 22.41397 / 24.0551 / 24.4654 L/mol at 0 / 20 / 25 °C, 101.325 kPa (computed from R).
  it.each([
    [273.15, 22.41397],
    [293.15, 24.0551],
    [298.15, 24.4654],
  ])('molar volume at %f K is %f L/mol', (temperature_K, expected) => {
    expect(molarVolume_L({ temperature_K, pressure_kPa: 101.325 })).toBeCloseTo(expected, 4);
  });
});

describe('stack reporting corrections', () => {
  it('corrects to reference O2 as in 40 CFR 60 (ref 7 %, measured 10 % → ×1.27523)', () => {
    // 40 CFR 60 (e.g. §60.3076): C_adj = C·(20.9 − O2_ref)/(20.9 − O2_meas).
    expect(correctToReferenceOxygen(100, { measured_pct: 10, reference_pct: 7 })).toBeCloseTo(127.523, 3);
  });

  it('uses a settable O2 of air (21 % in some jurisdictions)', () => {
    expect(correctToReferenceOxygen(100, { measured_pct: 10, reference_pct: 7, air_pct: 21 })).toBeCloseTo(
      (100 * 14) / 11,
      10,
    );
  });

  it('refuses the correction when measured O2 approaches air', () => {
    expect(() => correctToReferenceOxygen(100, { measured_pct: 20.7, reference_pct: 7 })).toThrow(
      /within 0.5 % points of the O2 of air/,
    );
    expect(() => correctToReferenceOxygen(100, { measured_pct: 21.5, reference_pct: 7 })).toThrow(
      /O2 of air/,
    );
  });

  it('converts wet to dry basis: 100 ppm wet at 12 % H2O → 113.636 ppm dry (common practice)', () => {
    expect(toDryBasis(100, 0.12)).toBeCloseTo(113.636, 3);
    expect(() => toDryBasis(100, 1)).toThrow(/from 0 to below 1/);
  });
});

describe('concentration units', () => {
  it('converts ppm, ppb and percent (1 % = 10,000 ppm; common practice)', () => {
    expect(toPpm(1, 'pct')).toBe(10_000);
    expect(toPpm(500, 'ppb')).toBe(0.5);
    expect(fromPpm(250, 'pct')).toBeCloseTo(0.025, 15);
  });
});
