/**
 * The calibration record: a versioned, self-hashing, JSON-serialisable description of a built
 * calibration (DESIGN §1.2, §4). Its `sha256` is the SHA-256 of the canonical JSON of every other
 * field (keys sorted, no whitespace), so any edit to the content is detected on load, whatever
 * the formatting of the file.
 */
import { createHash } from 'node:crypto';
import { BandwrightError } from '../errors.js';
import { checkCalibrationShape } from './calibration-shape.js';
import { upgradeLayout1 } from './layout-1.js';
import type { CellConditions } from '../gas/conditions.js';
import type { ConcentrationUnit } from '../gas/units.js';
import type { ClsModel } from '../models/cls/spectral.js';
import type { CurveForm, UnivariateModel, WeightScheme } from '../models/univariate/model.js';
import type { Window } from '../bands/windows.js';
import type { Method, ResponseKind } from './method.js';

/**
 * Current calibration schema, `major.minor`. A newer major is refused; a newer minor is read; an
 * older major is read and converted to the current layout in memory (`layout-1.ts` says what
 * changed in 2.0: models hold what was fitted, without derived prediction operators, and name
 * degrees of freedom and standards as every model does).
 */
export const SCHEMA_VERSION = '2.0';

/** An input file the calibration was built from. */
export interface CalibrationInput {
  /** What the file was. */
  role: 'manifest' | 'method' | 'standard' | 'background' | 'responses';
  /** Path relative to the calibration file's folder (or absolute when on another volume). */
  path: string;
  /** SHA-256 of the file's bytes, hex. */
  sha256: string;
}

/** A standard as it entered the calibration. */
export interface CalibrationStandard {
  /** Scan path as written in the manifest (or `row N` for response tables). */
  scan: string;
  /** Manifest line. */
  line: number;
  /** Certified concentrations in each gas's calibration unit. */
  concentrations: Record<string, number>;
  /** Conditions used. */
  conditions: CellConditions;
  /** φ relative to the reference conditions. */
  phi: number;
  /** Responses per gas: raw (as measured) and scaled (÷ φ). */
  responses: Record<string, { raw: number; scaled: number; peakAbsorbance?: number }>;
  /** Relative uncertainty of the certified values, %. */
  uncertaintyPct?: number;
  /** Cylinder lot. */
  lot?: string;
}

/** Detection limit from repeated zero-gas standards: 3 × SD of their responses / slope. */
export interface ZeroGasLimit {
  /** Limit in the gas's unit. */
  value: number;
  /** Number of zero-gas standards it rests on. */
  scans: number;
  /** Which definition it is. */
  definition: string;
}

/** The calibration of one gas on one band (or from tabulated responses). */
export interface GasCalibration {
  /** Canonical gas name. */
  gas: string;
  /** Unit of concentrations. */
  unit: ConcentrationUnit;
  /** Band feature (absent for response tables). */
  feature?: { band: Window; baseline: Window[]; baselineOrder: number; response: ResponseKind };
  /** Curve form and weighting asked for. */
  curve: CurveForm;
  /** Weighting asked for. */
  weights: WeightScheme;
  /** The fitted univariate model. */
  model: UnivariateModel;
  /** Noise-based detection limit from zero-gas standards, when there are at least two. */
  zeroGasLimit?: ZeroGasLimit;
}

/** A classical-least-squares calibration of several components over spectral regions. */
export interface ClsCalibration {
  /** The fitted model (channel grid, pure spectra, prediction matrix, statistics, cross-validation). */
  model: ClsModel;
  /** Spectral regions, cm⁻¹. */
  regions: Window[];
  /**
   * Detection limit of each reported gas at the reference conditions, in its unit: 3.3 × the
   * prediction standard error of a blank (ICH Q2 form with σ from the model's own prediction
   * uncertainty); a sample's limit is this ÷ its φ.
   */
  detectionLimits: Record<string, number>;
}

/** Everything in a calibration file except its own hash. */
export interface CalibrationBody {
  /**
   * Schema version, `major.minor`, as written in the file. A calibration read from a file of an
   * older schema keeps the version it was written with; its content is converted to the current
   * layout when it is read.
   */
  schemaVersion: string;
  /** Tool that built it. */
  tool: { name: string; version: string };
  /** ISO 8601 creation time. */
  createdAt: string;
  /** Optional title. */
  title?: string;
  /** The method as validated (defaults filled in). */
  method: Method;
  /** Reference conditions responses are scaled to. */
  reference: CellConditions;
  /** Univariate gas calibrations (band and response methods); empty for classical least squares. */
  gases: GasCalibration[];
  /** The classical-least-squares model, for `cls` methods. */
  cls?: ClsCalibration;
  /** The standards. */
  standards: CalibrationStandard[];
  /** Input files and their hashes. */
  inputs: CalibrationInput[];
  /** Notes made while building (plain words). */
  warnings: string[];
  /** Safety cautions for the gases involved. */
  cautions: string[];
}

/** A calibration with its own hash. */
export interface Calibration extends CalibrationBody {
  /**
   * SHA-256 of the canonical JSON of the body, hex, as recorded in the file (for a file of an older
   * schema, the hash of its content as written, before conversion to the current layout).
   */
  sha256: string;
}

/**
 * Canonical JSON: keys sorted at every level, no whitespace. Numbers are written by
 * `JSON.stringify`, which round-trips doubles exactly.
 *
 * @param value - any JSON-serialisable value
 */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(value, (_key, inner: unknown) => {
    if (inner === null || typeof inner !== 'object' || Array.isArray(inner)) return inner;
    const sorted: Record<string, unknown> = {};
    for (const key of Object.keys(inner).sort()) sorted[key] = (inner as Record<string, unknown>)[key];
    return sorted;
  });
}

/**
 * Hash of a calibration body (all fields but `sha256`).
 *
 * @param body - the calibration without its hash (a `sha256` field present is ignored)
 * @returns hex SHA-256
 */
export function calibrationHash(body: CalibrationBody | Calibration): string {
  const rest: Record<string, unknown> = { ...body };
  delete rest.sha256;
  return createHash('sha256').update(canonicalJson(rest)).digest('hex');
}

/**
 * Seals a body with its hash.
 *
 * @param body - the calibration body
 * @returns the calibration
 */
export function sealCalibration(body: CalibrationBody): Calibration {
  return { ...body, sha256: calibrationHash(body) };
}

/**
 * Checks a parsed calibration: required fields, schema version, and that the recorded hash
 * matches the content as written; converts a file of an older schema to the current layout; then
 * checks the shape of every part quantification uses.
 *
 * @param value - parsed JSON
 * @param source - file name for messages
 * @returns the calibration, typed, in the current layout
 * @throws BandwrightError `SCHEMA` (missing fields, newer major schema, a field of the wrong type
 *   or out of range: see {@link checkCalibrationShape}), `INTEGRITY` (hash mismatch)
 */
export function verifyCalibration(value: unknown, source: string): Calibration {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) {
    throw new BandwrightError('SCHEMA', `${source}: not a calibration (expected a JSON object)`, {
      file: source,
    });
  }
  const record = value as Record<string, unknown>;
  const version = record.schemaVersion;
  if (typeof version !== 'string' || !/^\d+\.\d+$/.test(version)) {
    throw new BandwrightError(
      'SCHEMA',
      `${source}: schemaVersion = ${JSON.stringify(version)}, not a bandwright calibration (expected "major.minor")`,
      { file: source, parameter: 'schemaVersion' },
    );
  }
  const major = Number(version.split('.')[0]);
  const ourMajor = Number(SCHEMA_VERSION.split('.')[0]);
  if (major > ourMajor) {
    throw new BandwrightError(
      'SCHEMA',
      `${source}: schemaVersion ${version} is newer than this tool reads (${SCHEMA_VERSION}); update bandwright`,
      { file: source, parameter: 'schemaVersion' },
    );
  }
  for (const field of [
    'tool',
    'createdAt',
    'method',
    'reference',
    'gases',
    'standards',
    'inputs',
    'warnings',
    'cautions',
    'sha256',
  ] as const) {
    if (record[field] === undefined)
      throw new BandwrightError(
        'SCHEMA',
        `${source}: field "${field}" is missing; the file is incomplete or not a calibration`,
        { file: source, parameter: field },
      );
  }
  if (typeof record.sha256 !== 'string')
    throw new BandwrightError('SCHEMA', `${source}: sha256 must be a hex string`, {
      file: source,
      parameter: 'sha256',
    });
  const actual = calibrationHash(record as unknown as Calibration);
  if (actual !== record.sha256) {
    throw new BandwrightError(
      'INTEGRITY',
      `${source}: content does not match its recorded sha256 (recorded ${record.sha256}, content ${actual}): ` +
        `the file was changed after it was built; rebuild it rather than edit it`,
      { file: source, parameter: 'sha256' },
    );
  }
  const current = major < ourMajor ? upgradeLayout1(record) : record;
  checkCalibrationShape(current, source);
  return current as unknown as Calibration;
}

/**
 * The gases a calibration reports, with their units, whatever its kind.
 *
 * @param calibration - any calibration
 * @returns gases in calibration order
 */
export function reportedGases(calibration: CalibrationBody): { gas: string; unit: ConcentrationUnit }[] {
  if (calibration.cls !== undefined) {
    return calibration.cls.model.components
      .filter((c) => c.reported)
      .map((c) => ({ gas: c.name, unit: c.unit as ConcentrationUnit }));
  }
  return calibration.gases.map((g) => ({ gas: g.gas, unit: g.unit }));
}
