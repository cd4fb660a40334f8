import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BandwrightError } from '../../src/errors.js';
import { expandScanArguments, segmentToRegExp } from '../../src/batch/scan-paths.js';

let root = '';
const files = [
  'a.csv',
  'b.JDX',
  'c.txt',
  'notes.md',
  '.hidden.csv',
  'q1.csv',
  'q22.csv',
  'x[1].csv',
  'x1.csv',
  'sub/d.csv',
  'sub/deeper/e.jdx',
  'sub/deeper/f.csv',
  'sub/.hid/g.csv',
  'other/h.dx',
  'empty-of-scans/readme.md',
];

beforeAll(() => {
  root = mkdtempSync(join(tmpdir(), 'bandwright-paths-'));
  for (const name of files) {
    mkdirSync(join(root, name, '..'), { recursive: true });
    writeFileSync(join(root, name), 'x');
  }
  mkdirSync(join(root, 'empty'));
});
afterAll(() => rmSync(root, { recursive: true, force: true }));

function expectNotFound(args: string[], fragment: string): void {
  let caught: unknown;
  try {
    expandScanArguments(args);
  } catch (error) {
    caught = error;
  }
  expect(caught).toBeInstanceOf(BandwrightError);
  expect((caught as BandwrightError).code).toBe('FILE_NOT_FOUND');
  expect((caught as BandwrightError).message).toContain(fragment);
}

/**
 * Reference: GNU bash's own pathname expansion (globstar for **, no dotglob, C collation),
 * keeping regular files only as our expansion does.
 */
function bashGlob(pattern: string): string[] {
  const script = `shopt -s globstar nullglob; for f in ${pattern}; do [ -f "$f" ] && printf '%s\\n' "$f"; done; true`;
  const out = execFileSync('bash', ['-c', script], {
    encoding: 'utf8',
    env: { ...process.env, LC_ALL: 'C' },
  });
  return out
    .split('\n')
    .filter((line) => line !== '')
    .sort();
}

describe('expandScanArguments', () => {
  it('a folder gives its scan files sorted by name, not hidden ones nor other extensions, not subfolders', () => {
    expect(expandScanArguments([root])).toEqual(
      ['a.csv', 'b.JDX', 'c.txt', 'q1.csv', 'q22.csv', 'x1.csv', 'x[1].csv'].map((n) => `${root}/${n}`),
    );
    expect(expandScanArguments([root], { extensions: ['.jdx', '.dx'] })).toEqual([`${root}/b.JDX`]);
  });

  const patterns = [
    '*.csv',
    'q?.csv',
    'q[0-9]*.csv',
    '[!aq]*.csv',
    'x[[]1].csv',
    '**/*.csv',
    'sub/**/*.jdx',
    'sub/**',
    '*/*',
    '**/*.[jd]*',
    '.h*',
  ];
  for (const pattern of patterns) {
    it(`glob ${pattern} matches what bash matches`, () => {
      const ours = expandScanArguments([`${root}/${pattern}`]);
      expect([...ours].sort()).toEqual(bashGlob(`${root}/${pattern}`));
      expect(ours).toEqual([...ours].sort());
    });
  }

  it('a relative glob keeps the prefix as written', () => {
    const prefix = relative(process.cwd(), root);
    expect(expandScanArguments([`${prefix}/q*.csv`])).toEqual([`${prefix}/q1.csv`, `${prefix}/q22.csv`]);
  });

  it('an existing path with glob characters is taken literally', () => {
    expect(expandScanArguments([`${root}/x[1].csv`])).toEqual([`${root}/x[1].csv`]);
  });

  it('keeps argument order, removes duplicates, passes - through', () => {
    const result = expandScanArguments([
      `${root}/q1.csv`,
      '-',
      `${root}/q*.csv`,
      `${root}/./q1.csv`,
      `${root}/other`,
      '-',
    ]);
    expect(result).toEqual([`${root}/q1.csv`, '-', `${root}/q22.csv`, `${root}/other/h.dx`]);
  });

  it('a missing file, a glob matching nothing and a folder without scans are FILE_NOT_FOUND naming them', () => {
    expectNotFound([`${root}/missing.csv`], `${root}/missing.csv: no such file or folder`);
    expectNotFound([`${root}/*.spc`], `${root}/*.spc: the pattern matches no file`);
    expectNotFound([`${root}/empty-of-scans`], 'the folder has no scan files');
    expectNotFound([`${root}/empty`], 'the folder has no scan files');
  });

  it('** does not follow a symbolic link to a folder (no cycles), but a linked file is matched', () => {
    const linked = mkdtempSync(join(tmpdir(), 'bandwright-links-'));
    try {
      mkdirSync(join(linked, 'real'));
      writeFileSync(join(linked, 'real', 'a.csv'), 'x');
      symlinkSync(join(linked, 'real'), join(linked, 'loop'));
      symlinkSync(join(linked, 'real', 'a.csv'), join(linked, 'b.csv'));
      expect(expandScanArguments([`${linked}/**/*.csv`])).toEqual([
        `${linked}/b.csv`,
        `${linked}/real/a.csv`,
      ]);
    } finally {
      rmSync(linked, { recursive: true, force: true });
    }
  });

  it('glob segments compile as documented', () => {
    expect(segmentToRegExp('*.csv').test('.a.csv')).toBe(false);
    expect(segmentToRegExp('.*.csv').test('.a.csv')).toBe(true);
    expect(segmentToRegExp('[a-c]?').test('bz')).toBe(true);
    expect(segmentToRegExp('[^a-c]?').test('bz')).toBe(false);
    expect(segmentToRegExp('a\\*').test('a*')).toBe(true);
    expect(segmentToRegExp('a\\*').test('ab')).toBe(false);
  });
});
