/**
 * What `inspect` says about a scan: range, points, spacing, y-kind and its unit, peak absorbance
 * (or peak absorptivity of a quantitative reference spectrum), saturated points, the conditions
 * the file carries, and every warning from reading it.
 */
import type { ResultWarning } from '../calibration/result.js';
import { toAbsorbance, type Spectrum, type YKind } from '../spectrum/spectrum.js';
import { formatNumber, formatTextTable } from './table.js';

/** What the y values of each kind are, in words with their unit. */
const Y_UNITS: Record<YKind, string> = {
  absorbance: 'decadic absorbance, AU',
  'absorbance-natural': 'natural-log absorbance (−ln T)',
  transmittance: 'transmittance, fraction 0–1',
  'transmittance-percent': 'transmittance, percent 0–100',
  'single-beam': 'single-beam intensity with a background spectrum',
  'absorbance-per-amount':
    'decadic absorbance per µmol/mol per metre, (µmol/mol)⁻¹ m⁻¹: a quantitative reference spectrum, ' +
    'usable as a reference spectrum of its gas, not as a sample scan or standard',
};

/** A scan's description. */
export interface ScanDescription {
  /** The scan as named. */
  scan: string;
  /** File format. */
  format?: string;
  /** Number of points. */
  points: number;
  /** Lowest and highest wavenumber, cm⁻¹. */
  range_cm: [number, number];
  /** Median point spacing, cm⁻¹. */
  spacing_cm: number;
  /** y-kind as read. */
  yKind: string;
  /** What the y values are, with their unit, in words. */
  yUnit: string;
  /**
   * Largest decadic absorbance (after conversion), AU; absent for a quantitative reference
   * spectrum, which holds no absorbance.
   */
  peakAbsorbance?: number;
  /**
   * Largest decadic absorbance per µmol/mol per metre ((µmol/mol)⁻¹ m⁻¹), for a quantitative
   * reference spectrum only.
   */
  peakAbsorptivity_per_ppm_m?: number;
  /** Wavenumber of the peak, cm⁻¹. */
  peakPosition_cm: number;
  /** Points with y undefined (saturated: transmittance at or below zero as printed); absent when none. */
  saturatedPoints?: number;
  /** What the reader accepted leniently or changed, in file order (empty when nothing). */
  warnings: ResultWarning[];
  /** Conditions found in the file; absent fields were not given. */
  conditions: { pathLength_m?: number; temperature_K?: number; pressure_kPa?: number };
  /** Nominal resolution, cm⁻¹, when stated. */
  resolution_cm?: number;
  /** Title in the file. */
  title?: string;
}

/**
 * Describes a scan.
 *
 * @param scan - the name to show
 * @param spectrum - the scan as read
 * @throws BandwrightError `INVALID_VALUE` when its values cannot be converted to absorbance (a
 *   quantitative reference spectrum is described in its own unit, not converted)
 */
export function describeScan(scan: string, spectrum: Spectrum): ScanDescription {
  const { x } = spectrum;
  const gaps = new Float64Array(x.length - 1);
  for (let i = 1; i < x.length; i++) gaps[i - 1] = (x[i] as number) - (x[i - 1] as number);
  gaps.sort();
  const reference = spectrum.yKind === 'absorbance-per-amount';
  // A reference spectrum is described in its own unit: it is never plain absorbance.
  const values = reference ? spectrum.y : toAbsorbance(spectrum).y;
  let peak = -Infinity;
  let peakAt = x[0] as number;
  let saturated = 0;
  values.forEach((value, i) => {
    if (Number.isNaN(value)) saturated++;
    else if (value > peak) {
      peak = value;
      peakAt = x[i] as number;
    }
  });
  const metadata = spectrum.metadata;
  const conditions: ScanDescription['conditions'] = {};
  if (metadata.pathLength_m !== undefined) conditions.pathLength_m = metadata.pathLength_m;
  if (metadata.temperature_K !== undefined) conditions.temperature_K = metadata.temperature_K;
  if (metadata.pressure_kPa !== undefined) conditions.pressure_kPa = metadata.pressure_kPa;
  return {
    scan,
    ...(metadata.format === undefined ? {} : { format: metadata.format }),
    points: x.length,
    range_cm: [x[0] as number, x[x.length - 1] as number],
    spacing_cm: gaps[gaps.length >> 1] as number,
    yKind: spectrum.yKind,
    yUnit: Y_UNITS[spectrum.yKind],
    ...(reference ? { peakAbsorptivity_per_ppm_m: peak } : { peakAbsorbance: peak }),
    peakPosition_cm: peakAt,
    ...(saturated > 0 ? { saturatedPoints: saturated } : {}),
    warnings: (metadata.warnings ?? []).map((w) => ({ code: w.code, message: w.message })),
    conditions,
    ...(metadata.resolution_cm === undefined ? {} : { resolution_cm: metadata.resolution_cm }),
    ...(metadata.title === undefined ? {} : { title: metadata.title }),
  };
}

/** The lines printed under a scan's row: what a reference spectrum is, saturated points, warnings. */
function linesUnder(description: ScanDescription): string[] {
  const lines: string[] = [];
  if (description.peakAbsorptivity_per_ppm_m !== undefined)
    lines.push(`  y: ${description.yUnit}; peak in (µmol/mol)⁻¹ m⁻¹`);
  const saturatedWarned = description.warnings.some((w) => w.code === 'saturated');
  if (description.saturatedPoints !== undefined && !saturatedWarned)
    lines.push(
      `  ${description.saturatedPoints} saturated point(s): y undefined (transmittance at or below zero as printed)`,
    );
  for (const warning of description.warnings) lines.push(`  warning (${warning.code}): ${warning.message}`);
  return lines;
}

/**
 * Formats scan descriptions as a text table, one row per scan, with what a reader must know about
 * a scan printed under its row (each warning from reading it, saturated points, the unit of a
 * quantitative reference spectrum).
 *
 * @param descriptions - scans in order
 */
export function formatScanDescriptions(descriptions: readonly ScanDescription[]): string {
  const given = (value: number | undefined, digits = 5): string =>
    value === undefined ? 'not given' : formatNumber(value, digits);
  const table = formatTextTable(
    [
      { header: 'scan' },
      { header: 'format' },
      { header: 'points', align: 'right' },
      { header: 'range cm⁻¹', align: 'right' },
      { header: 'spacing', align: 'right' },
      { header: 'y-kind' },
      { header: 'peak A', align: 'right' },
      { header: 'at cm⁻¹', align: 'right' },
      { header: 'path m', align: 'right' },
      { header: 'T K', align: 'right' },
      { header: 'P kPa', align: 'right' },
    ],
    descriptions.map((d) => [
      d.scan,
      d.format ?? '',
      String(d.points),
      `${formatNumber(d.range_cm[0], 6)}–${formatNumber(d.range_cm[1], 6)}`,
      formatNumber(d.spacing_cm, 4),
      d.yKind,
      d.peakAbsorbance !== undefined
        ? formatNumber(d.peakAbsorbance, 4)
        : `${formatNumber(d.peakAbsorptivity_per_ppm_m ?? Number.NaN, 4)} /ppm·m`,
      formatNumber(d.peakPosition_cm, 6),
      given(d.conditions.pathLength_m),
      given(d.conditions.temperature_K),
      given(d.conditions.pressure_kPa),
    ]),
  ).split('\n');
  // The header and its rule come first; then one line per scan, followed by its notes.
  const lines = table.slice(0, 2);
  descriptions.forEach((d, i) => lines.push(table[i + 2] as string, ...linesUnder(d)));
  return lines.join('\n');
}
