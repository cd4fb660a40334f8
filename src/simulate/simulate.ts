/**
 * Physics-based gas-cell absorbance spectra with known truth.
 *
 * Steps (DESIGN §3):
 * 1. Line lists at the cell temperature ({@link lineList}); number density N = x·P/(kT).
 * 2. Monochromatic optical depth on a fine uniform grid, τ(ν) = Σ S_i(T)·V_i(ν − ν_i)·N·L, with
 *    Voigt profiles V_i (Doppler width from T and the molar mass, Lorentz width from air
 *    broadening scaled by pressure and (296/T)^n). Each line is evaluated only within
 *    ±min(25 cm⁻¹, 500 Voigt HWHM) of its centre; the Lorentz wings beyond carry a fraction
 *    ≈ 2γL/(π·25 cm⁻¹) of a line's area (0.17 % for CO at 1 atm), which is left out. The fine
 *    grid spacing is min(narrowest Voigt HWHM / 4, resolution / 8).
 * 3. Transmittance T = exp(−τ); the instrument line shape acts on the absorptance 1 − T (so on
 *    transmittance, where the real nonlinearity comes from), by FFT, with unit area
 *    ({@link convolveWithInstrument}; resolution Δν = 1/OPD_max).
 * 4. Sampling onto the output grid lo, lo + Δ, … ≤ hi (Δ = resolution/2 unless given) by cubic
 *    interpolation of the convolved absorptance, then A = −log10(T_apparent).
 * 5. Optional baseline polynomial Σ c_k·(ν − ν_c)^k (ν_c the range centre; c_k in AU/(cm⁻¹)^k)
 *    and white Gaussian noise of a given RMS from a seed.
 *
 * Consequences worth knowing: an opaque band (CO₂ ν₃ at percent level) does not reach infinite
 * absorbance, because the instrument function's tails bring in light from the transparent
 * surroundings; with triangular apodisation (sinc² tails) the apparent transmittance in a band
 * W wide is about 1/(π²·W/Δν), so a 60 cm⁻¹ opaque band at 0.5 cm⁻¹ reads ≈ 3 AU. Apparent
 * transmittance below 1e-5 (possible with boxcar ringing) is capped at 5 AU with a warning.
 */
import { BandwrightError } from '../errors.js';
import { makeSpectrum, type Spectrum } from '../spectrum/spectrum.js';
import { BOLTZMANN_J_K } from './constants.js';
import type { GasModel } from './gas-models.js';
import { APODIZATIONS, convolveWithInstrument, type Apodization } from './instrument.js';
import { accumulateVoigt, dopplerHWHM, lorentzHWHM, voigtHWHM } from './lineshape.js';
import { TEMPERATURE_LIMITS_K, lineList, requireGasModel, type LineList } from './lines.js';
import { createGaussian } from './random.js';

/** A gas in the simulated cell. */
export interface SimulatedGasInput {
  /** Formula or alias from the species table, e.g. `CO`. */
  name: string;
  /** Mole fraction, ppm (µmol/mol), ≥ 0. */
  ppm: number;
}

/** Options of {@link simulateSpectrum}. Units are in the field names. */
export interface SimulationOptions {
  /** Absorbing gases; may be empty (a zero-gas scan of baseline and noise only). */
  gases: readonly SimulatedGasInput[];
  /** Optical path length, m. Default 1. */
  pathLength_m?: number;
  /** Gas temperature, K (50–3000). Default 296. */
  temperature_K?: number;
  /** Total pressure, kPa. Default 101.325. */
  pressure_kPa?: number;
  /**
   * Output range [lo, hi], cm⁻¹. Default: the requested gases' band centres ± 150 cm⁻¹, rounded
   * out to 10 cm⁻¹ (required when `gases` is empty).
   */
  range_cm?: readonly [number, number];
  /** Nominal resolution Δν = 1/OPD_max, cm⁻¹ (0.01–32). Default 0.5. */
  resolution_cm?: number;
  /** Apodisation: `boxcar` (sinc ILS) or `triangular` (sinc² ILS). Default `triangular`. */
  apodization?: Apodization;
  /** Output point spacing, cm⁻¹. Default resolution/2. */
  pointSpacing_cm?: number;
  /** Baseline polynomial coefficients c_0, c_1, …: AU/(cm⁻¹)^k about the range centre. Default none. */
  baseline?: readonly number[];
  /** RMS of white Gaussian noise added to absorbance, AU. Default 0. */
  noiseRms_AU?: number;
  /** Seed of the noise generator (integer). Default 1. */
  seed?: number;
  /** Title for the spectrum's metadata. Default lists the gases. */
  title?: string;
}

/** What was put into the cell, for checking a pipeline against the truth. */
export interface SimulatedGasTruth {
  /** Canonical gas name. */
  name: string;
  /** Mole fraction, ppm. */
  ppm: number;
  /** Number density of the gas, molecules/cm³. */
  numberDensity_per_cm3: number;
  /** Sum of the gas's line intensities at the cell temperature, cm/molecule. */
  bandStrength_cm_per_molecule: number;
  /**
   * Weak-absorption band area S(T)·N·L/ln 10, AU·cm⁻¹, over all of the gas's modelled lines
   * (Beer–Lambert, DESIGN §3); the apparent area falls below it when lines saturate.
   */
  weakLimitBandArea_AU_cm: number;
  /** Lines of this gas that contributed. */
  lineCount: number;
  /** True when the gas comes from an approximate band model. */
  approximate: boolean;
}

/** Result of {@link simulateSpectrum}. */
export interface SimulationResult {
  /** Decadic absorbance on the output grid, with the cell conditions in its metadata. */
  spectrum: Spectrum;
  /** Things a caller should show: approximate models, saturation, capped points, empty ranges. */
  warnings: string[];
  /** Gases simulated with approximate band models (their spectra are not quantitative). */
  approximateGases: string[];
  /** Model limits worth knowing (for example the simplified NO model). */
  notes: string[];
  /** The truth per gas. */
  gases: SimulatedGasTruth[];
  /** The fine grid used: spacing (cm⁻¹), points, and the line cutoff (cm⁻¹). */
  fineGrid: { step_cm: number; points: number; maxCutoff_cm: number };
}

const DEFAULTS = {
  pathLength_m: 1,
  temperature_K: 296,
  pressure_kPa: 101.325,
  resolution_cm: 0.5,
  apodization: 'triangular' as Apodization,
  noiseRms_AU: 0,
  seed: 1,
};

/** Widest line window, cm⁻¹. */
const LINE_CUTOFF_CM = 25;
/** Line window in Voigt half-widths, when that is narrower. */
const LINE_CUTOFF_WIDTHS = 500;
/** Most fine-grid points one simulation may use (memory and time guard). */
const MAX_FINE_POINTS = 1 << 22;
/** Most output points. */
const MAX_OUTPUT_POINTS = 2_000_000;
/** Smallest apparent transmittance turned into absorbance; below it absorbance is capped. */
const TRANSMITTANCE_FLOOR = 1e-5;
/** Highest baseline order accepted. */
const MAX_BASELINE_TERMS = 10;

function invalid(parameter: string, value: unknown, rule: string): never {
  const shown =
    typeof value === 'string'
      ? JSON.stringify(value)
      : Array.isArray(value)
        ? `[${value.join(', ')}]`
        : String(value);
  throw new BandwrightError('INVALID_VALUE', `${parameter} = ${shown}, ${rule}`, { parameter });
}

function finiteNumber(value: unknown, parameter: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value))
    invalid(parameter, value, 'must be a finite number');
  return value;
}

function positive(value: unknown, parameter: string): number {
  const number = finiteNumber(value, parameter);
  if (!(number > 0)) invalid(parameter, value, 'must be > 0');
  return number;
}

interface ResolvedGas {
  model: GasModel;
  ppm: number;
}

interface Resolved {
  gases: ResolvedGas[];
  pathLength_m: number;
  temperature_K: number;
  pressure_kPa: number;
  range: [number, number];
  resolution_cm: number;
  apodization: Apodization;
  pointSpacing_cm: number;
  baseline: number[];
  noiseRms_AU: number;
  seed: number;
  title: string;
}

function resolveOptions(options: SimulationOptions): Resolved {
  if (typeof options !== 'object' || options === null) invalid('options', options, 'must be an object');
  if (!Array.isArray(options.gases)) invalid('gases', options.gases, 'must be an array of { name, ppm }');
  const gases: ResolvedGas[] = [];
  const seen = new Map<string, number>();
  let totalPpm = 0;
  options.gases.forEach((gas: SimulatedGasInput, i: number) => {
    const where = `gases[${i}]`;
    if (typeof gas !== 'object' || gas === null) invalid(where, gas, 'must be an object { name, ppm }');
    if (typeof gas.name !== 'string') invalid(`${where}.name`, gas.name, 'must be a gas name such as "CO"');
    const model = requireGasModel(gas.name, `${where}.name`);
    const ppm = finiteNumber(gas.ppm, `${where}.ppm`);
    if (ppm < 0 || ppm > 1e6) invalid(`${where}.ppm`, ppm, 'must be between 0 and 1000000');
    const earlier = seen.get(model.gas);
    if (earlier !== undefined)
      invalid(`${where}.name`, gas.name, `${model.gas} is already given as gases[${earlier}]`);
    seen.set(model.gas, i);
    totalPpm += ppm;
    gases.push({ model, ppm });
  });
  if (totalPpm > 1e6 * (1 + 1e-12))
    invalid('gases', `${totalPpm} ppm in total`, 'the mole fractions must add up to at most 1000000 ppm');

  const pathLength_m = positive(options.pathLength_m ?? DEFAULTS.pathLength_m, 'pathLength_m');
  const temperature_K = finiteNumber(options.temperature_K ?? DEFAULTS.temperature_K, 'temperature_K');
  if (temperature_K < TEMPERATURE_LIMITS_K[0] || temperature_K > TEMPERATURE_LIMITS_K[1]) {
    invalid(
      'temperature_K',
      temperature_K,
      `must be between ${TEMPERATURE_LIMITS_K[0]} and ${TEMPERATURE_LIMITS_K[1]} K`,
    );
  }
  const pressure_kPa = positive(options.pressure_kPa ?? DEFAULTS.pressure_kPa, 'pressure_kPa');
  if (pressure_kPa > 10_000) invalid('pressure_kPa', pressure_kPa, 'must be at most 10000 kPa');
  const resolution_cm = positive(options.resolution_cm ?? DEFAULTS.resolution_cm, 'resolution_cm');
  if (resolution_cm < 0.01 || resolution_cm > 32)
    invalid('resolution_cm', resolution_cm, 'must be between 0.01 and 32 cm⁻¹');
  const apodization = options.apodization ?? DEFAULTS.apodization;
  if (!APODIZATIONS.includes(apodization))
    invalid('apodization', apodization, `must be one of ${APODIZATIONS.join(', ')}`);

  let range: [number, number];
  if (options.range_cm === undefined) {
    if (gases.length === 0) invalid('range_cm', undefined, 'must be given when no gas is simulated');
    const centres = gases.flatMap(({ model }) => bandCentres(model));
    range = [
      Math.max(10, Math.floor((Math.min(...centres) - 150) / 10) * 10),
      Math.ceil((Math.max(...centres) + 150) / 10) * 10,
    ];
  } else {
    const given = options.range_cm;
    if (!Array.isArray(given) || given.length !== 2) invalid('range_cm', given, 'must be [lo, hi] in cm⁻¹');
    const lo = finiteNumber(given[0], 'range_cm[0]');
    const hi = finiteNumber(given[1], 'range_cm[1]');
    if (!(lo > 0)) invalid('range_cm[0]', lo, 'must be > 0');
    if (!(hi > lo)) invalid('range_cm', given, 'hi must be greater than lo');
    if (hi > 20_000) invalid('range_cm[1]', hi, 'must be at most 20000 cm⁻¹');
    range = [lo, hi];
  }
  const pointSpacing_cm = positive(options.pointSpacing_cm ?? resolution_cm / 2, 'pointSpacing_cm');
  const outputPoints = Math.floor((range[1] - range[0]) / pointSpacing_cm + 1e-9) + 1;
  if (outputPoints < 2)
    invalid(
      'pointSpacing_cm',
      pointSpacing_cm,
      `must leave at least 2 points in ${range[0]}–${range[1]} cm⁻¹`,
    );
  if (outputPoints > MAX_OUTPUT_POINTS) {
    throw new BandwrightError(
      'LIMIT',
      `pointSpacing_cm = ${pointSpacing_cm} over ${range[0]}–${range[1]} cm⁻¹ ` +
        `gives ${outputPoints} points, at most ${MAX_OUTPUT_POINTS} are allowed`,
      { parameter: 'pointSpacing_cm' },
    );
  }
  const baselineInput = options.baseline ?? [];
  if (!Array.isArray(baselineInput) || baselineInput.length > MAX_BASELINE_TERMS)
    invalid('baseline', baselineInput, `must be an array of at most ${MAX_BASELINE_TERMS} coefficients`);
  const baseline = baselineInput.map((c: unknown, k: number) => finiteNumber(c, `baseline[${k}]`));
  const noiseRms_AU = finiteNumber(options.noiseRms_AU ?? DEFAULTS.noiseRms_AU, 'noiseRms_AU');
  if (noiseRms_AU < 0) invalid('noiseRms_AU', noiseRms_AU, 'must be >= 0');
  const seed = finiteNumber(options.seed ?? DEFAULTS.seed, 'seed');
  if (!Number.isInteger(seed)) invalid('seed', seed, 'must be an integer');
  const title =
    options.title ??
    'simulated: ' +
      (gases.length === 0
        ? 'no absorber'
        : gases.map(({ model, ppm }) => `${model.gas} ${ppm} ppm`).join(', '));
  if (typeof title !== 'string') invalid('title', title, 'must be a string');
  return {
    gases,
    pathLength_m,
    temperature_K,
    pressure_kPa,
    range,
    resolution_cm,
    apodization,
    pointSpacing_cm,
    baseline,
    noiseRms_AU,
    seed,
    title,
  };
}

function bandCentres(model: GasModel): number[] {
  switch (model.kind) {
    case 'band-model':
      return model.bands.map((band) => band.center_cm);
    case 'linear-band':
      return [model.constants.bandOrigin_cm];
    case 'diatomic':
      return model.isotopologues.map((iso) => iso.constants.we - 2 * iso.constants.wexe);
    case 'diatomic-pi':
      return [model.constants.we - 2 * model.constants.wexe];
  }
}

/** Four-point (cubic Lagrange) interpolation on a uniform grid. */
function interpolateCubic(values: Float64Array, start_cm: number, step_cm: number, x_cm: number): number {
  const u = (x_cm - start_cm) / step_cm;
  const last = values.length - 1;
  const k = Math.min(Math.max(Math.floor(u), 1), last - 2);
  const t = u - k;
  const p0 = values[k - 1] as number;
  const p1 = values[k] as number;
  const p2 = values[k + 1] as number;
  const p3 = values[k + 2] as number;
  return (
    (-t * (t - 1) * (t - 2) * p0) / 6 +
    ((t + 1) * (t - 1) * (t - 2) * p1) / 2 -
    ((t + 1) * t * (t - 2) * p2) / 2 +
    ((t + 1) * t * (t - 1) * p3) / 6
  );
}

interface PreparedLine {
  center_cm: number;
  scale: number;
  dopplerHWHM_cm: number;
  lorentzHWHM_cm: number;
  cutoff_cm: number;
}

/**
 * Simulates the decadic absorbance spectrum of a gas mixture in a cell as an FTIR would record
 * it (see the module header for the physics and numerics). Pure: the options are not changed.
 *
 * @param options - gases (ppm), path length (m), temperature (K), pressure (kPa), range and
 *   resolution (cm⁻¹), apodisation, point spacing (cm⁻¹), baseline (AU/(cm⁻¹)^k), noise (AU), seed
 * @returns the spectrum, warnings, approximate gases, model notes and the truth per gas
 * @throws BandwrightError `INVALID_VALUE` naming the option, value and rule; `UNKNOWN_GAS` /
 *   `IR_INACTIVE` for gases that cannot be simulated; `LIMIT` when the fine grid or the output
 *   would be too large
 * @example
 * const { spectrum, warnings } = simulateSpectrum({
 *   gases: [{ name: 'CO', ppm: 100 }], pathLength_m: 1, temperature_K: 296, pressure_kPa: 101.325,
 *   range_cm: [1900, 2400], resolution_cm: 0.5, apodization: 'triangular',
 * });
 */
export function simulateSpectrum(options: SimulationOptions): SimulationResult {
  const o = resolveOptions(options);
  const [lo, hi] = o.range;
  const warnings: string[] = [];
  const notes: string[] = [];
  const approximateGases: string[] = [];

  // molecules/cm³ per unit mole fraction
  const numberDensityFactor = ((o.pressure_kPa * 1e3) / (BOLTZMANN_J_K * o.temperature_K)) * 1e-6;
  const pathLength_cm = o.pathLength_m * 100;
  const edge = 50 * o.resolution_cm + 2; // margin beyond the output range, cm⁻¹
  const fineLo = lo - edge;
  const fineHi = hi + edge;

  const prepared: PreparedLine[] = [];
  const truth: SimulatedGasTruth[] = [];
  for (const { model, ppm } of o.gases) {
    const list: LineList = lineList(model.gas, o.temperature_K);
    const numberDensity = ppm * 1e-6 * numberDensityFactor;
    let count = 0;
    for (const line of list.lines) {
      const doppler = dopplerHWHM(line.position_cm, o.temperature_K, line.molarMass_g_mol);
      const lorentz = lorentzHWHM({
        airBroadening_cm_atm: line.airBroadening_cm_atm,
        temperatureExponent: line.temperatureExponent,
        temperature_K: o.temperature_K,
        pressure_kPa: o.pressure_kPa,
      });
      const cutoff = Math.min(LINE_CUTOFF_CM, LINE_CUTOFF_WIDTHS * voigtHWHM(doppler, lorentz));
      if (line.position_cm + cutoff < fineLo || line.position_cm - cutoff > fineHi) continue;
      count++;
      if (numberDensity > 0) {
        prepared.push({
          center_cm: line.position_cm,
          scale: line.intensity_cm_per_molecule * numberDensity * pathLength_cm,
          dopplerHWHM_cm: doppler,
          lorentzHWHM_cm: lorentz,
          cutoff_cm: cutoff,
        });
      }
    }
    truth.push({
      name: model.gas,
      ppm,
      numberDensity_per_cm3: numberDensity,
      bandStrength_cm_per_molecule: list.totalIntensity_cm_per_molecule,
      weakLimitBandArea_AU_cm:
        (list.totalIntensity_cm_per_molecule * numberDensity * pathLength_cm) / Math.LN10,
      lineCount: count,
      approximate: model.approximate,
    });
    if (model.approximate) {
      approximateGases.push(model.gas);
      warnings.push(
        `${model.gas}: approximate band model (band centres right, strengths from memory, ` +
          'invented line pattern); use it as an interferent or for demonstrations, ' +
          `not to judge how well ${model.gas} is quantified`,
      );
    } else {
      for (const note of model.notes) notes.push(`${model.gas}: ${note}`);
    }
    if (count === 0) warnings.push(`${model.gas}: no modelled absorption between ${lo} and ${hi} cm⁻¹`);
  }
  if (o.temperature_K < 200 || o.temperature_K > 800) {
    warnings.push(
      `temperature_K = ${o.temperature_K}: broadening exponents and the approximate band models ` +
        'are meant for about 200–800 K',
    );
  }

  // Fine grid: resolve the narrowest line and the instrument function.
  let step = o.resolution_cm / 8;
  let maxCutoff = 0;
  for (const line of prepared) {
    step = Math.min(step, voigtHWHM(line.dopplerHWHM_cm, line.lorentzHWHM_cm) / 4);
    maxCutoff = Math.max(maxCutoff, line.cutoff_cm);
  }
  const finePoints = Math.floor((fineHi - fineLo) / step) + 1;
  if (finePoints > MAX_FINE_POINTS) {
    throw new BandwrightError(
      'LIMIT',
      `range_cm = [${lo}, ${hi}] needs ${finePoints} fine-grid points ` +
        `at ${step.toPrecision(3)} cm⁻¹ spacing (narrow lines at pressure_kPa = ${o.pressure_kPa}), ` +
        `at most ${MAX_FINE_POINTS} are allowed; narrow the range or raise the pressure`,
      { parameter: 'range_cm' },
    );
  }
  const opticalDepth = new Float64Array(finePoints);
  const grid = { start_cm: fineLo, step_cm: step };
  for (const line of prepared) accumulateVoigt(opticalDepth, grid, line);

  // Absorptance 1 − T, tapered to zero over the outer half of the margins so the FFT sees no
  // step at the grid ends (the output range is never inside the taper).
  const absorptance = new Float64Array(finePoints);
  const taper = edge / 2;
  for (let k = 0; k < finePoints; k++) {
    const x = fineLo + k * step;
    const fromEdge = Math.min(x - fineLo, fineHi - x);
    const weight = fromEdge >= taper ? 1 : 0.5 * (1 - Math.cos((Math.PI * Math.max(0, fromEdge)) / taper));
    absorptance[k] = -Math.expm1(-(opticalDepth[k] as number)) * weight;
  }
  const apparent = convolveWithInstrument(absorptance, {
    step_cm: step,
    resolution_cm: o.resolution_cm,
    apodization: o.apodization,
    padding: Math.ceil((2 * edge) / step),
  });

  const outputPoints = Math.floor((hi - lo) / o.pointSpacing_cm + 1e-9) + 1;
  const x = new Float64Array(outputPoints);
  const y = new Float64Array(outputPoints);
  const centre = (lo + hi) / 2;
  const noise = o.noiseRms_AU > 0 ? createGaussian(o.seed) : undefined;
  let capped = 0;
  let peak = -Infinity;
  let peakAt = lo;
  for (let i = 0; i < outputPoints; i++) {
    const nu = lo + i * o.pointSpacing_cm;
    x[i] = nu;
    const a = interpolateCubic(apparent, fineLo, step, nu);
    let absorbance: number;
    if (1 - a < TRANSMITTANCE_FLOOR) {
      capped++;
      absorbance = -Math.log10(TRANSMITTANCE_FLOOR);
    } else {
      absorbance = -Math.log1p(-a) / Math.LN10;
    }
    if (absorbance > peak) {
      peak = absorbance;
      peakAt = nu;
    }
    let value = absorbance;
    let power = 1;
    for (const c of o.baseline) {
      value += c * power;
      power *= nu - centre;
    }
    if (noise !== undefined) value += o.noiseRms_AU * noise();
    y[i] = value;
  }
  if (capped > 0) {
    warnings.push(
      `${capped} point(s) with apparent transmittance below ${TRANSMITTANCE_FLOOR}` +
        `${o.apodization === 'boxcar' ? ' (full absorption or boxcar ringing)' : ' (full absorption)'}` +
        `: absorbance capped at ${-Math.log10(TRANSMITTANCE_FLOOR)} AU there`,
    );
  }
  if (peak > 1) {
    warnings.push(
      `peak absorbance ${peak.toFixed(2)} AU at ${peakAt.toFixed(2)} cm⁻¹ is above 1 AU: ` +
        'lines saturate and band areas grow less than linearly with concentration',
    );
  }

  const spectrum = makeSpectrum({
    x,
    y,
    yKind: 'absorbance',
    metadata: {
      title: o.title,
      pathLength_m: o.pathLength_m,
      temperature_K: o.temperature_K,
      pressure_kPa: o.pressure_kPa,
      resolution_cm: o.resolution_cm,
    },
  });
  return {
    spectrum,
    warnings,
    approximateGases,
    notes,
    gases: truth,
    fineGrid: { step_cm: step, points: finePoints, maxCutoff_cm: maxCutoff },
  };
}
