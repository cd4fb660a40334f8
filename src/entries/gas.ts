/**
 * `bandwright/gas`: the species table (molar masses, infrared activity, hazards), cell conditions
 * and the number-density × path factor, concentration units and stack conversions, safety
 * cautions and exposure limits.
 */
export {
  SPECIES,
  findSpecies,
  requireInfraredSpecies,
  normalModeCount,
  needsCaution,
  type Species,
  type Hazard,
  type SpeciesBand,
} from '../gas/species.js';
export {
  resolveConditions,
  densityPathFactor,
  conditionsFarReasons,
  medianConditions,
  type CellConditions,
  type PartialConditions,
  type ConditionSource,
  type ConditionsTolerance,
  type ResolvedConditions,
} from '../gas/conditions.js';
export {
  ppmToMgPerM3,
  toDryBasis,
  correctToReferenceOxygen,
  toPpm,
  fromPpm,
  unitLabel,
  molarVolume_L,
  parseConcentrationUnit,
  NORMAL_STATE,
  GAS_CONSTANT,
  type ConcentrationUnit,
  type ReferenceState,
  type OxygenCorrection,
} from '../gas/units.js';
export {
  GENERAL_CAUTION,
  cautionFor,
  cautionsFor,
  exceededLimits,
  type ExposureLimit,
  type LimitUnit,
} from '../gas/safety.js';
