/**
 * What `inspect` says about a scan: range, points, spacing, y-kind, peak absorbance and the
 * conditions the file carries.
 */
import { toAbsorbance, type Spectrum } from '../spectrum/spectrum.js';
import { formatNumber, formatTextTable } from './table.js';

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
  /** Largest decadic absorbance (after conversion), AU, and where. */
  peakAbsorbance: number;
  /** Wavenumber of the peak absorbance, cm⁻¹. */
  peakPosition_cm: number;
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
 * @throws BandwrightError `INVALID_VALUE` when its values cannot be converted to absorbance
 */
export function describeScan(scan: string, spectrum: Spectrum): ScanDescription {
  const { x } = spectrum;
  const gaps = new Float64Array(x.length - 1);
  for (let i = 1; i < x.length; i++) gaps[i - 1] = (x[i] as number) - (x[i - 1] as number);
  gaps.sort();
  const absorbance = toAbsorbance(spectrum);
  let peak = -Infinity;
  let peakAt = x[0] as number;
  absorbance.y.forEach((value, i) => {
    if (value > peak) {
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
    peakAbsorbance: peak,
    peakPosition_cm: peakAt,
    conditions,
    ...(metadata.resolution_cm === undefined ? {} : { resolution_cm: metadata.resolution_cm }),
    ...(metadata.title === undefined ? {} : { title: metadata.title }),
  };
}

/**
 * Formats scan descriptions as a text table.
 *
 * @param descriptions - scans in order
 */
export function formatScanDescriptions(descriptions: readonly ScanDescription[]): string {
  const given = (value: number | undefined, digits = 5): string =>
    value === undefined ? 'not given' : formatNumber(value, digits);
  return formatTextTable(
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
      formatNumber(d.peakAbsorbance, 4),
      formatNumber(d.peakPosition_cm, 6),
      given(d.conditions.pathLength_m),
      given(d.conditions.temperature_K),
      given(d.conditions.pressure_kPa),
    ]),
  );
}
