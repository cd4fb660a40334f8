/**
 * Fuzzing calibration files: a valid band or CLS calibration with one to three fields replaced by
 * arbitrary JSON values, re-sealed so its hash matches (as a careless edit followed by a re-hash
 * would leave it), then read back and used to quantify a scan. Every case is refused with a
 * BandwrightError, or quantifies to finite values and intervals: a damaged calibration never
 * yields NaN, an infinite or a null concentration.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { buildClsCalibration } from '../../src/calibration/build-cls.js';
import { buildBandCalibration, type StandardScan } from '../../src/calibration/build.js';
import { sealCalibration, verifyCalibration, type Calibration } from '../../src/calibration/calibration.js';
import { parseMethod, type BandMethod, type ClsMethod } from '../../src/calibration/method.js';
import { quantifyScan } from '../../src/calibration/quantify.js';
import type { ScanResult } from '../../src/calibration/result.js';
import { bandScan } from '../helpers/band-scans.js';
import { FUZZ_PARAMETERS, FUZZ_RUNS, FUZZ_SEED, FuzzTally, invariant } from './harness.js';

const summaries: string[] = [];
afterAll(() => summaries.forEach((line) => console.log(line)));

const conditions = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const standards: StandardScan[] = [0, 50, 100, 200, 400].map((ppm, i) => ({
  scan: `s${ppm}.csv`,
  line: i + 2,
  spectrum: bandScan(ppm, { metadata: conditions, step: 4, from: 1990, to: 2300 }),
  concentrations: [{ gas: 'CO', unit: 'ppm', value: ppm }],
  conditions: {},
}));
const createdAt = '2026-01-01T00:00:00.000Z';
const band = buildBandCalibration(
  parseMethod(
    {
      gases: [
        {
          name: 'CO',
          band: [2040, 2245],
          baseline: [
            [2000, 2030],
            [2255, 2290],
          ],
        },
      ],
    },
    'method',
  ) as BandMethod,
  standards,
  { inputs: [], createdAt },
);
const cls = buildClsCalibration(
  parseMethod(
    { model: 'cls', gases: ['CO'], regions: [[2060, 2230]], baselineOrder: 1 },
    'method',
  ) as ClsMethod,
  standards,
  { inputs: [], createdAt },
);
const sample = bandScan(120, {
  metadata: { ...conditions, source: 'sample.csv' },
  step: 4,
  from: 1990,
  to: 2300,
});

/** Every path to a value in a JSON tree (object keys and array indices). */
function paths(
  value: unknown,
  prefix: (string | number)[] = [],
  out: (string | number)[][] = [],
): (string | number)[][] {
  if (prefix.length > 0) out.push(prefix);
  if (Array.isArray(value)) value.forEach((v, i) => paths(v, [...prefix, i], out));
  else if (value !== null && typeof value === 'object')
    for (const [k, v] of Object.entries(value)) paths(v, [...prefix, k], out);
  return out;
}
const bodies = [band, cls].map((c) => {
  const { sha256: _ignored, ...body } = JSON.parse(JSON.stringify(c)) as Calibration;
  return { body, paths: paths(body) };
});

const replacement = fc.oneof(
  fc.constantFrom(
    null,
    0,
    -0,
    -1,
    1,
    1e308,
    -1e308,
    1e-300,
    '',
    'x',
    'ppm',
    true,
    [],
    {},
    [1, 2],
    [2245, 2040],
    'cls',
    'band',
    'univariate',
  ),
  fc.double(),
  fc.json({ maxDepth: 1 }).map((text) => JSON.parse(text) as unknown),
);
const edit = fc.record({
  which: fc.nat(),
  path: fc.nat(),
  value: replacement,
  remove: fc.integer({ min: 0, max: 5 }).map((k) => k === 0),
});

function checkResult(result: ScanResult): void {
  for (const gas of result.gases) {
    invariant(
      [gas.value, gas.low, gas.high, gas.se].every(Number.isFinite),
      `${gas.gas}: finite value, interval and se`,
    );
    invariant(gas.low <= gas.high, `${gas.gas}: low <= high`);
  }
}

describe(`calibration file fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('the two unedited calibrations verify and quantify the sample', () => {
    for (const calibration of [band, cls])
      checkResult(quantifyScan(verifyCalibration(JSON.parse(JSON.stringify(calibration)), 'c.json'), sample));
  });

  it('an edited, re-sealed calibration is refused with a BandwrightError, or quantifies to finite numbers', () => {
    const tally = new FuzzTally('calibration files (re-sealed edits)');
    fc.assert(
      fc.property(fc.nat(1), fc.array(edit, { minLength: 1, maxLength: 3 }), (which, edits) => {
        const { body, paths: candidates } = bodies[which] as (typeof bodies)[number];
        const copy = structuredClone(body) as unknown as Record<string, unknown>;
        for (const e of edits) {
          const path = candidates[e.path % candidates.length] as (string | number)[];
          let parent: unknown = copy;
          for (const key of path.slice(0, -1))
            parent =
              parent === null || typeof parent !== 'object'
                ? undefined
                : (parent as Record<string | number, unknown>)[key];
          if (parent === null || typeof parent !== 'object') continue;
          const last = path[path.length - 1] as string | number;
          if (e.remove && !Array.isArray(parent)) delete (parent as Record<string, unknown>)[last];
          else (parent as Record<string | number, unknown>)[last] = e.value;
        }
        const text = JSON.stringify(sealCalibration(copy as unknown as Calibration));
        tally.attempt(
          () => quantifyScan(verifyCalibration(JSON.parse(text), 'fuzz.calibration.json'), sample),
          checkResult,
        );
      }),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 20);
  });
});
