/**
 * Line lists from molecular constants.
 *
 * Diatomic 1 ← 0 bands (CO, HCl): positions ν = G(1) − G(0) + F₁(J′) − F₀(J″) with the Herzberg
 * expansions of {@link DiatomicConstants}; R(J″): J′ = J″ + 1, P(J″): J′ = J″ − 1; no Q branch in
 * a ¹Σ–¹Σ band (common practice). Linear polyatomic parallel bands (CO₂ ν₃, N₂O ν₃) use a band
 * origin with B and D of both states. NO uses a simplified ²Π model with P, Q and R branches.
 *
 * Intensities (standard line-by-line practice, from memory):
 *   w_i(T) = ν_i · L_i · exp(−c₂E″_i/T) · (1 − exp(−c₂ν_i/T)) / Q(T)
 * with L_i the Hönl–London factor (Σ–Σ: R J″+1, P J″; ²Π case (a), sub-band Ω:
 * R (J+1+Ω)(J+1−Ω)/(J+1), Q (2J+1)Ω²/(J(J+1)), P (J+Ω)(J−Ω)/J, J = J″; Herzberg, common
 * practice), E″ the lower-state energy above the lowest level and Q(T) the total internal
 * partition sum of the model's levels (a direct sum over v and J, not the high-temperature
 * approximation). The list is normalised so that at 296 K the intensities add up to the band
 * strength: S_i(T) = S_band · w_i(T) / Σ_j w_j(296 K). Hence S_i(T) = S_i(296)·Q(296)/Q(T)·
 * exp(−c₂E″/T)/exp(−c₂E″/296)·(1 − exp(−c₂ν/T))/(1 − exp(−c₂ν/296)),
 * the scaling in facts.md.
 */
import { BandwrightError } from '../errors.js';
import { requireInfraredSpecies } from '../gas/species.js';
import {
  REFERENCE_TEMPERATURE_K,
  SECOND_RADIATION_CONSTANT_CM_K as C2,
  // eslint-disable-next-line @typescript-eslint/no-unused-vars -- named by the {@link} in the module comment
  type DiatomicConstants,
} from './constants.js';
import {
  J_LIMIT,
  NEGLIGIBLE,
  bandOrigin,
  centrifugalConstant,
  diatomicPartitionSum,
  harmonicVibrationalPartitionSum,
  linearRotationalPartitionSum,
  linearTerm,
  rotationalConstant,
  rotationalTerm,
  sumOverJ,
  vibrationalLevels,
  vibrationalTerm,
} from './levels.js';
import {
  GAS_MODELS,
  type ApproximateBand,
  type BandGasModel,
  type DiatomicGasModel,
  type GasModel,
  type LinearGasModel,
  type PiGasModel,
} from './gas-models.js';
import { createRandom, seedFromText } from './random.js';

/** Rotational branch: ΔJ = J′ − J″ = −1 (P), 0 (Q), +1 (R). */
export type Branch = 'P' | 'Q' | 'R';

/** One absorption line of a line list. */
export interface SpectralLine {
  /** Line position, cm⁻¹. */
  position_cm: number;
  /** Line intensity at the list's temperature, cm/molecule (per molecule of the gas). */
  intensity_cm_per_molecule: number;
  /** Lower-state energy E″ above the lowest level, cm⁻¹. */
  lowerStateEnergy_cm: number;
  /** Lower-state rotational quantum number J″ (an effective, non-integer J for pseudo-lines). */
  lowerJ: number;
  /** Branch. */
  branch: Branch;
  /** Label such as `R(0)`, `H³⁵Cl P(3)`, `Q(1.5) ²Π1/2` or `ν2 pseudo-line R 12`. */
  label: string;
  /** Air-broadened HWHM at 296 K and 1 atm, cm⁻¹/atm. */
  airBroadening_cm_atm: number;
  /** Temperature exponent of the broadening. */
  temperatureExponent: number;
  /** Molar mass of the absorbing isotopologue (for the Doppler width), g/mol. */
  molarMass_g_mol: number;
}

/** A gas's line list at one temperature. */
export interface LineList {
  /** Canonical gas name. */
  gas: string;
  /** Temperature the intensities are for, K. */
  temperature_K: number;
  /** Which kind of model made it. */
  model: GasModel['kind'];
  /** True for approximate band models. */
  approximate: boolean;
  /** Lines in ascending position. */
  lines: SpectralLine[];
  /** Sum of the line intensities at `temperature_K`, cm/molecule. */
  totalIntensity_cm_per_molecule: number;
  /** Band strength the list is normalised to at 296 K (all bands of the model), cm/molecule. */
  bandStrength296_cm_per_molecule: number;
  /** Limits of the model, for display. */
  notes: string[];
  /** Sources of the constants, band strengths and broadening. */
  sources: string[];
}

// ---------------------------------------------------------------------------------------------
// Raw lines (weights before normalisation)

/** A line before normalisation: weight at T and at 296 K. */
interface RawLine {
  position_cm: number;
  lowerStateEnergy_cm: number;
  lowerJ: number;
  branch: Branch;
  label: string;
  molarMass_g_mol: number;
  /** Share of the model's band strength that this line's group (isotopologue, band, branch set) carries. */
  group: number;
}

function lineWeight(
  position_cm: number,
  honlLondon: number,
  lowerStateEnergy_cm: number,
  partitionSum: number,
  temperature_K: number,
): number {
  return (
    (position_cm *
      honlLondon *
      Math.exp((-C2 * lowerStateEnergy_cm) / temperature_K) *
      -Math.expm1((-C2 * position_cm) / temperature_K)) /
    partitionSum
  );
}

/** Lines of one group with weights at T and at 296 K and the group's share of the band strength. */
interface Group {
  lines: RawLine[];
  weights: number[];
  weights296: number[];
  share: number;
}

/** Highest J″ worth listing: past the population maximum and negligible at max(T, 296 K). */
function lowerJLimit(energy: (J: number) => number, start: number, temperature_K: number): number {
  const hot = Math.max(temperature_K, REFERENCE_TEMPERATURE_K);
  let largest = 0;
  for (let J = start; J <= start + J_LIMIT; J++) {
    const value = (2 * J + 1) * Math.exp((-C2 * energy(J)) / hot);
    if (value > largest) largest = value;
    else if (value < 1e-10 * largest) return J;
  }
  return start + J_LIMIT;
}

function diatomicGroups(model: DiatomicGasModel, temperature_K: number): Group[] {
  const prefix = model.isotopologues.length > 1;
  return model.isotopologues.map(({ constants, abundance, molarMass_g_mol }) => {
    const q = diatomicPartitionSum(constants, temperature_K).total;
    const q296 = diatomicPartitionSum(constants, REFERENCE_TEMPERATURE_K).total;
    const origin = bandOrigin(constants);
    const maxJ = lowerJLimit((J) => rotationalTerm(constants, 0, J), 0, temperature_K);
    const group: Group = { lines: [], weights: [], weights296: [], share: abundance };
    const name = prefix ? `${constants.molecule} ` : '';
    for (let J = 0; J <= maxJ; J++) {
      const lower = rotationalTerm(constants, 0, J);
      for (const branch of ['P', 'R'] as const) {
        if (branch === 'P' && J === 0) continue;
        const upperJ = branch === 'R' ? J + 1 : J - 1;
        const position = origin + rotationalTerm(constants, 1, upperJ) - lower;
        const honlLondon = branch === 'R' ? J + 1 : J;
        group.lines.push({
          position_cm: position,
          lowerStateEnergy_cm: lower,
          lowerJ: J,
          branch,
          label: `${name}${branch}(${J})`,
          molarMass_g_mol,
          group: 0,
        });
        group.weights.push(lineWeight(position, honlLondon, lower, q, temperature_K));
        group.weights296.push(lineWeight(position, honlLondon, lower, q296, REFERENCE_TEMPERATURE_K));
      }
    }
    return group;
  });
}

/** ²Π case (a) level energy above G(0) (before shifting to the lowest level), cm⁻¹. */
function piTerm(model: PiGasModel, v: number, omega: number, J: number): number {
  const c = model.constants;
  const x = J * (J + 1) - omega * omega;
  const spinOrbit = omega > 1 ? c.spinOrbitA : 0;
  return (
    vibrationalTerm(c, v) -
    vibrationalTerm(c, 0) +
    spinOrbit +
    rotationalConstant(c, v) * x -
    centrifugalConstant(c, v) * x * x
  );
}

const OMEGAS = [0.5, 1.5] as const;

function piPartitionSum(model: PiGasModel, temperature_K: number, lowest: number): number {
  let total = 0;
  for (const v of vibrationalLevels(model.constants, temperature_K)) {
    for (const omega of OMEGAS) {
      total += sumOverJ(0, (k) => {
        const J = omega + k;
        return (2 * J + 1) * Math.exp((-C2 * (piTerm(model, v, omega, J) - lowest)) / temperature_K);
      });
    }
  }
  return total;
}

function piGroups(model: PiGasModel, temperature_K: number): Group[] {
  const lowest = piTerm(model, 0, 0.5, 0.5);
  const q = piPartitionSum(model, temperature_K, lowest);
  const q296 = piPartitionSum(model, REFERENCE_TEMPERATURE_K, lowest);
  const group: Group = { lines: [], weights: [], weights296: [], share: 1 };
  for (const omega of OMEGAS) {
    const maxK = lowerJLimit((k) => piTerm(model, 0, omega, omega + k) - lowest, 0, temperature_K);
    const subBand = omega < 1 ? '²Π1/2' : '²Π3/2';
    for (let k = 0; k <= maxK; k++) {
      const J = omega + k;
      const lower = piTerm(model, 0, omega, J) - lowest;
      const candidates: [Branch, number, number][] = [
        ['R', J + 1, ((J + 1 + omega) * (J + 1 - omega)) / (J + 1)],
        ['Q', J, ((2 * J + 1) * omega * omega) / (J * (J + 1))],
        ['P', J - 1, ((J + omega) * (J - omega)) / J],
      ];
      for (const [branch, upperJ, honlLondon] of candidates) {
        if (upperJ < omega || !(honlLondon > 0)) continue;
        const position = piTerm(model, 1, omega, upperJ) - lowest - lower;
        group.lines.push({
          position_cm: position,
          lowerStateEnergy_cm: lower,
          lowerJ: J,
          branch,
          label: `${branch}(${J}) ${subBand}`,
          molarMass_g_mol: model.molarMass_g_mol,
          group: 0,
        });
        group.weights.push(lineWeight(position, honlLondon, lower, q, temperature_K));
        group.weights296.push(lineWeight(position, honlLondon, lower, q296, REFERENCE_TEMPERATURE_K));
      }
    }
  }
  return [group];
}

function linearGroups(model: LinearGasModel, temperature_K: number): Group[] {
  const c = model.constants;
  const q =
    linearRotationalPartitionSum(c, temperature_K) *
    harmonicVibrationalPartitionSum(model.vibrationalModes, temperature_K);
  const q296 =
    linearRotationalPartitionSum(c, REFERENCE_TEMPERATURE_K) *
    harmonicVibrationalPartitionSum(model.vibrationalModes, REFERENCE_TEMPERATURE_K);
  const step = c.lowerStateJ === 'even' ? 2 : 1;
  const maxJ = lowerJLimit((J) => linearTerm(c.lowerB, c.lowerD, J), 0, temperature_K);
  const group: Group = { lines: [], weights: [], weights296: [], share: 1 };
  for (let J = 0; J <= maxJ; J += step) {
    const lower = linearTerm(c.lowerB, c.lowerD, J);
    for (const branch of ['P', 'R'] as const) {
      if (branch === 'P' && J === 0) continue;
      const upperJ = branch === 'R' ? J + 1 : J - 1;
      const position = c.bandOrigin_cm + linearTerm(c.upperB, c.upperD, upperJ) - lower;
      const honlLondon = branch === 'R' ? J + 1 : J;
      group.lines.push({
        position_cm: position,
        lowerStateEnergy_cm: lower,
        lowerJ: J,
        branch,
        label: `${branch}(${J})`,
        molarMass_g_mol: model.molarMass_g_mol,
        group: 0,
      });
      group.weights.push(lineWeight(position, honlLondon, lower, q, temperature_K));
      group.weights296.push(lineWeight(position, honlLondon, lower, q296, REFERENCE_TEMPERATURE_K));
    }
  }
  return [group];
}

/** Pseudo-rotor partition sum Σ_J (2J+1)·exp(−c₂BJ(J+1)/T), consistent with the pseudo-levels. */
function pseudoRotorPartitionSum(B: number, temperature_K: number): number {
  return sumOverJ(0, (J) => (2 * J + 1) * Math.exp((-C2 * B * J * (J + 1)) / temperature_K));
}

function scatterFactor(kind: ApproximateBand['intensityScatter'], random: () => number): number {
  switch (kind) {
    case 'exponential':
      return -Math.log(1 - random());
    case 'uniform':
      return 0.7 + 0.6 * random();
    case 'none':
      return 1;
  }
}

function bandModelGroups(model: BandGasModel, temperature_K: number): Group[] {
  const total = model.bands.reduce((sum, band) => sum + band.bandStrength.value_cm_per_molecule, 0);
  const qVib = harmonicVibrationalPartitionSum(model.vibrationalModes, temperature_K);
  const qVib296 = harmonicVibrationalPartitionSum(model.vibrationalModes, REFERENCE_TEMPERATURE_K);
  const groups: Group[] = [];
  for (const band of model.bands) {
    // A fixed stream per gas and band: the invented pattern is the same in every run, so a
    // simulated spectrum's truth does not depend on the noise seed.
    const random = createRandom(seedFromText(`${model.gas} ${band.mode}`));
    const B = band.envelopeB_cm;
    const q = pseudoRotorPartitionSum(B, temperature_K) * qVib;
    const q296 = pseudoRotorPartitionSum(B, REFERENCE_TEMPERATURE_K) * qVib296;
    const share = band.bandStrength.value_cm_per_molecule / total;
    const sides: Group = {
      lines: [],
      weights: [],
      weights296: [],
      share: share * (1 - band.qBranchFraction),
    };
    const add = (
      target: Group,
      position: number,
      J: number,
      honlLondon: number,
      branch: Branch,
      label: string,
    ): void => {
      const lower = B * J * (J + 1);
      target.lines.push({
        position_cm: position,
        lowerStateEnergy_cm: lower,
        lowerJ: J,
        branch,
        label,
        molarMass_g_mol: model.molarMass_g_mol,
        group: 0,
      });
      target.weights.push(lineWeight(position, honlLondon, lower, q, temperature_K));
      target.weights296.push(lineWeight(position, honlLondon, lower, q296, REFERENCE_TEMPERATURE_K));
    };
    const steps = Math.floor(band.maxOffset_cm / band.lineSpacing_cm);
    for (let k = 1; k <= steps; k++) {
      for (const branch of ['P', 'R'] as const) {
        const offset = band.lineSpacing_cm * (k + band.positionJitter * (random() - 0.5));
        const J = branch === 'R' ? Math.max(0, offset / (2 * B) - 1) : offset / (2 * B);
        const honlLondon = (branch === 'R' ? J + 1 : J) * scatterFactor(band.intensityScatter, random);
        const sign = branch === 'R' ? 1 : -1;
        const n = Math.max(1, Math.round(band.clusterComponents));
        for (let c = 0; c < n; c++) {
          const spread = n === 1 ? 0 : band.clusterSpread_cm * (c / (n - 1) - 0.5);
          const componentWeight = n === 1 ? 1 : 0.5 + random();
          add(
            sides,
            band.center_cm + sign * offset + spread,
            J,
            (honlLondon * componentWeight) / n,
            branch,
            `${band.mode} pseudo-line ${branch} ${k}${n > 1 ? `.${c + 1}` : ''}`,
          );
        }
      }
    }
    groups.push(sides);
    if (band.qBranchFraction > 0) {
      const qBranch: Group = { lines: [], weights: [], weights296: [], share: share * band.qBranchFraction };
      const reference = 3 * Math.sqrt(REFERENCE_TEMPERATURE_K / (2 * C2 * B));
      const maxJ = lowerJLimit((J) => B * J * (J + 1), 1, temperature_K);
      for (let J = 1; J <= maxJ; J++) {
        const offset = (band.qBranchWidth_cm * J * (J + 1)) / (reference * (reference + 1));
        if (offset > band.maxOffset_cm) break;
        add(
          qBranch,
          band.center_cm - offset,
          J,
          (2 * J + 1) * scatterFactor(band.intensityScatter, random),
          'Q',
          `${band.mode} pseudo-line Q ${J}`,
        );
      }
      groups.push(qBranch);
    }
  }
  return groups;
}

// ---------------------------------------------------------------------------------------------
// Public line lists

/** Lowest and highest temperature the partition sums and models are used for, K. */
export const TEMPERATURE_LIMITS_K: readonly [number, number] = [50, 3000];

/**
 * Looks up the simulator's model of a gas.
 *
 * @param gas - formula or alias (`CO`, `carbon monoxide`)
 * @param where - what to name in messages, e.g. `gases[0].name`
 * @returns the model
 * @throws BandwrightError `UNKNOWN_GAS` / `IR_INACTIVE` (from the species table) and
 *   `INVALID_VALUE` for a gas that the simulator has no model for
 */
export function requireGasModel(gas: string, where = 'gas'): GasModel {
  const species = requireInfraredSpecies(gas, where);
  const model = GAS_MODELS[species.name];
  if (model === undefined) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where} = ${JSON.stringify(gas)}, the simulator has no spectral model for ${species.name}; ` +
        `simulated gases: ${Object.keys(GAS_MODELS).join(', ')}`,
      { parameter: where },
    );
  }
  return model;
}

function modelSources(model: GasModel): string[] {
  const sources = [`broadening: ${model.broadening.source}`];
  switch (model.kind) {
    case 'diatomic':
      for (const iso of model.isotopologues)
        sources.push(`${iso.constants.molecule}: ${iso.constants.source}; abundance: ${iso.abundanceSource}`);
      sources.push(`band strength: ${model.bandStrength.source}`);
      break;
    case 'diatomic-pi':
      sources.push(
        `${model.constants.molecule}: ${model.constants.source}`,
        `band strength: ${model.bandStrength.source}`,
      );
      break;
    case 'linear-band':
      sources.push(
        `${model.constants.molecule} ${model.constants.band}: ${model.constants.source}`,
        `band strength: ${model.bandStrength.source}`,
        `vibrational modes: ${model.modesSource}`,
      );
      break;
    case 'band-model':
      for (const band of model.bands)
        sources.push(`${band.mode} at ${band.center_cm} cm⁻¹: ${band.bandStrength.source}`);
      sources.push(`vibrational modes: ${model.modesSource}`);
      break;
  }
  return sources;
}

function bandStrengthOf(model: GasModel): number {
  return model.kind === 'band-model'
    ? model.bands.reduce((sum, band) => sum + band.bandStrength.value_cm_per_molecule, 0)
    : model.bandStrength.value_cm_per_molecule;
}

/**
 * The line list of a gas at a temperature, normalised so that at 296 K the intensities add up
 * to the model's band strength (see the module header for the formulas).
 *
 * @param gas - formula or alias (`CO`, `HCl`, `NO`, `CO2`, `N2O`, `H2O`, `CH4`, `NH3`, `SO2`)
 * @param temperature_K - gas temperature, K, within {@link TEMPERATURE_LIMITS_K}
 * @returns lines in ascending position with intensities in cm/molecule
 * @throws BandwrightError `UNKNOWN_GAS`, `IR_INACTIVE`, `INVALID_VALUE` (no model, or a
 *   temperature outside the limits)
 * @example
 * const co = lineList('CO', 296);
 * co.lines.find((line) => line.label === 'R(0)')?.position_cm // ≈ 2147.081
 */
export function lineList(gas: string, temperature_K: number): LineList {
  const model = requireGasModel(gas);
  if (
    typeof temperature_K !== 'number' ||
    !(temperature_K >= TEMPERATURE_LIMITS_K[0] && temperature_K <= TEMPERATURE_LIMITS_K[1])
  ) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `temperature_K = ${String(temperature_K)}, must be between ${TEMPERATURE_LIMITS_K[0]} ` +
        `and ${TEMPERATURE_LIMITS_K[1]} K`,
      { parameter: 'temperature_K' },
    );
  }
  const groups =
    model.kind === 'diatomic'
      ? diatomicGroups(model, temperature_K)
      : model.kind === 'diatomic-pi'
        ? piGroups(model, temperature_K)
        : model.kind === 'linear-band'
          ? linearGroups(model, temperature_K)
          : bandModelGroups(model, temperature_K);
  const strength = bandStrengthOf(model);
  const lines: SpectralLine[] = [];
  for (const group of groups) {
    const sum296 = group.weights296.reduce((a, b) => a + b, 0);
    const scale = (strength * group.share) / sum296;
    const largest = Math.max(...group.weights);
    group.lines.forEach((raw, i) => {
      const weight = group.weights[i] as number;
      if (!(weight > NEGLIGIBLE * largest)) return;
      lines.push({
        position_cm: raw.position_cm,
        intensity_cm_per_molecule: weight * scale,
        lowerStateEnergy_cm: raw.lowerStateEnergy_cm,
        lowerJ: raw.lowerJ,
        branch: raw.branch,
        label: raw.label,
        airBroadening_cm_atm: model.broadening.airBroadening_cm_atm,
        temperatureExponent: model.broadening.temperatureExponent,
        molarMass_g_mol: raw.molarMass_g_mol,
      });
    });
  }
  lines.sort((a, b) => a.position_cm - b.position_cm);
  return {
    gas: model.gas,
    temperature_K,
    model: model.kind,
    approximate: model.approximate,
    lines,
    totalIntensity_cm_per_molecule: lines.reduce((sum, line) => sum + line.intensity_cm_per_molecule, 0),
    bandStrength296_cm_per_molecule: strength,
    notes: [...model.notes],
    sources: modelSources(model),
  };
}
