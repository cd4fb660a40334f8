/**
 * Quantification results as text (terminal), JSON (DESIGN §4 `quantify --json`) and CSV rows
 * (DESIGN §4 `--csv`).
 */
import type { GasResult, ResultWarning, ScanResult } from '../calibration/result.js';
import { unitLabel } from '../gas/units.js';
import { TOOL } from '../version.js';
import { formatCsv } from '../formats/csv-table.js';
import { formatNumber, formatTextTable } from './table.js';

/** A scan that could not be quantified, reported in its own row. */
export interface ScanFailure {
  /** The scan as named. */
  scan: string;
  /** The error message. */
  error: string;
  /** Warnings from reading the scan, when it was read before it failed (absent when none). */
  warnings?: ResultWarning[];
}

/** One entry of a batch: a result or a failure. */
export type BatchEntry = ScanResult | ScanFailure;

/** True when a batch entry is a failure. */
export function isFailure(entry: BatchEntry): entry is ScanFailure {
  return (entry as ScanFailure).error !== undefined;
}

/**
 * A scan warning as one line of text: the message, prefixed with the scan unless the message
 * already starts with it, and the code in brackets, e.g. `s1.jdx line 12: … (line-start-x)`.
 *
 * @param scan - the scan as named
 * @param warning - code and message
 */
export function warningText(scan: string, warning: ResultWarning): string {
  const message = warning.message.startsWith(scan) ? warning.message : `${scan}: ${warning.message}`;
  return `${message} (${warning.code})`;
}

/** The distinct codes of a scan's warnings, in order, space-separated (the CSV `warnings` cell). */
function warningCodes(warnings: readonly ResultWarning[] | undefined): string {
  return [...new Set((warnings ?? []).map((w) => w.code))].join(' ');
}

function valueText(gas: GasResult): string {
  const value = formatNumber(gas.value);
  return gas.flags.includes('below-lod') ? `< LOD (${value})` : value;
}

/**
 * Formats results as a text table with one row per scan and gas, then the notes and cautions.
 *
 * @param entries - results and failures in input order
 * @param level - interval level, for the header
 */
export function formatResultsText(entries: readonly BatchEntry[], level: number): string {
  const rows: string[][] = [];
  const notes: string[] = [];
  const cautions = new Set<string>();
  for (const entry of entries) {
    if (isFailure(entry)) {
      rows.push([entry.scan, '—', 'failed', '', '', '', '']);
      for (const warning of entry.warnings ?? []) notes.push(warningText(entry.scan, warning));
      notes.push(`${entry.scan}: ${entry.error}`);
      continue;
    }
    for (const gas of entry.gases) {
      rows.push([
        entry.scan,
        gas.gas,
        valueText(gas),
        `${formatNumber(gas.low)} – ${formatNumber(gas.high)}`,
        formatNumber(gas.se, 2),
        unitLabel(gas.unit),
        gas.flags.join(','),
      ]);
      for (const conversion of gas.conversions ?? []) {
        rows.push([
          '',
          `  ${conversion.kind}`,
          formatNumber(conversion.value),
          `${formatNumber(conversion.low)} – ${formatNumber(conversion.high)}`,
          '',
          conversion.unit,
          '',
        ]);
        notes.push(`${entry.scan} ${gas.gas} ${conversion.kind}: ${conversion.assumption}`);
      }
      for (const note of gas.notes) notes.push(`${entry.scan} ${gas.gas}: ${note}`);
    }
    for (const warning of entry.warnings) notes.push(warningText(entry.scan, warning));
    for (const caution of entry.cautions) cautions.add(caution);
  }
  const percent = `${(level * 100).toFixed(level * 100 === Math.round(level * 100) ? 0 : 1)} %`;
  const table = formatTextTable(
    [
      { header: 'scan' },
      { header: 'gas' },
      { header: 'value', align: 'right' },
      { header: `${percent} interval`, align: 'right' },
      { header: 'se', align: 'right' },
      { header: 'unit' },
      { header: 'flags' },
    ],
    rows,
  );
  const parts = [table];
  if (notes.length > 0) parts.push(['Notes:', ...notes.map((n) => `  ${n}`)].join('\n'));
  if (cautions.size > 0) parts.push(['Caution:', ...[...cautions].map((c) => `  ${c}`)].join('\n'));
  return parts.join('\n\n');
}

/** The tool that wrote a document: name and version. */
export interface ToolStamp {
  name: string;
  version: string;
}

/** The `quantify --json` document (`resultsDocument`), also the demo's `*.results.json`. */
export interface QuantifyDocument {
  /** The tool that wrote it. */
  tool: ToolStamp;
  /** The calibration file and its SHA-256. */
  calibration: { file: string; sha256: string };
  /** Prediction-interval level. */
  level: number;
  /** Results and failures in input order. */
  results: BatchEntry[];
}

/**
 * The `quantify --json` document.
 *
 * @param entries - results and failures
 * @param calibration - the calibration's file and hash
 * @param level - interval level
 */
export function resultsDocument(
  entries: readonly BatchEntry[],
  calibration: { file: string; sha256: string },
  level: number,
): QuantifyDocument {
  return {
    tool: { name: TOOL.name, version: TOOL.version },
    calibration,
    level,
    results: [...entries],
  };
}

/** Layout options of the results CSV. */
export interface ResultCsvLayout {
  /**
   * Whether rows end with the `warnings` column (default true). False writes the columns of
   * results files made before it existed, so rows can still be appended to such a file.
   */
  warningsColumn?: boolean;
}

/**
 * Column names of the results CSV for a calibration's gases: `scan`, four columns per gas,
 * `residual_rms`, `calibration_sha256`, `error`, then `warnings` (the codes of the scan's
 * warnings, space-separated; the messages are in the JSON outputs).
 *
 * @param gases - gas names with units, in calibration order
 * @param layout - whether to end with the `warnings` column (default true)
 */
export function resultColumns(
  gases: readonly { gas: string; unit: string }[],
  layout: ResultCsvLayout = {},
): string[] {
  return [
    'scan',
    ...gases.flatMap(({ gas, unit }) => [`${gas}_${unit}`, `${gas}_low`, `${gas}_high`, `${gas}_flags`]),
    'residual_rms',
    'calibration_sha256',
    'error',
    ...(layout.warningsColumn === false ? [] : ['warnings']),
  ];
}

/**
 * One results CSV row.
 *
 * @param entry - result or failure
 * @param gases - gases in column order
 * @param sha256 - the calibration's hash
 * @param layout - whether to end with the `warnings` column (default true)
 */
export function resultRow(
  entry: BatchEntry,
  gases: readonly { gas: string }[],
  sha256: string,
  layout: ResultCsvLayout = {},
): (string | number)[] {
  const warnings = layout.warningsColumn === false ? [] : [warningCodes(entry.warnings)];
  if (isFailure(entry))
    return [entry.scan, ...gases.flatMap(() => ['', '', '', '']), '', sha256, entry.error, ...warnings];
  const cells: (string | number)[] = [entry.scan];
  for (const { gas } of gases) {
    const result = entry.gases.find((g) => g.gas === gas);
    if (result === undefined) cells.push('', '', '', '');
    else cells.push(result.value, result.low, result.high, result.flags.join(' '));
  }
  cells.push(entry.residualRms ?? '', sha256, '', ...warnings);
  return cells;
}

/**
 * The whole results CSV text.
 *
 * @param entries - results and failures
 * @param gases - gases with units in column order
 * @param sha256 - the calibration's hash
 */
export function resultsCsv(
  entries: readonly BatchEntry[],
  gases: readonly { gas: string; unit: string }[],
  sha256: string,
): string {
  return formatCsv(
    resultColumns(gases),
    entries.map((entry) => resultRow(entry, gases, sha256)),
  );
}
