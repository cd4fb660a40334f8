/**
 * `bandwright/models`: the fits behind calibrations, usable on their own — the univariate curve
 * (straight line, through the origin, second order; weights; inverse prediction with intervals),
 * classical least squares on spectra and on band areas, and the statistics they rest on (QR least
 * squares, Student-t and F quantiles).
 */
export { fitUnivariate } from '../models/univariate/fit.js';
export {
  predictUnivariate,
  type UnivariatePrediction,
  type UnivariatePredictOptions,
} from '../models/univariate/predict.js';
export { fittedCurveWithBands, type FittedCurvePoint } from '../models/univariate/curve-bands.js';
export type {
  CurveForm,
  UnivariateModel,
  WeightScheme,
  Coefficients,
  ReplicateLevel,
  Weighting,
  UnivariateData,
  UnivariateFitOptions,
} from '../models/univariate/model.js';
export {
  fitCls,
  predictCls,
  type ClsModel,
  type ClsData,
  type SpectralClsFitOptions,
} from '../models/cls/spectral.js';
export type {
  ClsPrediction,
  ClsCalibrationStatistics,
  ClsComponent,
  ClsCrossValidation,
  ClsLackOfFit,
  ClsRange,
  ClsSecondOrderGain,
  ClsTerm,
  ClsCommonFitOptions,
  ClsEstimate,
  ClsPredictOptions,
} from '../models/cls/model.js';
export { fitBandCls, predictBandCls, type BandClsModel, type BandClsData } from '../models/cls/band.js';
export {
  leastSquares,
  solveLeastSquaresMany,
  type LeastSquaresFit,
  type Design,
  type LeastSquaresManyFit,
  type LeastSquaresOptions,
} from '../stats/least-squares.js';
export { tQuantile, fQuantile, tCdf, fCdf } from '../stats/distributions.js';
export type { CalibrationLimits, LimitValue } from '../stats/detection.js';
export type { MandelResult } from '../stats/mandel.js';
export type { ChannelSegment } from '../models/cls/basis.js';
