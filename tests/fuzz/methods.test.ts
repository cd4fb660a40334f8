/**
 * Fuzzing method files: JSON text (arbitrary JSON, method-shaped objects with hostile field
 * values, byte edits of valid methods, deep nesting) through the limited JSON reader and the
 * method validator. Every case gives a method that keeps its invariants (windows ordered, baseline
 * windows apart from the band, CLS regions sorted and apart, each gas once, recheck policy in
 * range), or a BandwrightError with a code.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { windowsOverlap, type Window } from '../../src/bands/windows.js';
import { parseMethod, type Method } from '../../src/calibration/method.js';
import { parseJson } from '../../src/store/json-file.js';
import { FUZZ_PARAMETERS, FUZZ_RUNS, FUZZ_SEED, FuzzTally, invariant, mutated } from './harness.js';

const summaries: string[] = [];
afterAll(() => summaries.forEach((line) => console.log(line)));

const number = fc.oneof(
  fc.constantFrom(0, -0, 1, 2, 3, 7, 2040, 2245, 2000, 2030, 2255, 2290, 0.5, 1e308, -1, 100),
  fc.double({ min: -5000, max: 5000 }),
);
const hostile = fc.oneof(
  number,
  fc.constantFrom(
    null,
    true,
    'CO',
    'N2',
    'XQ',
    '',
    'ppm',
    'pct',
    'linear',
    'quadratic',
    '1/x',
    'area',
    'height',
  ),
  fc.constant([]),
  fc.constant({}),
);
const window = fc.oneof(
  { weight: 4, arbitrary: fc.tuple(number, number) },
  { weight: 1, arbitrary: hostile },
  { weight: 1, arbitrary: fc.array(number, { maxLength: 3 }) },
);
const gas = fc.record(
  {
    name: fc.oneof(
      { weight: 5, arbitrary: fc.constantFrom('CO', 'NO', 'CH4', 'N2O', 'H2O', 'CO2') },
      { weight: 1, arbitrary: hostile },
    ),
    unit: fc.oneof(fc.constantFrom('ppm', 'ppb', 'pct'), hostile),
    band: window,
    baseline: fc.oneof(fc.array(window, { maxLength: 3 }), hostile),
    baselineOrder: fc.oneof(fc.integer({ min: -1, max: 4 }), hostile),
    response: fc.oneof(fc.constantFrom('area', 'height'), hostile),
    model: fc.oneof(fc.constantFrom('linear', 'origin', 'quadratic'), hostile),
    weights: fc.oneof(fc.constantFrom('none', '1/x', '1/x2', 'replicates'), hostile),
    secondOrder: fc.oneof(fc.boolean(), hostile),
  },
  { requiredKeys: ['name'] },
);
const method = fc.record(
  {
    model: fc.oneof(
      { weight: 4, arbitrary: fc.constantFrom('band', 'cls') },
      { weight: 1, arbitrary: hostile },
    ),
    gases: fc.oneof(
      { weight: 5, arbitrary: fc.array(fc.oneof(gas, fc.constantFrom('CO', 'NO')), { maxLength: 3 }) },
      { weight: 1, arbitrary: hostile },
    ),
    regions: fc.oneof(fc.array(window, { maxLength: 3 }), hostile),
    interferents: fc.oneof(fc.array(fc.constantFrom('H2O', 'CO2', 'CO', 'N2'), { maxLength: 2 }), hostile),
    baselineOrder: fc.oneof(fc.integer({ min: -1, max: 4 }), hostile),
    recheck: fc.oneof(fc.record({ everyDays: number, tolerancePct: number }, { requiredKeys: [] }), hostile),
    reference: fc.oneof(
      fc.record({ pathLength_m: number, temperature_K: number, pressure_kPa: number }, { requiredKeys: [] }),
      hostile,
    ),
    saturationAbsorbance: number,
    detectionAlpha: fc.oneof(fc.double({ min: -1, max: 1 }), hostile),
    title: fc.oneof(fc.string({ maxLength: 10 }), hostile),
    background: fc.oneof(fc.constantFrom('bg.jdx', '', ' '), hostile),
    extra: hostile,
  },
  { requiredKeys: ['gases'] },
);
const valid = fc.constantFrom(
  '{"gases":[{"name":"CO","unit":"ppm","band":[2040,2245],"baseline":[[2000,2030],[2255,2290]],"model":"quadratic"}],"model":"band","recheck":{"everyDays":7,"tolerancePct":5}}',
  '{"model":"cls","gases":["CO","N2O"],"interferents":["H2O","CO2"],"regions":[[2040,2290],[2150,2260]],"baselineOrder":1}',
);
const jsonTokens = [
  '{',
  '}',
  '[',
  ']',
  ',',
  ':',
  '"',
  '0',
  '1',
  '-',
  '.',
  'e',
  '1e400',
  'null',
  'true',
  '"band"',
  '"regions"',
  '\n',
  ' ',
  '\\',
  '\ufeff',
];
const text = fc.oneof(
  { weight: 4, arbitrary: method.map((m) => JSON.stringify(m)) },
  { weight: 2, arbitrary: mutated(valid, jsonTokens) },
  { weight: 1, arbitrary: fc.json({ maxDepth: 4 }) },
  {
    weight: 1,
    arbitrary: fc.integer({ min: 1, max: 80 }).map((depth) => `${'['.repeat(depth)}${']'.repeat(depth)}`),
  },
);

function checkWindow(w: Window, what: string): void {
  invariant(Number.isFinite(w[0]) && Number.isFinite(w[1]) && w[0] < w[1], `${what}: finite and low < high`);
}

function checkMethod(m: Method): void {
  invariant(
    m.recheck.everyDays > 0 && m.recheck.tolerancePct > 0 && m.recheck.tolerancePct < 100,
    'recheck policy in range',
  );
  invariant(
    m.saturationAbsorbance > 0 && m.detectionAlpha > 0 && m.detectionAlpha < 0.5,
    'saturation and alpha in range',
  );
  const names = m.gases.map((g) => g.name);
  if (m.model === 'band') {
    invariant(new Set(names).size === names.length && names.length > 0, 'each gas once');
    for (const g of m.gases) {
      checkWindow(g.band, 'band');
      invariant(
        Number.isInteger(g.baselineOrder) && g.baselineOrder >= 0 && g.baselineOrder <= 3,
        'baseline order 0–3',
      );
      for (const b of g.baseline) {
        checkWindow(b, 'baseline');
        invariant(!windowsOverlap(b, g.band), 'baseline windows apart from the band');
      }
    }
  } else if (m.model === 'cls') {
    const all = [...names, ...m.interferents.map((g) => g.name)];
    invariant(new Set(all).size === all.length && names.length > 0, 'each component once');
    m.regions.forEach((r, i) => {
      checkWindow(r, 'region');
      if (i > 0)
        invariant(
          (m.regions[i - 1] as Window)[0] <= r[0] && !windowsOverlap(m.regions[i - 1] as Window, r),
          'regions sorted and apart',
        );
    });
  }
}

describe(`method reader fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('returns a method that keeps its invariants, or a BandwrightError with a code', () => {
    const tally = new FuzzTally('method files (JSON + method)');
    fc.assert(
      fc.property(text, (input) =>
        tally.attempt(
          () => parseMethod(parseJson(input, 'fuzz.json', { maxDepth: 32 }), 'fuzz.json'),
          checkMethod,
        ),
      ),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 100);
    expect(tally.refused.get('LIMIT') ?? 0).toBeGreaterThan(0);
  });
});
