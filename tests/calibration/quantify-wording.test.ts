/**
 * Errors of the quantify core name parameters by the caller's names: a library user reads the
 * library's names (`responses`, `level`), the command line reads its flags. Expected wordings are
 * the product's own contract (DESIGN §2: the core never spells a flag).
 */
import { describe, expect, it } from 'vitest';
import { buildResponseCalibration } from '../../src/calibration/build.js';
import { parseResponseMethod } from '../../src/calibration/method.js';
import { quantifyResponses, quantifyScan } from '../../src/calibration/quantify.js';
import { CLI_PARAMETER_NAMES } from '../../src/cli/parameter-names.js';
import { BandwrightError } from '../../src/errors.js';
import { makeSpectrum } from '../../src/spectrum/spectrum.js';

const calibration = buildResponseCalibration(
  parseResponseMethod({ name: 'CO' }, 'options'),
  [0, 50, 100, 200].flatMap((concentration) =>
    [0.99, 1.01].map((f, line) => ({ concentration, response: 0.002 * concentration * f + 0.001, line })),
  ),
  { inputs: [], createdAt: '2026-12-01T00:00:00.000Z' },
);

function caught(action: () => unknown): BandwrightError {
  try {
    action();
  } catch (error) {
    if (error instanceof BandwrightError) return error;
    throw error;
  }
  throw new Error('expected a BandwrightError');
}

describe('quantify errors worded with the caller’s parameter names', () => {
  it('no responses: the library name in backticks, the flag on the command line', () => {
    const error = caught(() => quantifyResponses(calibration, []));
    expect(error.code).toBe('INVALID_VALUE');
    expect(error.message).toBe('`responses`: give at least one response');
    expect(error.describe(CLI_PARAMETER_NAMES)).toBe('--response: give at least one response');
  });

  it('a level outside (0, 1) names the level parameter', () => {
    const error = caught(() => quantifyResponses(calibration, [0.1], { level: 1.5 }));
    expect(error.message).toMatch(/^`level` = 1\.5, must be a probability between 0 and 1/);
    expect(error.describe(CLI_PARAMETER_NAMES)).toMatch(/^--level = 1\.5/);
  });

  it('a scan given to a calibration made from responses points to the responses parameter', () => {
    const scan = makeSpectrum({
      x: Float64Array.of(2000, 2001, 2002),
      y: new Float64Array(3),
      yKind: 'absorbance',
      metadata: {},
    });
    const error = caught(() => quantifyScan(calibration, scan));
    expect(error.message).toMatch(/give `responses` values instead$/);
    expect(error.describe(CLI_PARAMETER_NAMES)).toMatch(/give --response values instead$/);
  });
});
