/**
 * `bandwright/report`: results as a text table, the `--json` document and CSV rows; calibration
 * summaries; SVG plots (calibration curve, spectra, CLS fit, control chart) and the self-contained
 * HTML reports. Everything here is pure: data in, text out.
 */
export {
  formatResultsText,
  resultsDocument,
  resultsCsv,
  resultColumns,
  resultRow,
  isFailure,
  warningText,
  type BatchEntry,
  type ResultCsvLayout,
  type ScanFailure,
  type QuantifyDocument,
  type ToolStamp,
} from '../report/results.js';
export { formatCalibrationSummary } from '../report/calibration-summary.js';
export { formatTextTable, formatNumber, type TextColumn } from '../report/table.js';
export { SERIES_COLOURS, seriesStyle, type SeriesStyle } from '../report/svg/palette.js';
export {
  calibrationCurveData,
  renderCalibrationCurve,
  type CalibrationCurvePlotInput,
  type CalibrationCurveOptions,
  type CurveBandPoint,
  type CurveLimitLine,
  type CurveStandardPoint,
} from '../report/svg/calibration-curve.js';
export {
  renderSpectra,
  gasSpectraData,
  type SpectraPlotInput,
  type SpectraOptions,
  type BaselineSeries,
  type LabelledSpectrum,
  type SpectrumSeries,
} from '../report/svg/spectra.js';
export { type WavenumberAxis } from '../report/svg/chart.js';
export {
  renderClsFit,
  type ClsFitPlotInput,
  type ClsFitPlotOptions,
  type ClsContribution,
} from '../report/svg/cls-fit.js';
export { clsFitData } from '../report/svg/cls-data.js';
export {
  renderControlChart,
  type ControlChartInput,
  type ControlChartOptions,
  type CheckVerdict,
  type ControlChartRecord,
  type ControlChartTrend,
} from '../report/svg/control-chart.js';
export { controlChartFromEvaluation } from '../report/svg/control-chart-data.js';
export type { ControlChartCusum, CusumChartPoint } from '../report/svg/cusum-panel.js';
export {
  calibrationPlots,
  samplePlots,
  controlChartPlot,
  type NamedPlot,
  type PlotSetOptions,
  type StandardSpectrum,
} from '../report/svg/plot-set.js';
export {
  calibrationReportHtml,
  calibrationReportPlots,
  type CalibrationReportInput,
  type CalibrationReportOptions,
  type InputCheck,
  type InputFileStatus,
  type RecheckHistoryView,
  type RecheckRow,
} from '../report/html.js';
export {
  quantifyReportHtml,
  quantifyReportPlots,
  type QuantifyReportInput,
  type QuantifyReportOptions,
  type SampleSpectrum,
} from '../report/html-quantify.js';
