/**
 * The sets of plots a calibration, a sample or a recheck history gets, as named SVG documents:
 * the HTML reports inline them and `--plot <dir>` writes each to its own file. Pure: spectra come
 * in memory, read by the caller through `src/store`.
 */
import type { Calibration, GasCalibration } from '../../calibration/calibration.js';
import type { Spectrum } from '../../spectrum/spectrum.js';
import type { CellConditions } from '../../gas/conditions.js';
import { clsFitData } from './cls-data.js';
import { calibrationCurveData, renderCalibrationCurve } from './calibration-curve.js';
import { renderClsFit, type ClsFitPlotInput } from './cls-fit.js';
import { renderControlChart, type ControlChartInput } from './control-chart.js';
import { fileName, slug } from './markup.js';
import {
  clsStandardsSpectraData,
  concentrationGroup,
  gasSpectraData,
  renderSpectra,
  type WavenumberAxis,
} from './spectra.js';
import type { ConcentrationUnit } from '../../gas/units.js';

/** One plot ready to inline or to write. */
export interface NamedPlot {
  /** File name to write it under, e.g. `CO-calibration-curve.svg` (safe characters only). */
  file: string;
  /** What it shows, plain text. */
  title: string;
  /** The SVG markup (without XML declaration; see `svgFile`). */
  svg: string;
}

/** Options shared by the plot sets. */
export interface PlotSetOptions {
  /** Wavenumber axis direction of spectra (default `descending`). */
  wavenumberAxis?: WavenumberAxis;
  /** Level of bands and intervals (default 0.95). */
  level?: number;
  /** Prefix of element ids, unique within the document the plots go into (default `plot`). */
  idPrefix?: string;
}

/** A standard's spectrum as loaded for plotting (absent when it could not be read). */
export interface StandardSpectrum {
  /** Index of the standard in `calibration.standards`. */
  index: number;
  /** The scan. */
  spectrum: Spectrum;
}

/**
 * The plots of a calibration: per gas, the calibration curve with residuals and (band methods,
 * when spectra are given) the standards' spectra with windows and baselines; for classical least
 * squares, the standards' spectra over the fit regions.
 *
 * @param calibration - the calibration
 * @param spectra - the standards' spectra that could be read, by standard index
 * @param options - axis direction, level, id prefix; `spectraNotes` printed under each spectra plot
 * @returns the plots, in report order
 * @throws BandwrightError `INVALID_VALUE` for a level outside (0, 1)
 */
export function calibrationPlots(
  calibration: Calibration,
  spectra: readonly StandardSpectrum[],
  options: PlotSetOptions & { spectraNotes?: readonly string[] } = {},
): NamedPlot[] {
  const prefix = options.idPrefix ?? 'plot';
  const axis = wavenumberAxisOption(options);
  const notes = options.spectraNotes === undefined ? {} : { notes: options.spectraNotes };
  const labels = calibration.standards.map((_, index) => standardLabel(calibration, index));
  const plots: NamedPlot[] = [];
  calibration.gases.forEach((gas, g) => {
    const name = slug(gas.gas);
    const curveData = calibrationCurveData(gas, {
      ...(options.level === undefined ? {} : { level: options.level }),
      standardLabels: labels,
    });
    plots.push({
      file: `${name}-calibration-curve.svg`,
      title: `${gas.gas} calibration curve and residuals`,
      svg: renderCalibrationCurve(curveData, { id: `${prefix}-${g}-curve` }),
    });
    if (gas.feature !== undefined && (spectra.length > 0 || (options.spectraNotes ?? []).length > 0)) {
      plots.push({
        file: `${name}-standard-spectra.svg`,
        title: `${gas.gas} standards: spectra, band and baseline windows`,
        svg: renderSpectra(gasSpectraData(gas, standardSeries(calibration, gas, spectra), notes), {
          id: `${prefix}-${g}-spectra`,
          ...axis,
        }),
      });
    }
  });
  if (calibration.cls !== undefined && (spectra.length > 0 || (options.spectraNotes ?? []).length > 0)) {
    const components = calibration.cls.model.components;
    const labelled = spectra.map(({ index, spectrum }) => {
      const standard = calibration.standards[index];
      // Name only what the standard contains; a standard of nothing but the matrix gas is zero gas.
      const present = components.filter((c) => (standard?.concentrations[c.name] ?? 0) !== 0);
      const group =
        present.length === 0
          ? 'zero gas'
          : present
              .map(
                (c) =>
                  `${c.name} ${concentrationGroup(
                    standard?.concentrations[c.name] as number,
                    c.unit as ConcentrationUnit,
                  )}`,
              )
              .join(', ');
      return { label: standardLabel(calibration, index), spectrum, group };
    });
    plots.push({
      file: 'standard-spectra.svg',
      title: 'Standards: spectra over the fit regions',
      svg: renderSpectra(clsStandardsSpectraData(calibration, labelled, notes), {
        id: `${prefix}-cls-spectra`,
        ...axis,
      }),
    });
  }
  return plots;
}

/** How a standard is named on plots: its scan, and its lot when it has one. */
function standardLabel(calibration: Calibration, index: number): string {
  const standard = calibration.standards[index];
  return `${standard?.scan ?? `standard ${index + 1}`}${standard?.lot === undefined ? '' : `, lot ${standard.lot}`}`;
}

/** The axis direction as a plot option, left out when not given so the plot's default holds. */
function wavenumberAxisOption(options: PlotSetOptions): { wavenumberAxis?: WavenumberAxis } {
  return options.wavenumberAxis === undefined ? {} : { wavenumberAxis: options.wavenumberAxis };
}

function standardSeries(
  calibration: Calibration,
  gas: GasCalibration,
  spectra: readonly StandardSpectrum[],
): { label: string; spectrum: Spectrum; group: string }[] {
  return spectra.map(({ index, spectrum }) => {
    const standard = calibration.standards[index];
    const value = standard?.concentrations[gas.gas];
    return {
      label: standardLabel(calibration, index),
      spectrum,
      group: value === undefined ? 'unknown concentration' : concentrationGroup(value, gas.unit),
    };
  });
}

/**
 * The plots of one sample: for a band calibration, per gas, the sample's spectrum with the band
 * and baseline windows and its fitted baseline; for a CLS result, the fit plot when its data are
 * given.
 *
 * @param calibration - the calibration used
 * @param sample - the scan's name (plain text) and spectrum; for a CLS calibration its `conditions`
 *   (as quantify resolved them) to build the fit plot, or the fit data itself as `cls`
 * @param options - axis direction, id prefix
 * @returns the plots
 * @throws BandwrightError `WINDOW` when a CLS sample does not cover the regions
 */
export function samplePlots(
  calibration: Calibration,
  sample: { scan: string; spectrum: Spectrum; conditions?: CellConditions; cls?: ClsFitPlotInput },
  options: PlotSetOptions = {},
): NamedPlot[] {
  const prefix = options.idPrefix ?? 'plot';
  const base = slug(fileName(sample.scan).replace(/\.[^.]*$/, ''));
  const axis = wavenumberAxisOption(options);
  const plots: NamedPlot[] = [];
  const cls =
    sample.cls ??
    (calibration.cls !== undefined && sample.conditions !== undefined
      ? clsFitData(calibration, sample.spectrum, sample.conditions, {
          title: `${sample.scan}: classical-least-squares fit`,
          ...(options.level === undefined ? {} : { level: options.level }),
        })
      : undefined);
  if (cls !== undefined) {
    plots.push({
      file: `${base}-cls-fit.svg`,
      title: `${sample.scan}: classical-least-squares fit`,
      svg: renderClsFit(cls, { id: `${prefix}-cls`, ...axis }),
    });
  }
  calibration.gases.forEach((gas, g) => {
    if (gas.feature === undefined) return;
    plots.push({
      file: `${base}-${slug(gas.gas)}-spectrum.svg`,
      title: `${sample.scan}: ${gas.gas} band and baseline`,
      svg: renderSpectra(
        gasSpectraData(gas, [{ label: sample.scan, spectrum: sample.spectrum }], {
          title: `${sample.scan}: ${gas.gas} band and baseline`,
        }),
        { id: `${prefix}-${g}-sample`, ...axis },
      ),
    });
  });
  return plots;
}

/**
 * The control chart of a recheck history as a named plot.
 *
 * @param chart - control-chart input
 * @param options - id prefix; `file` name stem (default `control-chart`)
 */
export function controlChartPlot(
  chart: ControlChartInput,
  options: { idPrefix?: string; file?: string } = {},
): NamedPlot {
  return {
    file: `${slug(options.file ?? 'control-chart')}.svg`,
    title: chart.title ?? 'Check-standard recoveries',
    svg: renderControlChart(chart, { id: `${options.idPrefix ?? 'plot'}-control` }),
  };
}

/**
 * Makes file names unique within a set by appending `-2`, `-3`… before `.svg`.
 *
 * @param plots - plots in order
 * @returns new plot objects with unique `file`
 */
export function uniqueFileNames(plots: readonly NamedPlot[]): NamedPlot[] {
  const seen = new Set<string>();
  return plots.map((plot) => {
    let file = plot.file;
    for (let k = 2; seen.has(file); k++) file = plot.file.replace(/\.svg$/, `-${k}.svg`);
    seen.add(file);
    return { ...plot, file };
  });
}
