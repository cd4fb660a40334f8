/**
 * inspect on the bundled example scans, and the demo end to end. The example scans are simulated
 * with known truth (examples/generate.ts): the samples' certified values are checked here.
 */
import { existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { gasAt, type InspectDocument, type QuantifyDocument } from '../helpers/documents.js';
import { parseJsonAs, readJsonAs } from '../helpers/json.js';

const examples = join(import.meta.dirname, '..', '..', 'examples');
const folder = temporaryFolder();
afterAll(() => folder.cleanup());

describe('inspect', () => {
  it('describes a JCAMP-DX and a CSV scan: points, range, spacing, y-kind, conditions', async () => {
    const run = await runCli(
      'inspect',
      join(examples, 'lab-co', 'standards', 'co-000a.jdx'),
      join(examples, 'lab-co', 'standards', 'co-020a.csv'),
      '--json',
    );
    expect(run.status).toBe(0);
    const [jcamp, csv] = parseJsonAs<InspectDocument>(run.stdout).scans;
    expect(jcamp).toMatchObject({
      format: 'jcamp',
      points: 1601,
      range_cm: [1950, 2350],
      spacing_cm: 0.25,
      yKind: 'absorbance',
    });
    expect(jcamp?.conditions.pathLength_m).toBe(1);
    expect(csv).toMatchObject({ format: 'csv', points: 1601 });
    // The CSV standards leave their conditions to the manifest (as many instrument exports do).
    expect(csv?.conditions).toEqual({});
  });

  it('names a path that does not exist before reading anything, and exits 1', async () => {
    const run = await runCli(
      'inspect',
      join(examples, 'lab-co', 'standards', 'co-000a.jdx'),
      join(folder.path, 'missing.jdx'),
    );
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/missing.jdx: no such file or folder/);
  });

  it('names an unreadable scan and exits 1, still describing the others', async () => {
    const bad = join(folder.path, 'broken.csv');
    writeFileSync(bad, 'wavenumber_cm-1,absorbance\n2000,0.1\n2001,oops\n');
    const run = await runCli('inspect', join(examples, 'lab-co', 'standards', 'co-000a.jdx'), bad);
    expect(run.status).toBe(1);
    expect(run.stdout).toMatch(/co-000a\.jdx/);
    expect(run.stderr).toMatch(/broken.csv line 3/);
  });
});

describe('demo', () => {
  it('runs the whole job on the example data into one folder', async () => {
    const out = join(folder.path, 'demo');
    const run = await runCli('demo', '--out', out);
    expect(run.stderr).toMatch(/bandwright calibrate/);
    expect(run.status).toBe(0);
    for (const file of ['lab-co.calibration.json', 'lab-co.results.csv', 'lab-co.results.json'])
      expect(existsSync(join(out, file))).toBe(true);
    const results = readJsonAs<QuantifyDocument>(join(out, 'lab-co.results.json')).results;
    // The simulated truth of the cylinders (examples/generate.ts): 75, 180 and 460 ppm.
    const byName = new Map(results.map((r) => [r.scan.replace(/.*\//, ''), gasAt(r)]));
    for (const [name, truth] of [
      ['cylinder-4471.jdx', 75],
      ['cylinder-4472.jdx', 180],
      ['cylinder-4475.jdx', 460],
    ] as const) {
      const gas = byName.get(name);
      expect(gas?.low).toBeLessThan(truth);
      expect(gas?.high).toBeGreaterThan(truth);
    }
    const again = await runCli('demo', '--out', out);
    expect(again.status).toBe(1);
    expect(again.stderr).toMatch(/exists and is not empty; choose another --out or add --force/);
  });
});
