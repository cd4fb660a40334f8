/**
 * `bandwright/spectra`: the spectrum type and what is done to it (y-kind conversion, resampling,
 * band areas and baselines), and writing spectra as JCAMP-DX or CSV.
 */
export {
  makeSpectrum,
  toAbsorbance,
  toTransmittance,
  resample,
  interpolateAt,
  Y_KINDS,
  type Spectrum,
  type YKind,
  type ScanMetadata,
  absorbanceFromReference,
  assertMeasuredSpectrum,
  type ReadWarning,
  type ReadWarningCode,
} from '../spectrum/spectrum.js';
export {
  findUndefinedPoints,
  describeUndefinedPoints,
  bridgeUndefinedPoints,
  type UndefinedPoints,
  type Interval,
} from '../spectrum/undefined-points.js';
export {
  measureBand,
  fitBaseline,
  evaluateBaseline,
  type BandFeatures,
  type BaselineSpec,
  type FittedBaseline,
} from '../bands/band.js';
export { assertBandWindows, formatWindow, type Window } from '../bands/windows.js';
export { formatJcamp, type JcampWriteOptions } from '../formats/jcamp/write.js';
export { formatSpectrumCsv, type SpectrumCsvOptions } from '../formats/spectrum-csv-write.js';
