/**
 * Reads every JCAMP-DX file under a folder as `inspect` would and prints, per subfolder, how many
 * opened (and with warnings), how many were refused (by error code, and for `UNSUPPORTED` by what
 * the file holds) and how many crashed (an exception that is not a typed BandwrightError) or opened
 * with a point count or x range other than its header declares. Exit status 1 when any file
 * crashed or disagreed with its header.
 *
 * Usage: npm run corpus -- DIR [--list]
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { BandwrightError } from '../src/errors.js';
import { parseJcamp } from '../src/formats/jcamp/read.js';
import type { Spectrum } from '../src/spectrum/spectrum.js';

interface Tally {
  files: number;
  opened: number;
  warned: number;
  refused: Map<string, number>;
  crashed: string[];
}

function filesUnder(folder: string): string[] {
  return readdirSync(folder)
    .sort()
    .flatMap((name) => {
      const path = join(folder, name);
      if (statSync(path).isDirectory()) return filesUnder(path);
      return /\.(jdx|dx|jcm|jcamp)$/i.test(name) ? [path] : [];
    });
}

/** The header's declared count and range, read by a plain text search (single-block files only). */
function declared(text: string): { points?: number; first?: number; last?: number; wavenumbers: boolean } {
  const label = (name: string): string | undefined =>
    new RegExp(`^##${name}\\s*=\\s*([^$\\r\\n]*)`, 'im').exec(text)?.[1]?.trim();
  const number = (name: string): number | undefined => {
    const value = label(name);
    return value === undefined || value === '' ? undefined : Number(value);
  };
  const units = (label('XUNITS') ?? '').toUpperCase().replace(/\s+/g, '');
  return {
    points: number('NPOINTS'),
    first: number('FIRSTX'),
    last: number('LASTX'),
    wavenumbers: ['1/CM', 'CM-1', 'CM^-1'].includes(units),
  };
}

/** Why an opened spectrum disagrees with its header, or undefined when it agrees. */
function disagreement(text: string, spectrum: Spectrum): string | undefined {
  if ((text.match(/^##TITLE\s*=/gim) ?? []).length !== 1 || /^##XYPOINTS/im.test(text)) return undefined;
  const header = declared(text);
  const n = spectrum.x.length;
  if (header.points !== undefined && header.points !== n) return `${n} points, header says ${header.points}`;
  if (!header.wavenumbers || header.first === undefined || header.last === undefined) return undefined;
  const low = Math.min(header.first, header.last);
  const high = Math.max(header.first, header.last);
  const step = (high - low) / Math.max(1, n - 1);
  const x0 = spectrum.x[0] as number;
  const x1 = spectrum.x[n - 1] as number;
  if (Math.abs(x0 - low) > 0.5 * step || Math.abs(x1 - high) > 0.5 * step) {
    return `x from ${x0} to ${x1}, header says ${low} to ${high}`;
  }
  return undefined;
}

function main(): number {
  const [root, ...flags] = process.argv.slice(2);
  if (root === undefined) {
    process.stderr.write('usage: npm run corpus -- DIR [--list]\n');
    return 2;
  }
  const list = flags.includes('--list');
  const tallies = new Map<string, Tally>();
  for (const path of filesUnder(root)) {
    const folder = relative(root, path).split(/[\\/]/).slice(0, -1).join('/') || '.';
    let tally = tallies.get(folder);
    if (tally === undefined) {
      tally = { files: 0, opened: 0, warned: 0, refused: new Map(), crashed: [] };
      tallies.set(folder, tally);
    }
    tally.files++;
    const bytes = readFileSync(path);
    let outcome: string;
    try {
      const spectrum = parseJcamp(bytes, { source: relative(root, path) });
      const wrong = disagreement(bytes.toString('latin1'), spectrum);
      if (wrong !== undefined) {
        tally.crashed.push(`${relative(root, path)}: opened with ${wrong}`);
        outcome = `WRONG ${wrong}`;
      } else {
        tally.opened++;
        const warnings = spectrum.metadata.warnings ?? [];
        if (warnings.length > 0) tally.warned++;
        outcome = `opened ${spectrum.yKind} ${spectrum.x.length} points${
          warnings.length > 0 ? ` [${warnings.map((w) => w.code).join(', ')}]` : ''
        }`;
      }
    } catch (error) {
      if (error instanceof BandwrightError) {
        const reason =
          error.location.content === undefined ? error.code : `${error.code}:${error.location.content}`;
        tally.refused.set(reason, (tally.refused.get(reason) ?? 0) + 1);
        outcome = `refused ${reason}: ${error.message}`;
      } else {
        tally.crashed.push(`${relative(root, path)}: ${String(error)}`);
        outcome = `CRASHED ${String(error)}`;
      }
    }
    if (list) process.stdout.write(`${relative(root, path)}\t${outcome}\n`);
  }
  const rows = [...tallies.entries()].map(([folder, t]) => [
    folder,
    String(t.files),
    String(t.opened),
    String(t.warned),
    [...t.refused.entries()]
      .sort((a, b) => b[1] - a[1])
      .map(([reason, count]) => `${reason} ${count}`)
      .join(', '),
    String(t.crashed.length),
  ]);
  const total = [...tallies.values()];
  const sum = (pick: (t: Tally) => number): string => String(total.reduce((s, t) => s + pick(t), 0));
  rows.push([
    'all',
    sum((t) => t.files),
    sum((t) => t.opened),
    sum((t) => t.warned),
    sum((t) => [...t.refused.values()].reduce((a, b) => a + b, 0)),
    sum((t) => t.crashed.length),
  ]);
  const head = ['folder', 'files', 'opened', 'with warnings', 'refused (reason count)', 'crashed or wrong'];
  process.stdout.write(`| ${head.join(' | ')} |\n|${head.map(() => ' --- ').join('|')}|\n`);
  for (const row of rows) process.stdout.write(`| ${row.join(' | ')} |\n`);
  const crashed = total.flatMap((t) => t.crashed);
  for (const line of crashed) process.stdout.write(`crashed or wrong: ${line}\n`);
  return crashed.length > 0 ? 1 : 0;
}

process.exitCode = main();
