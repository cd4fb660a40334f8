/**
 * Shared rules of the fuzz tests: a fixed seed and case count, and the one property every reader
 * and model must hold on arbitrary input: it returns a valid value or throws a BandwrightError
 * with a known code; never another exception, never a hang (each case is timed against a
 * generous bound far above the sub-millisecond typical case), never a non-finite result that is
 * neither an error nor flagged.
 */
import fc from 'fast-check';
import { BandwrightError } from '../../src/errors.js';

/** Seed of every fuzz run; printed in each test's name and in the summary line. */
export const FUZZ_SEED = 20_261_201;
/** Cases per reader. */
export const FUZZ_RUNS = 10_000;
/** A case slower than this is taken as a hang (typical cases take well under a millisecond). */
export const HANG_MS = 5_000;

const CODES = new Set([
  'USAGE',
  'FILE_NOT_FOUND',
  'FILE_READ',
  'FILE_EXISTS',
  'PARSE',
  'YCHECK',
  'INVALID_VALUE',
  'NOT_MONOTONIC',
  'WINDOW',
  'CONDITIONS_MISSING',
  'UNKNOWN_GAS',
  'IR_INACTIVE',
  'INSUFFICIENT_DATA',
  'SINGULAR',
  'NO_SOLUTION',
  'INTEGRITY',
  'SCHEMA',
  'LIMIT',
  'CONVERSION',
  'UNSUPPORTED',
]);

/** Counts of what a fuzz run saw, for the summary line. */
export class FuzzTally {
  accepted = 0;
  refused = new Map<string, number>();
  slowestMs = 0;
  private started = performance.now();

  constructor(readonly reader: string) {}

  /**
   * Runs one case: `run` may return (then `check` must accept the value) or throw a
   * BandwrightError with a known code and a non-empty message; anything else fails the property.
   */
  attempt<T>(run: () => T, check: (value: T) => void): void {
    const start = performance.now();
    let value: T;
    try {
      value = run();
    } catch (error) {
      this.time(start);
      if (!(error instanceof BandwrightError))
        throw new Error(
          `${this.reader}: not a BandwrightError: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}`,
          { cause: error },
        );
      if (!CODES.has(error.code))
        throw new Error(`${this.reader}: unknown error code ${error.code}`, { cause: error });
      if (error.message.trim() === '')
        throw new Error(`${this.reader}: empty message for ${error.code}`, { cause: error });
      this.refused.set(error.code, (this.refused.get(error.code) ?? 0) + 1);
      return;
    }
    this.time(start);
    check(value);
    this.accepted++;
  }

  private time(start: number): void {
    const elapsed = performance.now() - start;
    this.slowestMs = Math.max(this.slowestMs, elapsed);
    if (elapsed > HANG_MS)
      throw new Error(`${this.reader}: one case took ${elapsed.toFixed(0)} ms (hang bound ${HANG_MS} ms)`);
  }

  /** One line: cases, accepted, refusals by code, slowest case, total time and seed. */
  summary(): string {
    const total = this.accepted + [...this.refused.values()].reduce((a, b) => a + b, 0);
    const codes = [...this.refused.entries()]
      .sort((a, b) => b[1] - a[1])
      .map(([code, count]) => `${code} ${count}`)
      .join(', ');
    return `fuzz ${this.reader}: ${total} cases (seed ${FUZZ_SEED}), ${this.accepted} accepted, refused: ${codes || 'none'}; slowest case ${this.slowestMs.toFixed(2)} ms, total ${((performance.now() - this.started) / 1000).toFixed(1)} s`;
  }

  /** Total cases run. */
  get total(): number {
    return this.accepted + [...this.refused.values()].reduce((a, b) => a + b, 0);
  }
}

/** fast-check parameters of every fuzz run. */
export const FUZZ_PARAMETERS = { seed: FUZZ_SEED, numRuns: FUZZ_RUNS, endOnFailure: true } as const;

/** Throws (failing the property) with the rule when `condition` is false. */
export function invariant(condition: boolean, rule: string): void {
  if (!condition) throw new Error(`invariant broken: ${rule}`);
}

/** Text made of the given tokens (structured noise near a format's grammar). */
export function tokenText(tokens: readonly string[], maxLength = 80): fc.Arbitrary<string> {
  return fc.array(fc.constantFrom(...tokens), { maxLength }).map((parts) => parts.join(''));
}

/** Byte edits on a valid text: delete, insert, replace or duplicate a span, a few times. */
export function mutated(base: fc.Arbitrary<string>, alphabet: readonly string[]): fc.Arbitrary<string> {
  const edit = fc.record({
    kind: fc.constantFrom('delete', 'insert', 'replace', 'duplicate', 'truncate'),
    at: fc.double({ min: 0, max: 1, noNaN: true }),
    length: fc.integer({ min: 1, max: 12 }),
    text: fc.constantFrom(...alphabet),
  });
  return fc.tuple(base, fc.array(edit, { minLength: 0, maxLength: 3 })).map(([text, edits]) => {
    let out = text;
    for (const e of edits) {
      const i = Math.min(out.length, Math.floor(e.at * out.length));
      if (e.kind === 'delete') out = out.slice(0, i) + out.slice(i + e.length);
      else if (e.kind === 'insert') out = out.slice(0, i) + e.text + out.slice(i);
      else if (e.kind === 'replace') out = out.slice(0, i) + e.text + out.slice(i + e.text.length);
      else if (e.kind === 'duplicate')
        out = out.slice(0, i + e.length) + out.slice(i, i + e.length) + out.slice(i + e.length);
      else out = out.slice(0, i);
    }
    return out;
  });
}

/** True when every value is a finite number. */
export function allFinite(values: ArrayLike<number>): boolean {
  for (let i = 0; i < values.length; i++) if (!Number.isFinite(values[i])) return false;
  return true;
}
