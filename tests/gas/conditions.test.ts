import { describe, expect, it } from 'vitest';
import {
  conditionsFarReasons,
  densityPathFactor,
  medianConditions,
  resolveConditions,
} from '../../src/gas/conditions.js';

const reference = { pathLength_m: 1, temperature_K: 296, pressure_kPa: 101.325 };

describe('densityPathFactor', () => {
  it('follows N·L ∝ L·P/T (ideal gas, Beer–Lambert; common practice)', () => {
    expect(densityPathFactor(reference, reference)).toBe(1);
    expect(densityPathFactor({ ...reference, pathLength_m: 2 }, reference)).toBe(2);
    expect(densityPathFactor({ ...reference, pressure_kPa: 50.6625 }, reference)).toBeCloseTo(0.5, 15);
    expect(densityPathFactor({ ...reference, temperature_K: 592 }, reference)).toBeCloseTo(0.5, 15);
  });

  it('matches the reference-spectrum scaling C_s = C_r·(A_s/A_r)·(L_r/L_s)·(T_s/T_r)·(P_r/P_s) (common practice)', () => {
    const sample = { pathLength_m: 8, temperature_K: 310, pressure_kPa: 98 };
    const ratioOfAbsorbance = 0.8;
    const fromFormula = 100 * ratioOfAbsorbance * (1 / 8) * (310 / 296) * (101.325 / 98);
    expect((100 * ratioOfAbsorbance) / densityPathFactor(sample, reference)).toBeCloseTo(fromFormula, 10);
  });
});

describe('resolveConditions', () => {
  it('takes the manifest first, then the scan, then options', () => {
    const resolved = resolveConditions(
      {
        manifest: { pathLength_m: 2 },
        scan: { pathLength_m: 3, temperature_K: 300 },
        options: { temperature_K: 310, pressure_kPa: 100 },
      },
      'scan.csv',
    );
    expect(resolved).toMatchObject({ pathLength_m: 2, temperature_K: 300, pressure_kPa: 100 });
    expect(resolved.sources).toEqual({
      pathLength_m: 'manifest',
      temperature_K: 'scan',
      pressure_kPa: 'option',
    });
  });

  it('refuses a quantity missing everywhere, naming it and where to give it', () => {
    expect(() => resolveConditions({ scan: { pathLength_m: 1, temperature_K: 296 } }, 'co-100.csv')).toThrow(
      /co-100.csv: no pressure .*option `pressure_kPa`/,
    );
  });

  it('refuses zero and negative path lengths', () => {
    expect(() =>
      resolveConditions({ manifest: { pathLength_m: 0, temperature_K: 296, pressure_kPa: 101 } }, 'x'),
    ).toThrow(/pathLength_m = 0, must be > 0/);
    expect(() =>
      resolveConditions({ manifest: { pathLength_m: -1, temperature_K: 296, pressure_kPa: 101 } }, 'x'),
    ).toThrow(/must be > 0/);
  });
});

describe('conditions-far', () => {
  it('flags a sample 15 K warmer or 8 % lower in pressure, and not one within the usual range', () => {
    expect(conditionsFarReasons({ ...reference, temperature_K: 311 }, reference)).toHaveLength(1);
    expect(conditionsFarReasons({ ...reference, pressure_kPa: 93 }, reference)).toHaveLength(1);
    expect(conditionsFarReasons({ ...reference, temperature_K: 300, pressure_kPa: 100 }, reference)).toEqual(
      [],
    );
  });
});

describe('medianConditions', () => {
  it('takes the median of each quantity', () => {
    expect(
      medianConditions([
        { pathLength_m: 1, temperature_K: 290, pressure_kPa: 100 },
        { pathLength_m: 1, temperature_K: 300, pressure_kPa: 102 },
        { pathLength_m: 2, temperature_K: 295, pressure_kPa: 101 },
      ]),
    ).toEqual({ pathLength_m: 1, temperature_K: 295, pressure_kPa: 101 });
  });
});
