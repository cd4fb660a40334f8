/**
 * Line shapes for the gas-cell simulator: Doppler and Lorentz widths and the Voigt profile,
 * computed from the Faddeeva function w(z) = exp(−z²)·erfc(−iz).
 *
 * Voigt profile (area-normalised, 1/cm⁻¹) with Doppler HWHM γD and Lorentz HWHM γL:
 *   V(Δ) = Re w(x + iy) / (αD·√π),  αD = γD/√ln2,  x = Δ/αD,  y = γL/αD
 * (standard line-by-line practice, from memory). w(z) is evaluated with Humlíček's W4
 * rational approximation (J. Humlíček, JQSRT 27 (1982) 437), whose relative accuracy is about
 * 1e-4 over the upper half-plane.
 */
import {
  BOLTZMANN_J_K,
  AVOGADRO_PER_MOL,
  SPEED_OF_LIGHT_M_S,
  REFERENCE_PRESSURE_KPA,
  REFERENCE_TEMPERATURE_K,
} from './constants.js';

const SQRT_LN2 = Math.sqrt(Math.LN2);
const SQRT_PI = Math.sqrt(Math.PI);

/** A complex number as a plain object. */
export interface Complex {
  /** Real part. */
  re: number;
  /** Imaginary part. */
  im: number;
}

// Humlíček (1982) W4 coefficients, in Horner order (highest power first after the leading one).
const REGION3_NUMERATOR = [3.778987, 11.96482, 20.20933, 16.4955] as const;
const REGION3_DENOMINATOR = [6.699398, 21.69274, 39.27121, 38.82363, 16.4955] as const;
const REGION4_NUMERATOR = [1.320522, 35.76683, 219.0313, 1540.787, 3321.9905, 36183.31] as const;
const REGION4_DENOMINATOR = [1.841439, 61.57037, 364.2191, 2186.181, 9022.228, 24322.84, 32066.6] as const;

// Scratch result of the kernel, so the hot loop over a line's window allocates nothing.
let resultRe = 0;
let resultIm = 0;

/**
 * Humlíček W4 for y ≥ 0; leaves the value in resultRe/resultIm. The four regions and their
 * coefficients are those of the 1982 paper (t = y − ix).
 */
function humlicekW4(x: number, y: number): void {
  const tr = y;
  const ti = -x;
  const s = Math.abs(x) + y;
  if (s >= 15) {
    // Region I: one-pole rational (asymptotic) form.
    const ur = tr * tr - ti * ti + 0.5;
    const ui = 2 * tr * ti;
    const nr = 0.5641896 * tr;
    const ni = 0.5641896 * ti;
    const d = ur * ur + ui * ui;
    resultRe = (nr * ur + ni * ui) / d;
    resultIm = (ni * ur - nr * ui) / d;
    return;
  }
  if (s >= 5.5) {
    // Region II.
    const ur = tr * tr - ti * ti;
    const ui = 2 * tr * ti;
    // numerator t·(1.410474 + 0.5641896·u)
    const ar = 1.410474 + 0.5641896 * ur;
    const ai = 0.5641896 * ui;
    const nr = tr * ar - ti * ai;
    const ni = tr * ai + ti * ar;
    // denominator 0.75 + u·(3 + u)
    const br = 3 + ur;
    const bi = ui;
    const dr = 0.75 + (ur * br - ui * bi);
    const di = ur * bi + ui * br;
    const d = dr * dr + di * di;
    resultRe = (nr * dr + ni * di) / d;
    resultIm = (ni * dr - nr * di) / d;
    return;
  }
  if (y >= 0.195 * Math.abs(x) - 0.176) {
    // Region III: Horner in t.
    let nr = 0.5642236;
    let ni = 0;
    for (const c of REGION3_NUMERATOR) {
      const r = nr * tr - ni * ti + c;
      ni = nr * ti + ni * tr;
      nr = r;
    }
    let dr = 1;
    let di = 0;
    for (const c of REGION3_DENOMINATOR) {
      const r = dr * tr - di * ti + c;
      di = dr * ti + di * tr;
      dr = r;
    }
    const d = dr * dr + di * di;
    resultRe = (nr * dr + ni * di) / d;
    resultIm = (ni * dr - nr * di) / d;
    return;
  }
  // Region IV: w = exp(u) − t·P(u)/Q(u), u = t², nested as c − u·(…).
  const ur = tr * tr - ti * ti;
  const ui = 2 * tr * ti;
  let pr = 0.56419;
  let pi = 0;
  for (const c of REGION4_NUMERATOR) {
    const r = c - (ur * pr - ui * pi);
    pi = -(ur * pi + ui * pr);
    pr = r;
  }
  let qr = 1;
  let qi = 0;
  for (const c of REGION4_DENOMINATOR) {
    const r = c - (ur * qr - ui * qi);
    qi = -(ur * qi + ui * qr);
    qr = r;
  }
  // t·P
  const tpr = tr * pr - ti * pi;
  const tpi = tr * pi + ti * pr;
  const d = qr * qr + qi * qi;
  const fr = (tpr * qr + tpi * qi) / d;
  const fi = (tpi * qr - tpr * qi) / d;
  const e = Math.exp(ur);
  resultRe = e * Math.cos(ui) - fr;
  resultIm = e * Math.sin(ui) - fi;
}

/**
 * The Faddeeva (complex probability) function w(z) = exp(−z²)·erfc(−iz) at z = x + iy, by
 * Humlíček's W4 algorithm (relative accuracy about 1e-4).
 *
 * A scalar kernel: returns NaN parts for y < 0 (outside the upper half-plane the algorithm does
 * not apply) or non-finite input, rather than throwing.
 *
 * @param x - real part of z (dimensionless)
 * @param y - imaginary part of z, ≥ 0 (dimensionless)
 * @returns w(z) as `{ re, im }`
 * @example
 * faddeeva(0, 1).re // ≈ 0.4275836 (= e·erfc(1))
 */
export function faddeeva(x: number, y: number): Complex {
  if (!Number.isFinite(x) || !Number.isFinite(y) || y < 0) return { re: Number.NaN, im: Number.NaN };
  humlicekW4(x, y);
  return { re: resultRe, im: resultIm };
}

/**
 * Re w(x + iy) only, for hot loops (no allocation). Same domain rules as {@link faddeeva}.
 *
 * @param x - real part of z
 * @param y - imaginary part of z, ≥ 0
 */
export function faddeevaReal(x: number, y: number): number {
  if (!(y >= 0) || !Number.isFinite(x) || !Number.isFinite(y)) return Number.NaN;
  humlicekW4(x, y);
  return resultRe;
}

/**
 * Doppler (Gaussian) half width at half maximum: γD = (ν/c)·√(2 ln2 · kT/m), with m the
 * molecular mass M/N_A (CODATA constants; standard line-by-line practice).
 *
 * @param center_cm - line position, cm⁻¹
 * @param temperature_K - gas temperature, K
 * @param molarMass_g_mol - molar mass of the absorber, g/mol
 * @returns HWHM in cm⁻¹ (NaN for non-positive or non-finite input)
 * @example
 * dopplerHWHM(2143.27, 296, 28.010) // ≈ 0.00250 cm⁻¹
 */
export function dopplerHWHM(center_cm: number, temperature_K: number, molarMass_g_mol: number): number {
  if (!(center_cm > 0) || !(temperature_K > 0) || !(molarMass_g_mol > 0)) return Number.NaN;
  const massKg = (molarMass_g_mol * 1e-3) / AVOGADRO_PER_MOL;
  return (
    (center_cm / SPEED_OF_LIGHT_M_S) * Math.sqrt((2 * Math.LN2 * BOLTZMANN_J_K * temperature_K) / massKg)
  );
}

/** Inputs of {@link lorentzHWHM}. */
export interface LorentzWidthOptions {
  /** Air-broadened HWHM at 296 K and 1 atm, cm⁻¹/atm. */
  airBroadening_cm_atm: number;
  /** Temperature exponent n of γ(T) = γ(296 K)·(296/T)^n. Default 0.7. */
  temperatureExponent?: number;
  /** Gas temperature, K. */
  temperature_K: number;
  /** Total pressure, kPa. */
  pressure_kPa: number;
}

/**
 * Pressure-broadened (Lorentz) HWHM: γL = γ_air(296 K)·(P/101.325 kPa)·(296 K/T)^n
 * (standard line-by-line practice, from memory). Self-broadening is not modelled: it matters only
 * for absorbers at percent level and above.
 *
 * @param options - broadening coefficient (cm⁻¹/atm), exponent, temperature (K), pressure (kPa)
 * @returns HWHM in cm⁻¹ (NaN for invalid input)
 */
export function lorentzHWHM(options: LorentzWidthOptions): number {
  const { airBroadening_cm_atm, temperature_K, pressure_kPa } = options;
  const exponent = options.temperatureExponent ?? 0.7;
  if (
    !(airBroadening_cm_atm >= 0) ||
    !(temperature_K > 0) ||
    !(pressure_kPa >= 0) ||
    !Number.isFinite(exponent)
  )
    return Number.NaN;
  return (
    airBroadening_cm_atm *
    (pressure_kPa / REFERENCE_PRESSURE_KPA) *
    (REFERENCE_TEMPERATURE_K / temperature_K) ** exponent
  );
}

/**
 * Area-normalised Voigt profile at an offset from the line centre.
 *
 * With γD = 0 it is the Lorentzian (γL/π)/(Δ² + γL²) exactly; with γL = 0 the Gaussian through
 * w(x) = exp(−x²) (to W4's accuracy).
 *
 * @param offset_cm - ν − ν0, cm⁻¹
 * @param dopplerHWHM_cm - Doppler HWHM, cm⁻¹, ≥ 0
 * @param lorentzHWHM_cm - Lorentz HWHM, cm⁻¹, ≥ 0
 * @returns profile value in 1/cm⁻¹ (its integral over ν is 1); NaN when both widths are 0 or an
 *   input is invalid
 */
export function voigtProfile(offset_cm: number, dopplerHWHM_cm: number, lorentzHWHM_cm: number): number {
  if (!Number.isFinite(offset_cm) || !(dopplerHWHM_cm >= 0) || !(lorentzHWHM_cm >= 0)) return Number.NaN;
  if (dopplerHWHM_cm === 0) {
    if (lorentzHWHM_cm === 0) return Number.NaN;
    return lorentzHWHM_cm / Math.PI / (offset_cm * offset_cm + lorentzHWHM_cm * lorentzHWHM_cm);
  }
  const inverseAlpha = SQRT_LN2 / dopplerHWHM_cm;
  humlicekW4(offset_cm * inverseAlpha, lorentzHWHM_cm * inverseAlpha);
  return (resultRe * inverseAlpha) / SQRT_PI;
}

/**
 * Adds S·V(ν_k − ν0) to `target[k]` for every grid point ν_k = start + k·step within
 * ±cutoff of ν0. The profile is the same as {@link voigtProfile}; this form exists so a line's
 * window is evaluated without per-point calls.
 *
 * @param target - optical-depth (or cross-section) accumulator on a uniform grid; mutated
 * @param grid - `start_cm` and `step_cm` of that grid
 * @param line - centre (cm⁻¹), scale (what multiplies the area-normalised profile), widths (cm⁻¹),
 *   cutoff half-window (cm⁻¹)
 */
export function accumulateVoigt(
  target: Float64Array,
  grid: { start_cm: number; step_cm: number },
  line: {
    center_cm: number;
    scale: number;
    dopplerHWHM_cm: number;
    lorentzHWHM_cm: number;
    cutoff_cm: number;
  },
): void {
  const { start_cm, step_cm } = grid;
  const first = Math.max(0, Math.ceil((line.center_cm - line.cutoff_cm - start_cm) / step_cm));
  const last = Math.min(
    target.length - 1,
    Math.floor((line.center_cm + line.cutoff_cm - start_cm) / step_cm),
  );
  if (last < first) return;
  if (line.dopplerHWHM_cm === 0) {
    const gamma = line.lorentzHWHM_cm;
    const factor = (line.scale * gamma) / Math.PI;
    for (let k = first; k <= last; k++) {
      const offset = start_cm + k * step_cm - line.center_cm;
      target[k] = (target[k] as number) + factor / (offset * offset + gamma * gamma);
    }
    return;
  }
  const inverseAlpha = SQRT_LN2 / line.dopplerHWHM_cm;
  const y = line.lorentzHWHM_cm * inverseAlpha;
  const factor = (line.scale * inverseAlpha) / SQRT_PI;
  const x0 = (start_cm - line.center_cm) * inverseAlpha;
  const dx = step_cm * inverseAlpha;
  for (let k = first; k <= last; k++) {
    humlicekW4(x0 + k * dx, y);
    target[k] = (target[k] as number) + factor * resultRe;
  }
}

/**
 * Approximate Voigt HWHM from the Doppler and Lorentz HWHM (Olivero & Longbothum, JQSRT 17
 * (1977) 233, accurate to about 0.02 %; from memory):
 * γV ≈ 0.5346·γL + √(0.2166·γL² + γD²).
 *
 * @param dopplerHWHM_cm - cm⁻¹
 * @param lorentzHWHM_cm - cm⁻¹
 * @returns HWHM in cm⁻¹
 */
export function voigtHWHM(dopplerHWHM_cm: number, lorentzHWHM_cm: number): number {
  return (
    0.5346 * lorentzHWHM_cm +
    Math.sqrt(0.2166 * lorentzHWHM_cm * lorentzHWHM_cm + dopplerHWHM_cm * dopplerHWHM_cm)
  );
}
