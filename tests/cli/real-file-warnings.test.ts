/**
 * The whole path from a JCAMP-DX file with real-instrument quirks to what a user reads: the reader's
 * warnings reach `inspect` (text and JSON) unchanged, with their codes. The file is written here: a
 * transmittance spectrum declared as a fraction but written in percent, one point printed at zero
 * (saturated), and an end-of-file byte after ##END= — three quirks seen in real exports.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { parseJsonAs } from '../helpers/json.js';

const folder = temporaryFolder();
afterAll(folder.cleanup);

const quirky = [
  '##TITLE=quirky export',
  '##JCAMP-DX=4.24',
  '##DATA TYPE=INFRARED SPECTRUM',
  '##XUNITS=1/CM',
  '##YUNITS=TRANSMITTANCE',
  '##FIRSTX=2000',
  '##LASTX=2009',
  '##DELTAX=1',
  '##NPOINTS=10',
  '##XYDATA=(X++(Y..Y))',
  '2000 88 87.5 80 42 0 30 75 86 88 88.5',
  '##END=',
  '\x1a',
].join('\n');

interface InspectEntry {
  yKind: string;
  saturatedPoints?: number;
  warnings: { code: string; message: string }[];
}

describe('real-file warnings, read from a file and shown by inspect', () => {
  const path = join(folder.path, 'quirky.jdx');
  writeFileSync(path, quirky);

  it('inspect --json carries each warning with its code, in file order', async () => {
    const run = await runCli('inspect', path, '--json');
    expect(run.status, run.stderr).toBe(0);
    const [entry] = parseJsonAs<{ scans: InspectEntry[] }>(run.stdout).scans;
    expect(entry?.yKind).toBe('transmittance-percent');
    expect(entry?.saturatedPoints).toBe(1);
    expect(entry?.warnings.map((w) => w.code)).toEqual([
      'trailing-bytes',
      'percent-transmittance',
      'saturated',
    ]);
  });

  it('inspect prints each warning under the file', async () => {
    const run = await runCli('inspect', path);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(/warning \(percent-transmittance\): .*read as percent transmittance/);
    expect(run.stdout).toMatch(/warning \(saturated\): .*1 point\(s\) at or below zero transmittance/);
  });
});
