import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  dopplerHWHM,
  faddeeva,
  faddeevaReal,
  lorentzHWHM,
  voigtHWHM,
  voigtProfile,
} from '../../src/simulate/lineshape.js';

interface WofzFixture {
  source: string;
  scipy: string;
  columns: string[];
  points: [number, number, number, number][];
}

// Reference values from scipy.special.wofz (general-purpose reference library), written by
// tests/fixtures/faddeeva/generate.py; the fixture records the scipy version.
const fixture = JSON.parse(
  readFileSync(new URL('../fixtures/faddeeva/wofz.json', import.meta.url), 'utf8'),
) as WofzFixture;

/** Trapezoid integral of f over [a, b] with n intervals. */
function integrate(f: (x: number) => number, a: number, b: number, n: number): number {
  const h = (b - a) / n;
  let sum = 0.5 * (f(a) + f(b));
  for (let i = 1; i < n; i++) sum += f(a + i * h);
  return sum * h;
}

describe('faddeeva (Humlíček W4)', () => {
  it('returns NaN outside the upper half-plane and for non-finite input (scalar kernel)', () => {
    expect(faddeeva(1, -0.1).re).toBeNaN();
    expect(faddeeva(Number.NaN, 1).im).toBeNaN();
    expect(faddeevaReal(0, Number.POSITIVE_INFINITY)).toBeNaN();
  });

  it('w(0) = 1 (erfc(0) = 1; exact value)', () => {
    const w = faddeeva(0, 0);
    expect(Math.abs(w.re - 1)).toBeLessThan(1e-4);
    expect(Math.abs(w.im)).toBeLessThan(1e-4);
  });

  it(`matches scipy.special.wofz ${fixture.scipy} to 1e-4 relative (Humlíček 1982 states about 1e-4) over all four regions`, () => {
    // Tolerance: |w − w_ref| ≤ 1e-4·|w_ref| (complex relative error), the accuracy W4 is known for.
    expect(fixture.points.length).toBeGreaterThan(400);
    const failures: string[] = [];
    for (const [x, y, re, im] of fixture.points) {
      const w = faddeeva(x, y);
      const error = Math.hypot(w.re - re, w.im - im) / Math.hypot(re, im);
      if (!(error <= 1e-4))
        failures.push(
          `w(${x} + ${y}i): expected ${re} + ${im}i, got ${w.re} + ${w.im}i, relative error ${error.toExponential(2)} > 1e-4`,
        );
    }
    expect(failures).toEqual([]);
  });

  it('Re w (the Voigt function) matches scipy to 1e-4 relative wherever Re w ≥ 1e-3·|w| (scipy.special.wofz)', () => {
    // Where the real part is a tiny fraction of |w| (y → 0 far from the centre) W4 only
    // guarantees the complex accuracy above; the profile there is negligible.
    const failures: string[] = [];
    for (const [x, y, re, im] of fixture.points) {
      if (re < 1e-3 * Math.hypot(re, im)) continue;
      const error = Math.abs(faddeevaReal(x, y) - re) / re;
      if (!(error <= 1e-4))
        failures.push(
          `Re w(${x} + ${y}i): expected ${re}, got ${faddeevaReal(x, y)}, relative error ${error.toExponential(2)}`,
        );
    }
    expect(failures).toEqual([]);
  });

  it('has the symmetry w(−x + iy) = conj w(x + iy) (property of w; fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -50, max: 50, noNaN: true }),
        fc.double({ min: 0, max: 50, noNaN: true }),
        (x, y) => {
          const a = faddeeva(x, y);
          const b = faddeeva(-x, y);
          return (
            Math.abs(a.re - b.re) <= 1e-15 * Math.abs(a.re) + 1e-300 &&
            Math.abs(a.im + b.im) <= 1e-15 * Math.abs(a.im) + 1e-300
          );
        },
      ),
      { seed: 20240611, numRuns: 300 },
    );
  });
});

describe('dopplerHWHM', () => {
  it('is 0.00250 cm⁻¹ for CO at 2143.27 cm⁻¹ and 296 K (facts.md, computed; recomputed here from CODATA constants)', () => {
    // CODATA / SI 2019 exact values; M(CO) = 28.010 g/mol as in facts.md.
    const k = 1.380649e-23;
    const c = 299792458;
    const avogadro = 6.02214076e23;
    const mass = 28.01e-3 / avogadro;
    const expected = (2143.27 / c) * Math.sqrt((2 * Math.LN2 * k * 296) / mass);
    const actual = dopplerHWHM(2143.27, 296, 28.01);
    expect(Math.abs(actual - expected) / expected, `expected ${expected}, got ${actual}`).toBeLessThan(1e-12);
    expect(Math.abs(actual - 0.0025)).toBeLessThan(0.000005); // facts.md quotes 0.00250
  });

  it('scales as ν·√(T/M) (formula, common practice) and gives NaN for invalid input', () => {
    const base = dopplerHWHM(2000, 300, 30);
    expect(dopplerHWHM(4000, 1200, 30) / base).toBeCloseTo(4, 12);
    expect(dopplerHWHM(2000, 300, 120) / base).toBeCloseTo(0.5, 12);
    expect(dopplerHWHM(2000, -1, 30)).toBeNaN();
  });
});

describe('lorentzHWHM', () => {
  it('scales linearly with pressure and as (296/T)^n (standard line-by-line practice, from memory)', () => {
    const atm = lorentzHWHM({
      airBroadening_cm_atm: 0.065,
      temperatureExponent: 0.7,
      temperature_K: 296,
      pressure_kPa: 101.325,
    });
    expect(atm).toBeCloseTo(0.065, 15);
    expect(
      lorentzHWHM({
        airBroadening_cm_atm: 0.065,
        temperatureExponent: 0.7,
        temperature_K: 296,
        pressure_kPa: 50.6625,
      }),
    ).toBeCloseTo(0.0325, 15);
    expect(
      lorentzHWHM({
        airBroadening_cm_atm: 0.065,
        temperatureExponent: 0.7,
        temperature_K: 592,
        pressure_kPa: 101.325,
      }),
    ).toBeCloseTo(0.065 * 0.5 ** 0.7, 15);
  });
});

describe('voigtProfile', () => {
  it('reduces to the Gaussian when γL = 0, to 1e-4 of the peak (Gaussian formula; W4 accuracy)', () => {
    const gammaD = 0.0025;
    const peak = Math.sqrt(Math.LN2 / Math.PI) / gammaD;
    for (let offset = -4 * gammaD; offset <= 4 * gammaD; offset += gammaD / 7) {
      const gauss = peak * Math.exp((-Math.LN2 * offset * offset) / (gammaD * gammaD));
      const voigt = voigtProfile(offset, gammaD, 0);
      expect(
        Math.abs(voigt - gauss),
        `offset ${offset}: expected ${gauss}, got ${voigt}, tolerance ${1e-4 * peak}`,
      ).toBeLessThanOrEqual(1e-4 * peak);
    }
  });

  it('reduces to the Lorentzian when γD ≪ γL (1e-4 relative) and equals it exactly when γD = 0 (Lorentz formula)', () => {
    const gammaL = 0.065;
    for (const offset of [0, 0.01, 0.065, 0.3, 2, 25]) {
      const lorentz = gammaL / Math.PI / (offset * offset + gammaL * gammaL);
      expect(Math.abs(voigtProfile(offset, 1e-6 * gammaL, gammaL) - lorentz) / lorentz).toBeLessThan(1e-4);
      expect(voigtProfile(offset, 0, gammaL)).toBe(lorentz);
    }
    expect(voigtProfile(0, 0, 0)).toBeNaN();
  });

  it('integrates to 1 within 2e-4 (numerical integration plus the analytic Lorentz tail; W4 accuracy 1e-4)', () => {
    for (const [gammaD, gammaL] of [
      [0.0025, 0],
      [0.0025, 0.00025],
      [0.0025, 0.0025],
      [0.0025, 0.065],
      [0.01, 0.5],
    ] as const) {
      const width = voigtHWHM(gammaD, gammaL);
      const half = 2000 * width;
      const inside = integrate(
        (x) => voigtProfile(x, gammaD, gammaL),
        -half,
        half,
        Math.ceil((2 * half) / (width / 20)),
      );
      // Beyond ±half (≫ γD) the profile is Lorentzian: tail area 1 − (2/π)·atan(half/γL).
      const tail = gammaL > 0 ? 1 - (2 / Math.PI) * Math.atan(half / gammaL) : 0;
      const total = inside + tail;
      expect(Math.abs(total - 1), `γD ${gammaD}, γL ${gammaL}: area ${total}`).toBeLessThan(2e-4);
    }
  });

  it('has a half width at half maximum matching Olivero & Longbothum (JQSRT 1977, 0.02 %; from memory) within 0.05 %', () => {
    for (const [gammaD, gammaL] of [
      [0.0025, 0.0001],
      [0.0025, 0.0025],
      [0.0025, 0.065],
    ] as const) {
      const half = voigtProfile(0, gammaD, gammaL) / 2;
      // Bisect for the offset where the profile falls to half its peak.
      let a = 0;
      let b = 10 * (gammaD + gammaL);
      for (let i = 0; i < 100; i++) {
        const m = (a + b) / 2;
        if (voigtProfile(m, gammaD, gammaL) > half) a = m;
        else b = m;
      }
      const numeric = (a + b) / 2;
      const formula = voigtHWHM(gammaD, gammaL);
      expect(
        Math.abs(numeric - formula) / formula,
        `γD ${gammaD}, γL ${gammaL}: numeric ${numeric}, formula ${formula}`,
      ).toBeLessThan(5e-4);
    }
  });
});
