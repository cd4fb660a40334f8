/**
 * Fuzzing the table reader (papaparse-based: manifests, response tables, limits) and the manifest
 * reader with token soup near their grammar, byte edits of valid manifests and arbitrary text:
 * every case gives a table or manifest that keeps its invariants, or a BandwrightError with a code.
 */
import { relative, resolve, sep } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { parseNumberCell, parseTable, type Table } from '../../src/formats/csv-table.js';
import { parseManifest, type Manifest } from '../../src/store/manifest.js';
import { toPpm } from '../../src/gas/units.js';
import {
  FUZZ_PARAMETERS,
  FUZZ_RUNS,
  FUZZ_SEED,
  FuzzTally,
  invariant,
  mutated,
  tokenText,
} from './harness.js';

const summaries: string[] = [];
afterAll(() => summaries.forEach((line) => console.log(line)));

const tokens = [
  'scan',
  'CO_ppm',
  'NO_ppb',
  'H2O_pct',
  'N2_ppm',
  'XQ_ppm',
  'path_length_m',
  'temperature_K',
  'temperature_C',
  'pressure_kPa',
  'uncertainty_pct',
  'lot',
  'note',
  ',',
  ';',
  '\t',
  '"',
  '""',
  '\n',
  '\r\n',
  '\r',
  '#',
  ' ',
  'a.csv',
  'b.jdx',
  '../x.csv',
  '/etc/x',
  '.',
  'sub/c.csv',
  '0',
  '1',
  '2.5',
  '-1',
  '-0',
  '1e400',
  '1e300',
  'NaN',
  '10,5',
  '',
  'é',
  '\ufeff',
  '=SUM(A1)',
];
const validManifest = fc
  .record({
    delimiter: fc.constantFrom(',', ';', '\t'),
    rows: fc.array(
      fc.tuple(
        fc.constantFrom('a.csv', 'b.jdx', 'sub/c.csv', '"q,1.csv"'),
        fc.double({ min: 0, max: 1000, noNaN: true }),
        fc.double({ min: 0.01, max: 10, noNaN: true }),
      ),
      { minLength: 1, maxLength: 6 },
    ),
    crlf: fc.boolean(),
  })
  .map(({ delimiter, rows, crlf }) => {
    const lines = [
      ['scan', 'CO_ppm', 'path_length_m'].join(delimiter),
      ...rows.map(([scan, ppm, path]) => [scan, String(ppm), String(path)].join(delimiter)),
    ];
    return `${lines.join(crlf ? '\r\n' : '\n')}\n`;
  });
const text = fc.oneof(
  { weight: 2, arbitrary: tokenText(tokens, 60) },
  { weight: 3, arbitrary: mutated(validManifest, tokens) },
  { weight: 1, arbitrary: fc.string({ unit: 'grapheme', maxLength: 120 }) },
);

function checkTable(table: Table): void {
  invariant(table.columns.length > 0, 'at least one column');
  const keys = table.columns.map((c) => c.toLowerCase());
  invariant(new Set(keys).size === keys.length && keys.every((k) => k !== ''), 'named, unique columns');
  let previous = 0;
  for (const row of table.rows) {
    invariant(Number.isInteger(row.line) && row.line > previous, 'rows on increasing lines');
    previous = row.line;
    invariant(
      keys.every((k) => row.cells.has(k)),
      'a cell for every column',
    );
    for (const cell of row.cells.values()) {
      invariant(cell === cell.trim(), 'cells trimmed');
      try {
        const value = parseNumberCell(
          cell,
          { file: 'f', line: row.line, column: 'c' },
          { decimalComma: table.decimalComma },
        );
        invariant(Number.isFinite(value), 'a number cell is finite');
      } catch (error) {
        invariant(
          error instanceof Error && error.name === 'BandwrightError',
          'a bad number cell is a BandwrightError',
        );
      }
    }
  }
}

describe(`table reader fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('returns a table whose rows and cells keep their invariants, or a BandwrightError with a code', () => {
    const tally = new FuzzTally('tables (parseTable)');
    fc.assert(
      fc.property(text, (input) =>
        tally.attempt(() => parseTable(input, 'fuzz.csv', { maxRows: 50 }), checkTable),
      ),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 50);
  });
});

const folder = resolve('/data/lab');
function checkManifest(manifest: Manifest): void {
  invariant(manifest.gases.length > 0 && manifest.entries.length > 0, 'gases and entries');
  invariant(new Set(manifest.gases.map((g) => g.gas)).size === manifest.gases.length, 'each gas once');
  for (const entry of manifest.entries) {
    const rel = relative(folder, resolve(folder, entry.scan));
    invariant(
      rel !== '' && !rel.startsWith(`..${sep}`) && rel !== '..' && !rel.startsWith(sep),
      `scan ${entry.scan} inside the manifest's folder`,
    );
    invariant(entry.concentrations.length === manifest.gases.length, 'a value per gas');
    for (const c of entry.concentrations)
      invariant(
        Number.isFinite(c.value) && c.value >= 0 && toPpm(c.value, c.unit) <= 1e6,
        'concentrations finite, 0 to 100 %',
      );
    for (const value of Object.values(entry.conditions))
      invariant(Number.isFinite(value) && value > 0, 'conditions positive and finite');
    if (entry.uncertaintyPct !== undefined)
      invariant(Number.isFinite(entry.uncertaintyPct) && entry.uncertaintyPct >= 0, 'uncertainty >= 0');
  }
}

describe(`manifest reader fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('returns a manifest whose entries keep their invariants, or a BandwrightError with a code', () => {
    const tally = new FuzzTally('manifests');
    fc.assert(
      fc.property(text, (input) =>
        tally.attempt(() => parseManifest(input, '/data/lab/standards.csv'), checkManifest),
      ),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 50);
  });
});
