/**
 * The library's public face: package.json `exports` names the root and its subpaths, the root
 * stays small, and every type a public signature mentions can be named by a user — the root's own
 * parameters and results from the root, everything deeper from some entry point.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { surfacesOf } from './helpers/public-types.js';

const repository = join(import.meta.dirname, '..');
const packageJson = JSON.parse(readFileSync(join(repository, 'package.json'), 'utf8')) as {
  exports: Record<string, string | { types: string; default: string }>;
};
const subpaths = Object.keys(packageJson.exports).filter((key) => key !== '.' && key !== './package.json');
const entryOf = (key: string): string => (key === '.' ? 'src/index.ts' : `src/entries/${key.slice(2)}.ts`);
const entries = ['.', ...subpaths].map(entryOf);
// One TypeScript program for every check (a few seconds to build).
const surfaces = surfacesOf(entries);

describe('package entry points', () => {
  it('has the root, the report and the drift entry points, each compiled from its source module', () => {
    expect(subpaths).toEqual(expect.arrayContaining(['./report', './drift']));
    for (const key of ['.', ...subpaths]) {
      const target = packageJson.exports[key];
      if (typeof target !== 'object') throw new Error(`exports[${key}] is not a conditional export`);
      const compiled = entryOf(key)
        .replace(/^src\//, './dist/')
        .replace(/\.ts$/, '');
      expect(target).toEqual({ types: `${compiled}.d.ts`, default: `${compiled}.js` });
    }
    // Every entry module is listed: none is public by accident.
    const modules = readdirSync(join(repository, 'src/entries')).map(
      (name) => `./${name.replace(/\.ts$/, '')}`,
    );
    expect(subpaths.slice().sort()).toEqual(modules.sort());
  });

  it('keeps the root to the core job: at most 60 names', () => {
    const root = surfaces[0];
    expect(root?.exported.length).toBeLessThanOrEqual(60);
    expect(root?.exported).toEqual(
      expect.arrayContaining([
        'readScan',
        'readCalibration',
        'buildBandCalibration',
        'quantifyScan',
        'measureCheck',
      ]),
    );
  });

  it("exports every parameter and result type of the root's functions from the root", () => {
    expect(surfaces[0]?.missing.filter((type) => type.direct)).toEqual([]);
  });

  it('exports every type the public signatures mention, at any depth, from some entry point', () => {
    const exported = new Set(surfaces.flatMap((surface) => surface.exported));
    const unnamed = surfaces.flatMap((surface, i) =>
      surface.missing
        .filter((type) => !exported.has(type.type))
        .map((type) => `${entries[i]}: ${type.type} (via ${type.mentionedBy})`),
    );
    expect(unnamed).toEqual([]);
  });

  it('loads every entry module', async () => {
    for (const entry of entries) {
      const module = (await import(join(repository, entry))) as Record<string, unknown>;
      expect(Object.keys(module).length).toBeGreaterThan(0);
    }
  });
});

describe('the command line', () => {
  it('imports modules directly, never through an entry point', () => {
    const folder = join(repository, 'src/cli');
    const offenders = readdirSync(folder)
      .filter((name) => name.endsWith('.ts'))
      .filter((name) =>
        /from '\.\.\/(index|entries\/[\w-]+)\.js'/.test(readFileSync(join(folder, name), 'utf8')),
      );
    expect(offenders).toEqual([]);
  });
});
