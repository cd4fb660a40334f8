/**
 * The quantification report: one self-contained HTML page for a batch of samples — the results
 * table (value, prediction interval, flags, conversions), the notes behind every flag, one
 * collapsed section per sample with its spectrum plot, the calibration used, provenance and the
 * safety cautions. Pure: results and spectra come in memory.
 */
import { reportedGases, type Calibration } from '../calibration/calibration.js';
import type { Spectrum } from '../spectrum/spectrum.js';
import type { CellConditions } from '../gas/conditions.js';
import { unitLabel } from '../gas/units.js';
import { BandwrightError } from '../errors.js';
import {
  bulletList,
  cautionBox,
  factList,
  figure,
  hashCell,
  hashValue,
  htmlPage,
  htmlTable,
  levelText,
  notice,
  numberCell,
  pageFooter,
  pageHeader,
  pageSection,
  paragraph,
  type Cell,
} from './html-page.js';
import { isFailure, type BatchEntry } from './results.js';
import type { ClsFitPlotInput } from './svg/cls-fit.js';
import { element, escapeText, fileName } from './svg/markup.js';
import { samplePlots, uniqueFileNames, type NamedPlot } from './svg/plot-set.js';
import type { WavenumberAxis } from './svg/spectra.js';
import { formatNumber } from './table.js';

/** A sample's spectrum as read (and its CLS fit data, for CLS calibrations). */
export interface SampleSpectrum {
  /** The scan as named in the results. */
  scan: string;
  /** The scan. */
  spectrum: Spectrum;
  /** Conditions the sample was quantified at (for the CLS fit plot). */
  conditions?: CellConditions;
  /** CLS fit data, when the caller has it already. */
  cls?: ClsFitPlotInput;
}

/** Everything the quantification report shows. */
export interface QuantifyReportInput {
  /** The verified calibration used. */
  calibration: Calibration;
  /** Its file as the user named it. */
  calibrationFile: string;
  /** Results and failures in input order. */
  entries: readonly BatchEntry[];
  /** Prediction-interval level. */
  level: number;
  /** Spectra of the samples that could be read. */
  spectra: readonly SampleSpectrum[];
  /** When the report was made, ISO 8601. */
  generatedAt: string;
  /** Tool making the report. */
  tool: { name: string; version: string };
  /** The reporting options in words (e.g. `mg/m³ at 273.15 K and 101.325 kPa`). */
  options?: readonly string[];
}

/** Options of {@link quantifyReportHtml} and {@link quantifyReportPlots}. */
export interface QuantifyReportOptions {
  /** Wavenumber axis direction (default `descending`). */
  wavenumberAxis?: WavenumberAxis;
}

/** The calibration's reported gases with their units and calibrated ranges, in words. */
function gasesOf(calibration: Calibration): string {
  const cls = calibration.cls;
  if (cls !== undefined) {
    return cls.model.components
      .map(
        (c, i) =>
          `${c.name} (${c.unit}` +
          `${
            c.reported
              ? `, calibrated ${formatNumber(cls.model.ranges[i]?.min ?? 0)}–` +
                `${formatNumber(cls.model.ranges[i]?.max ?? 0)} at reference conditions`
              : ', interferent'
          })`,
      )
      .join('; ');
  }
  return calibration.gases
    .map((g) => `${g.gas} (${unitLabel(g.unit)}, calibrated ${g.model.range[0]}–${g.model.range[1]})`)
    .join('; ');
}

/**
 * The per-sample plots of a batch, with unique file names, for `--plot <dir>`.
 *
 * @param input - the report input
 * @param options - axis direction
 */
export function quantifyReportPlots(
  input: QuantifyReportInput,
  options: QuantifyReportOptions = {},
): NamedPlot[] {
  return uniqueFileNames(
    input.spectra.flatMap((sample, i) => {
      const entry = input.entries.find((e) => e.scan === sample.scan);
      return plotsOf(input.calibration, entry === undefined ? sample : withConditions(sample, entry), {
        ...options,
        idPrefix: `plot-${i}`,
      }).plots;
    }),
  );
}

/** The sample with the conditions its result was computed at, when it has a result. */
function withConditions(sample: SampleSpectrum, entry: BatchEntry): SampleSpectrum {
  if (sample.conditions !== undefined || isFailure(entry)) return sample;
  return { ...sample, conditions: entry.conditions };
}

/** A sample's plots; a plot that cannot be drawn (scan outside the regions) becomes a note. */
function plotsOf(
  calibration: Calibration,
  sample: SampleSpectrum,
  options: QuantifyReportOptions & { idPrefix: string },
): { plots: NamedPlot[]; problems: string[] } {
  try {
    return { plots: samplePlots(calibration, sample, options), problems: [] };
  } catch (error) {
    if (error instanceof BandwrightError)
      return { plots: [], problems: [`plot not drawn: ${error.message}`] };
    throw error;
  }
}

/**
 * The quantification report page.
 *
 * @param input - calibration, results, spectra
 * @param options - axis direction
 * @returns the HTML page
 */
export function quantifyReportHtml(input: QuantifyReportInput, options: QuantifyReportOptions = {}): string {
  const { calibration, entries } = input;
  const level = levelText(input.level);
  const rows: Cell[][] = [];
  const rowClasses: (string | undefined)[] = [];
  const cautions = new Set<string>(calibration.cautions);
  for (const entry of entries) {
    if (isFailure(entry)) {
      rows.push([hashCell(entry.scan), '—', 'failed', '', '', '', entry.error]);
      rowClasses.push('failed');
      continue;
    }
    for (const caution of entry.cautions) cautions.add(caution);
    for (const gas of entry.gases) {
      const value = formatNumber(gas.value);
      rows.push([
        hashCell(entry.scan),
        gas.gas,
        numberCell(gas.flags.includes('below-lod') ? `< LOD (${value})` : value),
        numberCell(`${formatNumber(gas.low)} – ${formatNumber(gas.high)}`),
        numberCell(formatNumber(gas.se, 2)),
        unitLabel(gas.unit),
        gas.flags.join(', '),
      ]);
      rowClasses.push(undefined);
      for (const conversion of gas.conversions ?? []) {
        rows.push([
          '',
          `  ${conversion.kind}`,
          numberCell(formatNumber(conversion.value)),
          numberCell(`${formatNumber(conversion.low)} – ${formatNumber(conversion.high)}`),
          '',
          conversion.unit,
          conversion.assumption,
        ]);
        rowClasses.push(undefined);
      }
    }
  }
  const failed = entries.filter(isFailure).length;
  const table = htmlTable({
    caption: `Results with ${level} prediction intervals`,
    header: [
      'scan',
      'gas',
      numberCell('value'),
      numberCell(`${level} interval`),
      numberCell('se'),
      'unit',
      'flags / notes',
    ],
    rows,
    rowClasses,
  });

  const sampleSections = entries.map((entry, i) => {
    const spectrum = input.spectra.find((s) => s.scan === entry.scan);
    const parts: string[] = [];
    if (isFailure(entry)) {
      parts.push(notice(`Could not be quantified: ${entry.error}`));
      const warnings = entry.warnings ?? [];
      if (warnings.length > 0) parts.push(bulletList(warnings.map((w) => `${w.message} (${w.code})`)));
    } else {
      const notes = [
        ...entry.gases.flatMap((g) => g.notes.map((n) => `${g.gas}: ${n}`)),
        ...entry.warnings.map((w) => `${w.message} (${w.code})`),
        `conditions: path ${formatNumber(entry.conditions.pathLength_m, 4)} m, ` +
          `${formatNumber(entry.conditions.temperature_K, 5)} K, ` +
          `${formatNumber(entry.conditions.pressure_kPa, 6)} kPa`,
        ...(entry.residualRms === undefined ? [] : [`residual RMS ${formatNumber(entry.residualRms, 3)} AU`]),
      ];
      parts.push(bulletList(notes));
    }
    if (spectrum !== undefined) {
      const drawn = plotsOf(calibration, withConditions(spectrum, entry), {
        ...options,
        idPrefix: `sample-${i}`,
      });
      for (const plot of drawn.plots) parts.push(figure(plot.svg, plot.title));
      for (const problem of drawn.problems) parts.push(notice(problem));
    } else if (!isFailure(entry)) parts.push(paragraph('No spectrum to draw for this entry.', 'muted'));
    const flagged = isFailure(entry)
      ? ' — failed'
      : entry.gases.some((g) => g.flags.length > 0)
        ? ` — flags: ${[...new Set(entry.gases.flatMap((g) => g.flags))].join(', ')}`
        : '';
    return element(
      'details',
      { id: `sample-${i + 1}` },
      element('summary', {}, escapeText(`${entry.scan}${flagged}`)) + parts.join(''),
    );
  });

  const facts: [string, string | { html: string }][] = [
    ['calibration', hashValue(input.calibrationFile)],
    ['calibration SHA-256', hashValue(calibration.sha256)],
    ['calibration built', `${calibration.createdAt} by ${calibration.tool.name} ${calibration.tool.version}`],
    ['gases', gasesOf(calibration)],
    ['samples', `${entries.length}${failed > 0 ? `, ${failed} could not be quantified` : ''}`],
    ['interval level', level],
    ...((input.options ?? []).length > 0
      ? ([['reporting', (input.options ?? []).join('; ')]] as [string, string][])
      : []),
    ['report made', `${input.generatedAt} by ${input.tool.name} ${input.tool.version}`],
  ];
  const body = [
    pageHeader(
      `Quantification report: ${calibration.title ?? fileName(input.calibrationFile)}`,
      `${entries.length} sample(s) · ${reportedGases(calibration)
        .map((g) => g.gas)
        .join(', ')} · ${level} prediction intervals`,
    ),
    cautionBox([...cautions]),
    pageSection(
      'results',
      'Results',
      table +
        paragraph(
          'Flags: below-lod (report as "< LOD"), below-loq, extrapolated (outside the calibrated range), ' +
            'saturated, poor-fit, over-limit (upper end of the interval above a given limit), ' +
            'conditions-far (far from the calibration’s conditions). The notes under each sample say why.',
          'muted',
        ),
    ),
    pageSection(
      'samples',
      'Samples',
      paragraph(
        'Each sample’s notes and spectrum plot; open a sample to see them (all open when printed).',
        'muted',
      ) + sampleSections.join(''),
    ),
    pageSection('provenance', 'Calibration and provenance', factList(facts)),
    pageFooter(`${input.tool.name} ${input.tool.version} · report made ${input.generatedAt}`),
  ];
  return htmlPage({
    title: `Quantification report: ${fileName(input.calibrationFile)}`,
    body: body.join('\n'),
  });
}
