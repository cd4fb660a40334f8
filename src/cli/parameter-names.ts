/**
 * The command line's names for the core's parameters, so core errors are worded with the flags
 * a user types (`BandwrightError.describe`). The core never spells a flag itself.
 */
import type { ParameterNames } from '../errors.js';

/** Library parameter name to the flag that sets it. */
export const CLI_PARAMETER_NAMES: ParameterNames = Object.freeze({
  overwrite: '--force',
  gas: '--gas',
  certified: '--certified',
  level: '--level',
  responses: '--response',
  waterFraction: '--h2o <%>',
  pathLength_m: '--path-length',
  temperature_K: '--temperature',
  pressure_kPa: '--pressure',
  workers: '--workers',
});
