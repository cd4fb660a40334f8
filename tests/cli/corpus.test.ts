/**
 * The broken-input corpus (tests/fixtures/bad): every case of cases.json runs its command on a
 * temporary copy of lab/ and must end with its exit status and message fragment, writing and
 * changing no file. The files are described in tests/fixtures/bad/README.md; generate.ts writes
 * them. The source of each expected failure is the format's own rule for the file (RFC 4180 for tables,
 * JCAMP-DX 4.24/5.01 for XYDATA, NPOINTS, line X values and Y checks, DESIGN §4 for manifests,
 * methods and calibrations).
 */
import { cpSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseManifest } from '../../src/store/manifest.js';
import { decodeText } from '../../src/store/text-file.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';

interface CorpusCase {
  name: string;
  input: string;
  run: string[];
  status: number;
  message: string;
  stream?: 'stdout' | 'stderr';
}

const fixtures = join(import.meta.dirname, '..', 'fixtures', 'bad');
const corpus = JSON.parse(readFileSync(join(fixtures, 'cases.json'), 'utf8')) as { cases: CorpusCase[] };
const folder = temporaryFolder('bandwright-corpus-');
const lab = join(folder.path, 'lab');
const out = join(folder.path, 'out');

/** Every file under a folder with its size and modification time, so a write or change shows. */
function snapshot(root: string): string[] {
  const entries: string[] = [];
  const walk = (dir: string): void => {
    for (const name of readdirSync(dir).sort()) {
      const path = join(dir, name);
      const stats = statSync(path);
      if (stats.isDirectory()) walk(path);
      entries.push(
        `${relative(root, path)} ${stats.isDirectory() ? 'dir' : `${stats.size} ${stats.mtimeMs}`}`,
      );
    }
  };
  walk(root);
  return entries;
}

beforeAll(() => {
  cpSync(join(fixtures, 'lab'), lab, { recursive: true });
  // Over the 1 MiB method limit by 25 bytes: the good method padded with spaces (valid JSON).
  const method = readFileSync(join(lab, 'method.json'), 'utf8');
  writeFileSync(
    join(lab, 'methods', 'huge.json'),
    method + ' '.repeat(1024 * 1024 + 25 - Buffer.byteLength(method)),
  );
});
afterAll(() => folder.cleanup());

describe(`broken-input corpus: ${corpus.cases.length} cases, each with its message and exit status, none writing a file`, () => {
  it('covers every broken file of lab/ at least once', () => {
    const used = new Set(corpus.cases.map((c) => c.input.replace(/ \(.*\)$/, '')));
    const files = snapshot(join(fixtures, 'lab'))
      .map((entry) => entry.split(' ')[0] as string)
      .filter((path) => /^(scans|methods|calibrations)\/|\.history\.csv$|^manifest-(?!scan-)/.test(path));
    const readAsIs = ['manifest-crlf.csv', 'manifest-blank-line-inside.csv', 'manifest-negative-zero.csv'];
    expect(files.filter((path) => !used.has(path) && !readAsIs.includes(path))).toEqual([]);
  });

  it.each(corpus.cases.map((c) => [c.name, c] as const))('%s', async (_name, c) => {
    const before = snapshot(folder.path);
    const args = c.run.map((arg) => arg.replaceAll('{lab}', lab).replaceAll('{out}', out));
    const run = await runCli(...args);
    const text = c.stream === 'stdout' ? run.stdout : run.stderr;
    const expected = c.message.replaceAll('{lab}', lab);
    expect(text, `bandwright ${args.join(' ')}\nstatus ${run.status}\nstderr: ${run.stderr}`).toContain(
      expected,
    );
    expect(run.status, run.stderr).toBe(c.status);
    expect(run.stderr).not.toMatch(/internal error/);
    expect(snapshot(folder.path)).toEqual(before);
  });
});

describe('broken-looking manifests that are valid', () => {
  // CRLF line ends, a blank line between rows and -0 are all valid CSV (RFC 4180 allows CRLF;
  // blank lines carry no record); each must read to the same standards as the plain manifest.
  const plain = parseManifest(
    decodeText(readFileSync(join(fixtures, 'lab', 'standards.csv')), 'standards.csv'),
    join(lab, 'standards.csv'),
  );
  const values = (m: ReturnType<typeof parseManifest>): [string, number][] =>
    m.entries.map((e) => [e.scan, e.concentrations[0]?.value as number]);
  it.each(['manifest-crlf.csv', 'manifest-blank-line-inside.csv', 'manifest-negative-zero.csv'])(
    '%s reads to the same standards',
    (name) => {
      const manifest = parseManifest(
        decodeText(readFileSync(join(fixtures, 'lab', name)), name),
        join(lab, name),
      );
      expect(values(manifest).map(([scan, value]) => [scan, value === 0 ? 0 : value])).toEqual(values(plain));
    },
  );
});
