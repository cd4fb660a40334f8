/**
 * Species table: what the tool knows about each gas it may be asked to quantify.
 *
 * Molar masses are from standard atomic weights (IUPAC, conventional values; common practice),
 * summed per formula. Band positions carry their source beside them; "from memory" marks values
 * recalled rather than read. Toxicity is a fact of the trade (common practice): every output
 * involving a toxic or asphyxiant gas carries a caution (DESIGN §3 Safety).
 */
import { BandwrightError } from '../errors.js';

/** One infrared band of a species. */
export interface SpeciesBand {
  /** Vibrational mode label, e.g. `ν3` or `1-0`. */
  mode: string;
  /** Band centre, cm⁻¹. */
  center_cm: number;
  /** Whether the mode changes the dipole moment (absorbs in the IR). */
  irActive: boolean;
  /** Where the value comes from. */
  source: string;
}

/** Hazard classes that trigger cautions. */
export type Hazard = 'toxic' | 'asphyxiant' | 'flammable' | 'corrosive' | 'oxidiser';

/** A gas in the species table. */
export interface Species {
  /** Canonical name used in manifests and methods (a formula such as `CO`). */
  name: string;
  /** Other spellings accepted on input (case-insensitive). */
  aliases: readonly string[];
  /** Common name, for messages. */
  commonName: string;
  /** Molar mass, g/mol. */
  molarMass_g_mol: number;
  /** Number of atoms. */
  atoms: number;
  /** Linear molecule (3n − 5 normal modes) or not (3n − 6). */
  linear: boolean;
  /** Whether the molecule has any IR-active vibration. */
  irActive: boolean;
  /** Why it has no IR spectrum, when it has none. */
  irInactiveReason?: string;
  /** Fundamental bands (IR-active and, where instructive, inactive ones). */
  bands: readonly SpeciesBand[];
  /** Hazards that call for a caution. */
  hazards: readonly Hazard[];
  /** Extra words for the caution, e.g. that CO is odourless. */
  cautionNote?: string;
}

const HOMONUCLEAR =
  'homonuclear diatomic: its only vibration does not change the dipole moment, ' +
  'so it has no infrared absorption spectrum (common practice)';

// Atomic weights, g/mol (IUPAC conventional standard atomic weights; common practice).
const H = 1.008;
const C = 12.011;
const N = 14.007;
const O = 15.999;
const S = 32.06;
const F = 18.998;
const Cl = 35.45;

const TABLE: readonly Species[] = [
  {
    name: 'CO',
    aliases: ['carbon monoxide'],
    commonName: 'carbon monoxide',
    molarMass_g_mol: C + O,
    atoms: 2,
    linear: true,
    irActive: true,
    bands: [
      {
        mode: '1-0',
        center_cm: 2143.27,
        irActive: true,
        source: 'Huber & Herzberg 1979 constants, G(1) − G(0) (facts.md), from memory',
      },
    ],
    hazards: ['toxic', 'flammable'],
    cautionNote: 'CO is colourless and odourless.',
  },
  {
    name: 'CO2',
    aliases: ['carbon dioxide'],
    commonName: 'carbon dioxide',
    molarMass_g_mol: C + 2 * O,
    atoms: 3,
    linear: true,
    irActive: true,
    bands: [
      {
        mode: 'ν1',
        center_cm: 1333,
        irActive: false,
        source: 'from memory (symmetric stretch, IR-inactive)',
      },
      { mode: 'ν2', center_cm: 667.4, irActive: true, source: 'from memory' },
      { mode: 'ν3', center_cm: 2349.1, irActive: true, source: 'from memory' },
    ],
    hazards: ['asphyxiant'],
  },
  {
    name: 'N2O',
    aliases: ['nitrous oxide'],
    commonName: 'nitrous oxide',
    molarMass_g_mol: 2 * N + O,
    atoms: 3,
    linear: true,
    irActive: true,
    bands: [{ mode: 'ν3', center_cm: 2224, irActive: true, source: 'from memory (overlaps the CO band)' }],
    hazards: ['oxidiser'],
  },
  {
    name: 'NO',
    aliases: ['nitric oxide', 'nitrogen monoxide'],
    commonName: 'nitric oxide',
    molarMass_g_mol: N + O,
    atoms: 2,
    linear: true,
    irActive: true,
    bands: [{ mode: '1-0', center_cm: 1876, irActive: true, source: 'Huber & Herzberg, from memory' }],
    hazards: ['toxic', 'oxidiser'],
  },
  {
    name: 'NO2',
    aliases: ['nitrogen dioxide'],
    commonName: 'nitrogen dioxide',
    molarMass_g_mol: N + 2 * O,
    atoms: 3,
    linear: false,
    irActive: true,
    bands: [{ mode: 'ν3', center_cm: 1617.8, irActive: true, source: 'from memory' }],
    hazards: ['toxic', 'oxidiser', 'corrosive'],
  },
  {
    name: 'SO2',
    aliases: ['sulfur dioxide', 'sulphur dioxide'],
    commonName: 'sulfur dioxide',
    molarMass_g_mol: S + 2 * O,
    atoms: 3,
    linear: false,
    irActive: true,
    bands: [
      { mode: 'ν1', center_cm: 1151, irActive: true, source: 'NIST CCCBDB' },
      { mode: 'ν2', center_cm: 518, irActive: true, source: 'NIST CCCBDB' },
      { mode: 'ν3', center_cm: 1362, irActive: true, source: 'NIST CCCBDB' },
    ],
    hazards: ['toxic', 'corrosive'],
  },
  {
    name: 'H2O',
    aliases: ['water', 'water vapour', 'water vapor'],
    commonName: 'water vapour',
    molarMass_g_mol: 2 * H + O,
    atoms: 3,
    linear: false,
    irActive: true,
    bands: [
      { mode: 'ν1', center_cm: 3657.1, irActive: true, source: 'from memory' },
      { mode: 'ν2', center_cm: 1594.7, irActive: true, source: 'from memory' },
      { mode: 'ν3', center_cm: 3755.9, irActive: true, source: 'from memory' },
    ],
    hazards: [],
  },
  {
    name: 'CH4',
    aliases: ['methane'],
    commonName: 'methane',
    molarMass_g_mol: C + 4 * H,
    atoms: 5,
    linear: false,
    irActive: true,
    bands: [
      { mode: 'ν3', center_cm: 3019, irActive: true, source: 'from memory' },
      { mode: 'ν4', center_cm: 1306, irActive: true, source: 'from memory' },
    ],
    hazards: ['flammable', 'asphyxiant'],
  },
  {
    name: 'NH3',
    aliases: ['ammonia'],
    commonName: 'ammonia',
    molarMass_g_mol: N + 3 * H,
    atoms: 4,
    linear: false,
    irActive: true,
    bands: [
      {
        mode: 'ν2',
        center_cm: 950,
        irActive: true,
        source: 'from memory (umbrella mode, inversion-split doublet)',
      },
    ],
    hazards: ['toxic', 'corrosive'],
  },
  {
    name: 'HCl',
    aliases: ['hydrogen chloride'],
    commonName: 'hydrogen chloride',
    molarMass_g_mol: H + Cl,
    atoms: 2,
    linear: true,
    irActive: true,
    bands: [{ mode: '1-0', center_cm: 2885.98, irActive: true, source: 'Huber & Herzberg, from memory' }],
    hazards: ['toxic', 'corrosive'],
  },
  {
    name: 'HF',
    aliases: ['hydrogen fluoride'],
    commonName: 'hydrogen fluoride',
    molarMass_g_mol: H + F,
    atoms: 2,
    linear: true,
    irActive: true,
    bands: [{ mode: '1-0', center_cm: 3961.4, irActive: true, source: 'from memory' }],
    hazards: ['toxic', 'corrosive'],
  },
  {
    name: 'H2S',
    aliases: ['hydrogen sulfide', 'hydrogen sulphide'],
    commonName: 'hydrogen sulfide',
    molarMass_g_mol: 2 * H + S,
    atoms: 3,
    linear: false,
    irActive: true,
    bands: [{ mode: 'ν2', center_cm: 1183, irActive: true, source: 'from memory (weak)' }],
    hazards: ['toxic', 'flammable'],
  },
  {
    name: 'HCN',
    aliases: ['hydrogen cyanide'],
    commonName: 'hydrogen cyanide',
    molarMass_g_mol: H + C + N,
    atoms: 3,
    linear: true,
    irActive: true,
    bands: [{ mode: 'ν2', center_cm: 712, irActive: true, source: 'from memory' }],
    hazards: ['toxic', 'flammable'],
  },
  {
    name: 'COCl2',
    aliases: ['phosgene'],
    commonName: 'phosgene',
    molarMass_g_mol: C + O + 2 * Cl,
    atoms: 4,
    linear: false,
    irActive: true,
    bands: [{ mode: 'ν1', center_cm: 1827, irActive: true, source: 'from memory' }],
    hazards: ['toxic'],
  },
  {
    name: 'CH2O',
    aliases: ['formaldehyde', 'HCHO'],
    commonName: 'formaldehyde',
    molarMass_g_mol: C + 2 * H + O,
    atoms: 4,
    linear: false,
    irActive: true,
    bands: [{ mode: 'ν1', center_cm: 2782, irActive: true, source: 'from memory' }],
    hazards: ['toxic', 'flammable'],
  },
  {
    name: 'N2',
    aliases: ['nitrogen'],
    commonName: 'nitrogen',
    molarMass_g_mol: 2 * N,
    atoms: 2,
    linear: true,
    irActive: false,
    irInactiveReason: HOMONUCLEAR,
    bands: [],
    hazards: ['asphyxiant'],
  },
  {
    name: 'O2',
    aliases: ['oxygen'],
    commonName: 'oxygen',
    molarMass_g_mol: 2 * O,
    atoms: 2,
    linear: true,
    irActive: false,
    irInactiveReason: HOMONUCLEAR,
    bands: [],
    hazards: ['oxidiser'],
  },
  {
    name: 'H2',
    aliases: ['hydrogen'],
    commonName: 'hydrogen',
    molarMass_g_mol: 2 * H,
    atoms: 2,
    linear: true,
    irActive: false,
    irInactiveReason: HOMONUCLEAR,
    bands: [],
    hazards: ['flammable', 'asphyxiant'],
  },
  {
    name: 'Cl2',
    aliases: ['chlorine'],
    commonName: 'chlorine',
    molarMass_g_mol: 2 * Cl,
    atoms: 2,
    linear: true,
    irActive: false,
    irInactiveReason: HOMONUCLEAR,
    bands: [],
    hazards: ['toxic', 'oxidiser', 'corrosive'],
  },
];

const BY_KEY = new Map<string, Species>();
for (const species of TABLE) {
  for (const key of [species.name, ...species.aliases]) BY_KEY.set(key.toLowerCase(), species);
}

/** Every species in the table, in a stable order. */
export const SPECIES: readonly Species[] = TABLE;

/**
 * Looks a gas up by formula or alias, case-insensitively, without judging IR activity.
 *
 * @param name - e.g. `CO`, `co`, `carbon monoxide`
 * @returns the species, or undefined when unknown
 */
export function findSpecies(name: string): Species | undefined {
  return BY_KEY.get(name.trim().toLowerCase());
}

/**
 * Looks up a gas that is to be measured by infrared absorption.
 *
 * @param name - formula or alias
 * @param where - what to name in a message (file and line, or an option), e.g. `method.json gases[0].name`
 * @returns the species
 * @throws BandwrightError `UNKNOWN_GAS` when not in the table (the message lists known gases);
 *   `IR_INACTIVE` for gases with no IR spectrum, with the reason
 */
export function requireInfraredSpecies(name: string, where = 'gas'): Species {
  const species = findSpecies(name);
  if (species === undefined) {
    const known = TABLE.filter((s) => s.irActive)
      .map((s) => s.name)
      .join(', ');
    throw new BandwrightError(
      'UNKNOWN_GAS',
      `${where}: gas ${JSON.stringify(name)} is not in the species table; known gases: ${known}`,
      { parameter: where },
    );
  }
  if (!species.irActive) {
    throw new BandwrightError(
      'IR_INACTIVE',
      `${where}: ${species.name} (${species.commonName}) cannot be measured by infrared absorption: ` +
        `${species.irInactiveReason ?? 'no IR-active vibration'}`,
      { parameter: where },
    );
  }
  return species;
}

/**
 * Number of normal modes of vibration: 3n − 5 for a linear molecule, 3n − 6 otherwise (common practice).
 *
 * @param species - the molecule
 */
export function normalModeCount(species: Pick<Species, 'atoms' | 'linear'>): number {
  if (species.atoms < 2) return 0;
  return 3 * species.atoms - (species.linear ? 5 : 6);
}

/** True when the species calls for a safety caution (toxic or asphyxiant). */
export function needsCaution(species: Species): boolean {
  return species.hazards.includes('toxic') || species.hazards.includes('asphyxiant');
}
