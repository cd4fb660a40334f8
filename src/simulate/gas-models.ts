/**
 * The simulator's gas models: what each kind of model holds (diatomic Σ–Σ, ²Π, linear
 * polyatomic parallel band, approximate band) and the table of models keyed by gas name. The
 * molecular constants they use are in `constants.ts`, with their sources.
 */
import { findSpecies } from '../gas/species.js';
import {
  ATOMIC_MASS_U,
  CARBON_DIOXIDE_NU3,
  CARBON_MONOXIDE_12C16O,
  HYDROGEN_CHLORIDE_H35CL,
  HYDROGEN_CHLORIDE_H37CL,
  NITRIC_OXIDE_14N16O,
  NITROUS_OXIDE_NU3,
  type BandStrength,
  type Broadening,
  type DiatomicConstants,
  type LinearBandConstants,
  type PiStateConstants,
  type VibrationalMode,
} from './constants.js';

/** Fields every gas model has. */
interface GasModelBase {
  /** Canonical gas name from the species table (`CO`, `HCl` …). */
  gas: string;
  /** True for band models that only imitate a spectrum's shape (see {@link BandGasModel}). */
  approximate: boolean;
  /** Notes a caller can show about the model's limits. */
  notes: readonly string[];
  /** Air broadening. */
  broadening: Broadening;
}

/** Line-by-line model of a diatomic Σ–Σ fundamental (1 ← 0) for one or more isotopologues. */
export interface DiatomicGasModel extends GasModelBase {
  /** Model kind tag. */
  kind: 'diatomic';
  /** Line-by-line from constants. */
  approximate: false;
  /** Isotopologues with their natural abundance (fractions summing to 1) and molar mass. */
  isotopologues: readonly {
    constants: DiatomicConstants;
    abundance: number;
    molarMass_g_mol: number;
    abundanceSource: string;
  }[];
  /** Band strength of the 1 ← 0 band at 296 K, per molecule of the gas. */
  bandStrength: BandStrength;
}

/** Simplified line-by-line model of a ²Π diatomic fundamental (P, Q and R branches). */
export interface PiGasModel extends GasModelBase {
  /** Model kind tag. */
  kind: 'diatomic-pi';
  /** Line-by-line from constants (simplified, see `notes`). */
  approximate: false;
  /** Constants of the ²Π state. */
  constants: PiStateConstants;
  /** Molar mass for the Doppler width, g/mol (species table). */
  molarMass_g_mol: number;
  /** Band strength of the 1 ← 0 band at 296 K. */
  bandStrength: BandStrength;
}

/** Line-by-line model of one parallel band of a linear polyatomic molecule. */
export interface LinearGasModel extends GasModelBase {
  /** Model kind tag. */
  kind: 'linear-band';
  /** Line-by-line from constants. */
  approximate: false;
  /** Band origin and rotational constants. */
  constants: LinearBandConstants;
  /** Molar mass for the Doppler width, g/mol (species table). */
  molarMass_g_mol: number;
  /** Strength of the band at 296 K. */
  bandStrength: BandStrength;
  /** Normal modes for the vibrational partition function. */
  vibrationalModes: readonly VibrationalMode[];
  /** Source of the mode wavenumbers. */
  modesSource: string;
}

/**
 * One band of an approximate band model: a pseudo-line forest with a rotational envelope.
 *
 * Pseudo-lines sit on a ladder of offsets from the band centre (`lineSpacing_cm` apart, moved
 * by up to ±`positionJitter`/2 of a spacing and split into `clusterComponents` components
 * spread over `clusterSpread_cm`), on both sides (P and R). A pseudo-line at offset d stands
 * for the rigid-rotor level J = d/(2B) − 1 (R side) or d/(2B) (P side) with B =
 * `envelopeB_cm`, so its lower-state energy B·J(J+1) and Hönl–London-like weight shape the
 * envelope and its temperature dependence. A share `qBranchFraction` of the strength goes into
 * a Q branch within `qBranchWidth_cm` below the centre. Intensities scatter about the envelope
 * (`exponential`: a line forest; `uniform`: ±30 %; `none`).
 */
export interface ApproximateBand {
  /** Mode label, e.g. `ν2`. */
  mode: string;
  /** Band centre, cm⁻¹. */
  center_cm: number;
  /** Integrated strength at 296 K, cm/molecule. */
  bandStrength: BandStrength;
  /** Effective rotational constant shaping the envelope, cm⁻¹. */
  envelopeB_cm: number;
  /** Mean spacing of the pseudo-lines, cm⁻¹. */
  lineSpacing_cm: number;
  /** Random displacement of each pseudo-line, as a fraction of the spacing (0–1). */
  positionJitter: number;
  /** Components per pseudo-line (≥ 1). */
  clusterComponents: number;
  /** Spread of a cluster's components, cm⁻¹. */
  clusterSpread_cm: number;
  /** Share of the band strength in a Q branch (0–1). */
  qBranchFraction: number;
  /** Width of the Q branch, cm⁻¹. */
  qBranchWidth_cm: number;
  /** Largest offset from the centre that carries pseudo-lines, cm⁻¹. */
  maxOffset_cm: number;
  /** Scatter of pseudo-line intensities about the envelope. */
  intensityScatter: 'exponential' | 'uniform' | 'none';
}

/**
 * Approximate band model for a non-linear molecule (CH₄, H₂O, NH₃, SO₂): right band centres,
 * approximate integrated strengths and a realistic-looking but invented line pattern. Good for
 * interferent structure and demos, not for quantitative work on the gas itself.
 */
export interface BandGasModel extends GasModelBase {
  /** Model kind tag. */
  kind: 'band-model';
  /** Always approximate: callers must show it. */
  approximate: true;
  /** Molar mass for the Doppler width, g/mol (species table). */
  molarMass_g_mol: number;
  /** The modelled bands. */
  bands: readonly ApproximateBand[];
  /** Normal modes for the vibrational partition function. */
  vibrationalModes: readonly VibrationalMode[];
  /** Source of the mode wavenumbers. */
  modesSource: string;
}

/** Any gas model the simulator knows. */
export type GasModel = DiatomicGasModel | PiGasModel | LinearGasModel | BandGasModel;

/** Molar mass from the species table (g/mol), so Doppler widths use the same values as the rest of the tool. */
function speciesMolarMass(name: string): number {
  const species = findSpecies(name);
  if (species === undefined) throw new Error(`species table has no ${name}`);
  return species.molarMass_g_mol;
}

const FROM_MEMORY_MODES =
  'fundamental wavenumbers from memory (facts.md / species table where listed), harmonic approximation';
const APPROXIMATE_NOTE =
  'approximate band model: band centres from the species table, integrated strengths from memory ' +
  '(±30 % or worse), invented pseudo-line pattern; not for quantifying this gas';

/** The simulator's gas models, keyed by canonical gas name. */
export const GAS_MODELS: Readonly<Record<string, GasModel>> = {
  CO: {
    kind: 'diatomic',
    gas: 'CO',
    approximate: false,
    isotopologues: [
      {
        constants: CARBON_MONOXIDE_12C16O,
        abundance: 1,
        molarMass_g_mol: speciesMolarMass('CO'),
        abundanceSource: 'treated as pure ¹²C¹⁶O (¹³CO near 2096 cm⁻¹ not modelled)',
      },
    ],
    bandStrength: {
      value_cm_per_molecule: 1.013e-17,
      source: 'Zou & Varanasi, JQSRT 2002: (1.013 ± 0.007)e-17 cm/molecule at 296 K',
    },
    broadening: {
      airBroadening_cm_atm: 0.065,
      temperatureExponent: 0.7,
      source:
        'γ_air ≈ 0.05–0.08 cm⁻¹/atm at 296 K (facts.md, from memory), 0.065 taken for every line; ' +
        'n ≈ 0.7 from memory',
    },
    notes: ['Herman–Wallis factors not applied (no sourced coefficients); hot bands omitted'],
  },
  HCl: {
    kind: 'diatomic',
    gas: 'HCl',
    approximate: false,
    // Each isotopologue keeps its own molar mass (Doppler width), from the atomic masses above.
    isotopologues: [
      {
        constants: HYDROGEN_CHLORIDE_H35CL,
        abundance: 0.7576,
        molarMass_g_mol: ATOMIC_MASS_U.H1 + ATOMIC_MASS_U.Cl35,
        abundanceSource: '³⁵Cl 75.76 %, IUPAC isotopic abundances, from memory',
      },
      {
        constants: HYDROGEN_CHLORIDE_H37CL,
        abundance: 0.2424,
        molarMass_g_mol: ATOMIC_MASS_U.H1 + ATOMIC_MASS_U.Cl37,
        abundanceSource: '³⁷Cl 24.24 %, IUPAC isotopic abundances, from memory',
      },
    ],
    bandStrength: {
      value_cm_per_molecule: 5.0e-18,
      source:
        'HCl 1–0 band ≈ 5.0e-18 cm/molecule at 296 K (≈ 130 cm⁻² atm⁻¹ at 273 K), ' +
        'from memory, uncertain by about 20 %',
    },
    broadening: {
      airBroadening_cm_atm: 0.05,
      temperatureExponent: 0.7,
      source: 'from memory; the real γ falls from ≈ 0.08 at low J to ≈ 0.03 at high J',
    },
    notes: ['H³⁵Cl and H³⁷Cl at natural abundance; Herman–Wallis factors not applied'],
  },
  NO: {
    kind: 'diatomic-pi',
    gas: 'NO',
    approximate: false,
    constants: NITRIC_OXIDE_14N16O,
    molarMass_g_mol: speciesMolarMass('NO'),
    bandStrength: {
      value_cm_per_molecule: 4.1e-18,
      source:
        'NO 1–0 band ≈ 4.1e-18 cm/molecule at 296 K (≈ 110 cm⁻² atm⁻¹ at 273 K), ' +
        'from memory, uncertain by about 20 %',
    },
    broadening: { airBroadening_cm_atm: 0.055, temperatureExponent: 0.75, source: 'from memory' },
    notes: [
      "simplified ²Π model: Hund's case (a) Ω = ½ and 3/2 sub-bands with P, Q and R branches, " +
        'Λ-doubling and spin uncoupling neglected; ' +
        'high-J line positions are off by up to tenths of a cm⁻¹',
    ],
  },
  CO2: {
    kind: 'linear-band',
    gas: 'CO2',
    approximate: false,
    constants: CARBON_DIOXIDE_NU3,
    molarMass_g_mol: speciesMolarMass('CO2'),
    bandStrength: {
      value_cm_per_molecule: 9.5e-17,
      source:
        'CO₂ ν3 (626 fundamental) ≈ 9.5e-17 cm/molecule at 296 K (≈ 2500 cm⁻² atm⁻¹ at 273 K), ' +
        'from memory, uncertain by about 10 %',
    },
    broadening: { airBroadening_cm_atm: 0.07, temperatureExponent: 0.75, source: 'from memory' },
    vibrationalModes: [
      { wavenumber_cm: 1333, degeneracy: 1 },
      { wavenumber_cm: 667.4, degeneracy: 2 },
      { wavenumber_cm: 2349.1, degeneracy: 1 },
    ],
    modesSource: FROM_MEMORY_MODES,
    notes: ['only the ν3 fundamental of ¹²C¹⁶O₂ (no ν2 band near 667 cm⁻¹, no hot bands, no ¹³CO₂)'],
  },
  N2O: {
    kind: 'linear-band',
    gas: 'N2O',
    approximate: false,
    constants: NITROUS_OXIDE_NU3,
    molarMass_g_mol: speciesMolarMass('N2O'),
    bandStrength: {
      value_cm_per_molecule: 5.0e-17,
      source:
        'N₂O ν3 ≈ 5.0e-17 cm/molecule at 296 K (≈ 1300 cm⁻² atm⁻¹ at 273 K), ' +
        'from memory, uncertain by about 20 %',
    },
    broadening: { airBroadening_cm_atm: 0.075, temperatureExponent: 0.75, source: 'from memory' },
    vibrationalModes: [
      { wavenumber_cm: 1285, degeneracy: 1 },
      { wavenumber_cm: 589, degeneracy: 2 },
      { wavenumber_cm: 2224, degeneracy: 1 },
    ],
    modesSource: FROM_MEMORY_MODES,
    notes: ['only the ν3 fundamental (no hot bands, no ν1 near 1285 cm⁻¹)'],
  },
  H2O: {
    kind: 'band-model',
    gas: 'H2O',
    approximate: true,
    molarMass_g_mol: speciesMolarMass('H2O'),
    bands: [
      {
        mode: 'ν2',
        center_cm: 1594.7,
        bandStrength: {
          value_cm_per_molecule: 1.05e-17,
          source: 'H₂O ν2 ≈ 1.05e-17 cm/molecule at 296 K, from memory (approximate)',
        },
        envelopeB_cm: 20,
        lineSpacing_cm: 1.3,
        positionJitter: 1,
        clusterComponents: 1,
        clusterSpread_cm: 0,
        qBranchFraction: 0.05,
        qBranchWidth_cm: 25,
        maxOffset_cm: 420,
        intensityScatter: 'exponential',
      },
      {
        mode: 'ν3',
        center_cm: 3755.9,
        bandStrength: {
          value_cm_per_molecule: 6.9e-18,
          source: 'H₂O ν3 ≈ 6.9e-18 cm/molecule at 296 K, from memory (approximate)',
        },
        envelopeB_cm: 20,
        lineSpacing_cm: 1.3,
        positionJitter: 1,
        clusterComponents: 1,
        clusterSpread_cm: 0,
        qBranchFraction: 0,
        qBranchWidth_cm: 0,
        maxOffset_cm: 380,
        intensityScatter: 'exponential',
      },
      {
        mode: 'ν1',
        center_cm: 3657.1,
        bandStrength: {
          value_cm_per_molecule: 5e-19,
          source: 'H₂O ν1 ≈ 5e-19 cm/molecule at 296 K, from memory (approximate)',
        },
        envelopeB_cm: 20,
        lineSpacing_cm: 2.5,
        positionJitter: 1,
        clusterComponents: 1,
        clusterSpread_cm: 0,
        qBranchFraction: 0.1,
        qBranchWidth_cm: 20,
        maxOffset_cm: 300,
        intensityScatter: 'exponential',
      },
    ],
    vibrationalModes: [
      { wavenumber_cm: 3657.1, degeneracy: 1 },
      { wavenumber_cm: 1594.7, degeneracy: 1 },
      { wavenumber_cm: 3755.9, degeneracy: 1 },
    ],
    modesSource: FROM_MEMORY_MODES,
    broadening: {
      airBroadening_cm_atm: 0.08,
      temperatureExponent: 0.7,
      source: 'typical H₂O air broadening, from memory',
    },
    notes: [APPROXIMATE_NOTE],
  },
  CH4: {
    kind: 'band-model',
    gas: 'CH4',
    approximate: true,
    molarMass_g_mol: speciesMolarMass('CH4'),
    bands: [
      {
        mode: 'ν3',
        center_cm: 3019,
        bandStrength: {
          value_cm_per_molecule: 1.1e-17,
          source: 'CH₄ ν3 ≈ 1.1e-17 cm/molecule at 296 K, from memory (approximate)',
        },
        // spherical-top P/R lines 2B(1 − ζ3) ≈ 9.9 cm⁻¹ apart (B ≈ 5.24, ζ3 ≈ 0.05; from memory),
        // tetrahedral multiplets
        envelopeB_cm: 4.95,
        lineSpacing_cm: 9.9,
        positionJitter: 0,
        clusterComponents: 3,
        clusterSpread_cm: 0.6,
        qBranchFraction: 0.25,
        qBranchWidth_cm: 4,
        maxOffset_cm: 200,
        intensityScatter: 'uniform',
      },
      {
        mode: 'ν4',
        center_cm: 1306,
        bandStrength: {
          value_cm_per_molecule: 5.3e-18,
          source: 'CH₄ ν4 ≈ 5.3e-18 cm/molecule at 296 K, from memory (approximate)',
        },
        // line spacing 2B(1 − ζ4) ≈ 5.8 cm⁻¹ (ζ4 ≈ 0.45; from memory)
        envelopeB_cm: 2.9,
        lineSpacing_cm: 5.8,
        positionJitter: 0,
        clusterComponents: 3,
        clusterSpread_cm: 0.5,
        qBranchFraction: 0.3,
        qBranchWidth_cm: 3,
        maxOffset_cm: 140,
        intensityScatter: 'uniform',
      },
    ],
    vibrationalModes: [
      { wavenumber_cm: 2917, degeneracy: 1 },
      { wavenumber_cm: 1534, degeneracy: 2 },
      { wavenumber_cm: 3019, degeneracy: 3 },
      { wavenumber_cm: 1306, degeneracy: 3 },
    ],
    modesSource: FROM_MEMORY_MODES,
    broadening: {
      airBroadening_cm_atm: 0.055,
      temperatureExponent: 0.75,
      source: 'typical CH₄ air broadening, from memory',
    },
    notes: [APPROXIMATE_NOTE],
  },
  NH3: {
    kind: 'band-model',
    gas: 'NH3',
    approximate: true,
    molarMass_g_mol: speciesMolarMass('NH3'),
    bands: [
      {
        mode: 'ν2 (s)',
        center_cm: 931.6,
        bandStrength: {
          value_cm_per_molecule: 6e-18,
          source:
            'NH₃ ν2 ≈ 1.2e-17 cm/molecule at 296 K shared between the inversion components ' +
            'at 931.6 and 968.1 cm⁻¹, from memory (approximate)',
        },
        envelopeB_cm: 9.94,
        lineSpacing_cm: 19.9,
        positionJitter: 0,
        clusterComponents: 4,
        clusterSpread_cm: 2.5,
        qBranchFraction: 0.3,
        qBranchWidth_cm: 6,
        maxOffset_cm: 300,
        intensityScatter: 'uniform',
      },
      {
        mode: 'ν2 (a)',
        center_cm: 968.1,
        bandStrength: {
          value_cm_per_molecule: 6e-18,
          source:
            'NH₃ ν2 ≈ 1.2e-17 cm/molecule at 296 K shared between the inversion components ' +
            'at 931.6 and 968.1 cm⁻¹, from memory (approximate)',
        },
        envelopeB_cm: 9.94,
        lineSpacing_cm: 19.9,
        positionJitter: 0,
        clusterComponents: 4,
        clusterSpread_cm: 2.5,
        qBranchFraction: 0.3,
        qBranchWidth_cm: 6,
        maxOffset_cm: 300,
        intensityScatter: 'uniform',
      },
    ],
    vibrationalModes: [
      { wavenumber_cm: 3337, degeneracy: 1 },
      { wavenumber_cm: 950, degeneracy: 1 },
      { wavenumber_cm: 3444, degeneracy: 2 },
      { wavenumber_cm: 1627, degeneracy: 2 },
    ],
    modesSource: FROM_MEMORY_MODES,
    broadening: {
      airBroadening_cm_atm: 0.085,
      temperatureExponent: 0.7,
      source: 'typical NH₃ air broadening, from memory',
    },
    notes: [APPROXIMATE_NOTE],
  },
  SO2: {
    kind: 'band-model',
    gas: 'SO2',
    approximate: true,
    molarMass_g_mol: speciesMolarMass('SO2'),
    bands: [
      {
        mode: 'ν3',
        center_cm: 1362,
        bandStrength: {
          value_cm_per_molecule: 2.7e-17,
          source: 'SO₂ ν3 ≈ 2.7e-17 cm/molecule at 296 K, from memory (approximate)',
        },
        envelopeB_cm: 0.32,
        lineSpacing_cm: 0.12,
        positionJitter: 1,
        clusterComponents: 1,
        clusterSpread_cm: 0,
        qBranchFraction: 0.05,
        qBranchWidth_cm: 4,
        maxOffset_cm: 60,
        intensityScatter: 'exponential',
      },
      {
        mode: 'ν1',
        center_cm: 1151,
        bandStrength: {
          value_cm_per_molecule: 3.5e-18,
          source: 'SO₂ ν1 ≈ 3.5e-18 cm/molecule at 296 K, from memory (approximate)',
        },
        envelopeB_cm: 0.32,
        lineSpacing_cm: 0.15,
        positionJitter: 1,
        clusterComponents: 1,
        clusterSpread_cm: 0,
        qBranchFraction: 0.15,
        qBranchWidth_cm: 5,
        maxOffset_cm: 55,
        intensityScatter: 'exponential',
      },
    ],
    vibrationalModes: [
      { wavenumber_cm: 1151, degeneracy: 1 },
      { wavenumber_cm: 518, degeneracy: 1 },
      { wavenumber_cm: 1362, degeneracy: 1 },
    ],
    modesSource: 'NIST CCCBDB (facts.md), harmonic approximation',
    broadening: {
      airBroadening_cm_atm: 0.1,
      temperatureExponent: 0.75,
      source: 'typical SO₂ air broadening, from memory',
    },
    notes: [APPROXIMATE_NOTE],
  },
};
