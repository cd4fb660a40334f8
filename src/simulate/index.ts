/**
 * Gas-cell spectrum simulator: line lists from molecular constants, Voigt line shapes, FTIR
 * instrument functions and seeded noise. See `simulate.ts` for the physics.
 */
export { simulateSpectrum } from './simulate.js';
export type {
  SimulationOptions,
  SimulationResult,
  SimulatedGasInput,
  SimulatedGasTruth,
} from './simulate.js';
export {
  faddeeva,
  faddeevaReal,
  voigtProfile,
  voigtHWHM,
  dopplerHWHM,
  lorentzHWHM,
  accumulateVoigt,
} from './lineshape.js';
export type { Complex, LorentzWidthOptions } from './lineshape.js';
export { lineList, requireGasModel, TEMPERATURE_LIMITS_K } from './lines.js';
export {
  bandOrigin,
  vibrationalTerm,
  rotationalConstant,
  centrifugalConstant,
  rotationalTerm,
  diatomicPartitionSum,
  harmonicVibrationalPartitionSum,
  linearRotationalPartitionSum,
} from './levels.js';
export type { LineList, SpectralLine, Branch } from './lines.js';
export * from './constants.js';
export * from './gas-models.js';
export {
  APODIZATIONS,
  apodizationFunction,
  instrumentLineShape,
  convolveWithInstrument,
} from './instrument.js';
export type { Apodization, InstrumentConvolutionOptions } from './instrument.js';
export { createRandom, createGaussian, seedFromText } from './random.js';
export { fftInPlace, nextPowerOfTwo } from './fft.js';
