import { describe, expect, it } from 'vitest';
import {
  canonicalJson,
  calibrationHash,
  sealCalibration,
  SCHEMA_VERSION,
  verifyCalibration,
  type CalibrationBody,
} from '../../src/calibration/calibration.js';
import { parseMethod } from '../../src/calibration/method.js';

function body(): CalibrationBody {
  return {
    schemaVersion: SCHEMA_VERSION,
    tool: { name: 'bandwright', version: '0.1.0' },
    createdAt: '2026-12-01T00:00:00.000Z',
    method: parseMethod({ gases: [{ name: 'CO', band: [2040, 2245] }] }, 'm'),
    reference: { pathLength_m: 1, temperature_K: 296, pressure_kPa: 101.325 },
    gases: [],
    standards: [],
    inputs: [{ role: 'manifest', path: 'standards.csv', sha256: 'ab'.repeat(32) }],
    warnings: [],
    cautions: [],
  };
}

describe('calibration integrity', () => {
  it('canonical JSON sorts keys at every level, so formatting and key order do not change the hash', () => {
    expect(canonicalJson({ b: 1, a: { d: [1, { z: 0, y: 1 }], c: 2 } })).toBe(
      '{"a":{"c":2,"d":[1,{"y":1,"z":0}]},"b":1}',
    );
    const sealed = sealCalibration(body());
    const reordered = Object.fromEntries(Object.entries(sealed).reverse()) as unknown as typeof sealed;
    expect(calibrationHash(reordered)).toBe(sealed.sha256);
  });

  it('verifies a sealed calibration read back from pretty-printed JSON', () => {
    const sealed = sealCalibration(body());
    expect(verifyCalibration(JSON.parse(JSON.stringify(sealed, null, 2)), 'c.json').sha256).toBe(
      sealed.sha256,
    );
  });

  it('refuses a tampered calibration, saying it was changed', () => {
    const sealed = sealCalibration(body());
    const tampered = { ...sealed, reference: { ...sealed.reference, pathLength_m: 2 } };
    expect(() => verifyCalibration(tampered, 'c.json')).toThrow(
      /c.json: content does not match its recorded sha256/,
    );
  });

  it('refuses a newer major schema and reads a newer minor one', () => {
    expect(SCHEMA_VERSION).toBe('2.0');
    expect(() => verifyCalibration({ ...sealCalibration(body()), schemaVersion: '3.0' }, 'c.json')).toThrow(
      /schemaVersion 3.0 is newer than this tool reads \(2.0\)/,
    );
    const minor = sealCalibration({ ...body(), schemaVersion: '2.7' });
    expect(verifyCalibration(minor, 'c.json').schemaVersion).toBe('2.7');
  });

  it('refuses a file with missing fields, naming the field', () => {
    const rest: Record<string, unknown> = { ...sealCalibration(body()) };
    delete rest.standards;
    expect(() => verifyCalibration(rest, 'c.json')).toThrow(/field "standards" is missing/);
    expect(() => verifyCalibration([], 'c.json')).toThrow(/not a calibration/);
  });
});
