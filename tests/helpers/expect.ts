/**
 * Shared assertions: a typed refusal with its code and wording, and spectra equal to the bit.
 */
import { expect } from 'vitest';
import { BandwrightError } from '../../src/errors.js';

/**
 * Expects `run` to throw a BandwrightError with this code whose message contains every string
 * fragment and matches every pattern.
 *
 * @returns the error, for further checks
 */
export function expectError(
  run: () => unknown,
  code: string,
  ...fragments: (string | RegExp)[]
): BandwrightError {
  let caught: unknown;
  try {
    run();
  } catch (error) {
    caught = error;
  }
  expect(
    caught,
    `expected a BandwrightError ${code}, ${caught === undefined ? 'nothing was thrown' : 'got another error'}`,
  ).toBeInstanceOf(BandwrightError);
  const error = caught as BandwrightError;
  expect(error.code, error.message).toBe(code);
  for (const fragment of fragments) {
    if (typeof fragment === 'string') expect(error.message).toContain(fragment);
    else expect(error.message).toMatch(fragment);
  }
  return error;
}

/** Same doubles, bit for bit (Object.is tells −0 from 0), with the first difference shown. */
export function expectSameDoubles(
  actual: ArrayLike<number>,
  expected: ArrayLike<number>,
  label: string,
): void {
  expect(actual.length, `${label}: length`).toBe(expected.length);
  for (let i = 0; i < expected.length; i++) {
    if (!Object.is(actual[i], expected[i]))
      expect.fail(`${label}[${i}]: expected ${expected[i]}, got ${actual[i]} (exact comparison)`);
  }
}
