/**
 * Calibration files of schema 1.0, written by bandwright 0.1.0 (tests/fixtures/calibrations-1.0,
 * the bundled calibrations as that release wrote them), read by the current release.
 *
 * Source of the fixtures: this project's own earlier release (bandwright 0.1.0, calibration schema
 * 1.0, commit 27fe979), kept byte for byte (their recorded SHA-256 proves it); see the folder's
 * README. They are compatibility fixtures, not reference data: the expected values come from the
 * calibrations the current release regenerates from examples/, which each test compares with.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { SCHEMA_VERSION, verifyCalibration, type Calibration } from '../../src/calibration/calibration.js';
import { quantifyScan, type QuantifyOptions } from '../../src/calibration/quantify.js';
import { upgradeLayout1 } from '../../src/calibration/layout-1.js';
import { clsPredictionState } from '../../src/models/cls/spectral.js';
import { readCalibration } from '../../src/store/calibration-file.js';
import { readScan } from '../../src/store/scan-file.js';
import { expectError } from '../helpers/expect.js';

const project = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const oldFile = (name: string): string => join(project, 'tests', 'fixtures', 'calibrations-1.0', name);
const currentFile = (name: string): string => join(project, 'calibrations', name);
/** The parts of a schema-1.0 file these tests look at, as written. */
interface FileAsWritten {
  schemaVersion: string;
  sha256: string;
  gases: {
    model: {
      df: number;
      n: number;
      coefficients: { b: number };
      mandel: { df: number[] };
      limits: { df: number };
    } & Record<string, unknown>;
  }[];
  cls?: {
    model: {
      predictionMatrix: number[][];
      responseFactor: number[][];
      noiseGram: number[][];
      sampleResidualCount: number;
      sampleDegreesOfFreedom: number;
    };
  };
}

const parsed = (path: string): FileAsWritten => JSON.parse(readFileSync(path, 'utf8')) as FileAsWritten;

const cases = [
  {
    calibration: 'lab-co.calibration.json',
    samples: join(project, 'examples', 'lab-co', 'samples'),
    options: [{}, { level: 0.99 }] as QuantifyOptions[],
  },
  {
    calibration: 'stack-k2.calibration.json',
    samples: join(project, 'examples', 'stack-mixture', 'samples'),
    options: [
      {},
      { dryBasis: {}, massConcentration: { temperature_K: 273.15, pressure_kPa: 101.325 } },
    ] as QuantifyOptions[],
  },
];

/** Everything but the fields that name the file's version and content hash. */
function content(calibration: Calibration): Record<string, unknown> {
  const rest: Record<string, unknown> = { ...calibration };
  delete rest.schemaVersion;
  delete rest.sha256;
  return rest;
}

describe('calibration files of schema 1.0 (bandwright 0.1.0)', () => {
  it.each(cases)(
    '$calibration loads, keeping the version and hash it was written with',
    ({ calibration }) => {
      const raw = parsed(oldFile(calibration));
      expect(raw.schemaVersion).toBe('1.0');
      const old = readCalibration(oldFile(calibration));
      expect(old.schemaVersion).toBe('1.0');
      expect(old.sha256).toBe(raw.sha256);
    },
  );

  it.each(cases)(
    '$calibration read into the current layout holds exactly what the regenerated file holds',
    ({ calibration }) => {
      const old = readCalibration(oldFile(calibration));
      const current = readCalibration(currentFile(calibration));
      expect(current.schemaVersion).toBe(SCHEMA_VERSION);
      expect(current.sha256).not.toBe(old.sha256);
      expect(content(old)).toEqual(content(current));
      expect(JSON.stringify(content(old))).toBe(JSON.stringify(content(current)));
    },
  );

  it.each(cases)(
    'quantifying the example samples with the schema-1.0 $calibration gives exactly the results of the regenerated one',
    ({ calibration, samples, options }) => {
      const old = readCalibration(oldFile(calibration));
      const current = readCalibration(currentFile(calibration));
      const scans = readdirSync(samples).sort();
      expect(scans.length).toBeGreaterThanOrEqual(5);
      for (const option of options) {
        for (const scan of scans) {
          const spectrum = readScan(join(samples, scan));
          const fromOld = quantifyScan(old, spectrum, option);
          const fromCurrent = quantifyScan(current, spectrum, option);
          expect(fromOld.gases.length, scan).toBeGreaterThan(0);
          expect(JSON.stringify(fromOld), scan).toBe(JSON.stringify(fromCurrent));
        }
      }
    },
  );

  it('the CLS prediction operators rebuilt from a schema-1.0 model are exactly those the file stored', () => {
    const stored = parsed(oldFile('stack-k2.calibration.json')).cls!.model;
    const model = readCalibration(oldFile('stack-k2.calibration.json')).cls!.model;
    for (const field of ['predictionMatrix', 'responseFactor', 'noiseGram', 'sampleResidualCount']) {
      expect(field in model, field).toBe(false);
    }
    const state = clsPredictionState(model);
    expect(state.predictionMatrix.map((row) => Array.from(row))).toEqual(stored.predictionMatrix);
    expect(state.responseFactor).toEqual(stored.responseFactor);
    expect(state.noiseGram).toEqual(stored.noiseGram);
    expect(state.sampleResidualCount).toBe(stored.sampleResidualCount);
    expect(state.sampleDegreesOfFreedom).toBe(stored.sampleDegreesOfFreedom);
  });

  it('the hash of a schema-1.0 file is checked against its content as written: edits are refused', () => {
    const band = parsed(oldFile('lab-co.calibration.json'));
    band.gases[0]!.model.coefficients.b *= 1.01;
    expectError(
      () => verifyCalibration(band, 'lab-co.calibration.json'),
      'INTEGRITY',
      /lab-co.calibration.json: content does not match its recorded sha256/,
    );
    // A field the conversion drops is still covered by the hash.
    const cls = parsed(oldFile('stack-k2.calibration.json'));
    cls.cls!.model.predictionMatrix[0]![0]! += 1e-9;
    expectError(
      () => verifyCalibration(cls, 'stack-k2.calibration.json'),
      'INTEGRITY',
      /content does not match its recorded sha256/,
    );
  });

  it('a file of a newer major schema is refused, whatever its layout', () => {
    for (const path of [oldFile('lab-co.calibration.json'), currentFile('lab-co.calibration.json')]) {
      expectError(
        () => verifyCalibration({ ...parsed(path), schemaVersion: '3.0' }, 'future.json'),
        'SCHEMA',
        /future.json: schemaVersion 3.0 is newer than this tool reads \(2.0\); update bandwright/,
      );
    }
  });

  it('the conversion leaves the parsed file untouched and renames only what schema 2.0 renamed', () => {
    const raw = parsed(oldFile('lab-co.calibration.json'));
    const copy = JSON.stringify(raw);
    const upgraded = upgradeLayout1(raw as unknown as Record<string, unknown>);
    expect(JSON.stringify(raw)).toBe(copy);
    const before = raw.gases[0]!.model;
    const after = (upgraded as unknown as { gases: { model: Record<string, unknown> }[] }).gases[0]!.model;
    expect(after.degreesOfFreedom).toBe(before.df);
    expect(after.standards).toBe(before.n);
    expect(after.mandel).toEqual({ ...before.mandel, df: undefined, degreesOfFreedom: before.mandel.df });
    expect(after.limits).toEqual({ ...before.limits, df: undefined, degreesOfFreedom: before.limits.df });
    const renamed: Record<string, string> = { df: 'degreesOfFreedom', n: 'standards' };
    expect(Object.keys(after)).toEqual(Object.keys(before).map((key) => renamed[key] ?? key));
  });
});
