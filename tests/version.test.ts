import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { TOOL } from '../src/version.js';

describe('tool version', () => {
  it('matches package.json, so calibrations record the version that made them', () => {
    const packageJson = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as {
      name: string;
      version: string;
    };
    expect(TOOL).toEqual({ name: packageJson.name, version: packageJson.version });
  });
});
