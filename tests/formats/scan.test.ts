import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sha256OfBytes, sha256OfFile } from '../../src/store/hash.js';
import { detectScanFormat, parseScan } from '../../src/formats/scan.js';
import { readScan } from '../../src/store/scan-file.js';
import { expectError } from '../helpers/expect.js';

const fixture = (name: string): string =>
  fileURLToPath(new URL(`../fixtures/spectra/${name}`, import.meta.url));
const bytesOf = (text: string): Uint8Array => new TextEncoder().encode(text);
let folder = '';
beforeAll(() => {
  folder = mkdtempSync(join(tmpdir(), 'bandwright-scan-'));
});
afterAll(() => rmSync(folder, { recursive: true, force: true }));

describe('parseScan: format by content, then extension', () => {
  const jcamp = readFileSync(fixture('absorbance-sqz.jdx'));
  const table = readFileSync(fixture('absorbance-header.csv'));

  it('## on the first non-blank line means JCAMP-DX whatever the name', () => {
    expect(detectScanFormat(jcamp, 'scan.csv')).toBe('jcamp');
    expect(detectScanFormat(bytesOf(`\ufeff\n\n  ${jcamp.toString()}`), 'scan.txt')).toBe('jcamp');
    expect(parseScan(jcamp, { source: 'scan.csv' }).metadata.format).toBe('jcamp');
    expect(parseScan(table, { source: 'scan.csv' }).metadata.format).toBe('csv');
  });

  it('a JCAMP-DX extension without ## content is read as JCAMP-DX, so the message says what is missing', () => {
    expect(detectScanFormat(table, 'scan.JDX')).toBe('jcamp');
    expectError(
      () => parseScan(table, { source: 'scan.jdx' }),
      'PARSE',
      'scan.jdx line 1',
      'starts with ##TITLE=',
    );
    expect(parseScan(table, { source: 'scan.jdx', format: 'csv' }).metadata.format).toBe('csv');
  });

  it('a y-kind option that contradicts the JCAMP-DX file is an error; one that agrees is fine', () => {
    expectError(
      () => parseScan(jcamp, { source: 's.jdx', yKind: 'transmittance' }),
      'PARSE',
      'declares absorbance',
      'transmittance',
    );
    expect(parseScan(jcamp, { source: 's.jdx', yKind: 'absorbance' }).yKind).toBe('absorbance');
  });

  it('yKind, defaultYKind and maxPoints reach the table reader', () => {
    const bare = readFileSync(fixture('absorbance-no-header.csv'));
    expect(parseScan(bare, { source: 'n.csv', defaultYKind: 'absorbance' }).yKind).toBe('absorbance');
    expectError(
      () => parseScan(bare, { source: 'n.csv', yKind: 'absorbance', maxPoints: 10 }),
      'LIMIT',
      'n.csv line 11',
    );
    expectError(() => parseScan(jcamp, { source: 's.jdx', maxPoints: 10 }), 'LIMIT', 'more than 10');
  });
});

describe('readScan: files and standard input', () => {
  it('reads a fixture, with the path as source', () => {
    const path = fixture('absorbance-difdup.dx');
    const spectrum = readScan(path);
    expect(spectrum.metadata.source).toBe(path);
    expect(spectrum.x.length).toBe(20);
  });

  it('a missing file, a folder and a file above maxBytes fail with FILE_NOT_FOUND, FILE_READ, LIMIT naming the path', () => {
    expectError(() => readScan(join(folder, 'nope.csv')), 'FILE_NOT_FOUND', join(folder, 'nope.csv'));
    expectError(() => readScan(folder), 'FILE_READ', folder, 'is a folder');
    const path = fixture('absorbance-header.csv');
    expectError(() => readScan(path, { maxBytes: 100 }), 'LIMIT', path, 'above the limit of 100 bytes');
  });

  it('- reads standard input to its end, labelled <stdin>', () => {
    const modulePath = fileURLToPath(new URL('../../src/store/scan-file.ts', import.meta.url));
    const script = `import { readScan } from ${JSON.stringify(modulePath)}; const s = readScan('-', {}); process.stdout.write(JSON.stringify({ n: s.x.length, source: s.metadata.source, y0: s.y[0] }));`;
    const result = spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], {
      input: readFileSync(fixture('absorbance-sqz.jdx')),
      encoding: 'utf8',
    });
    expect(result.stderr).toBe('');
    expect(JSON.parse(result.stdout)).toEqual({ n: 20, source: '<stdin>', y0: 0.1 });
  });
});

describe('SHA-256', () => {
  // FIPS 180-2, Appendix B.1 ("abc") and the digest of the empty message.
  it('matches the published test vectors', () => {
    expect(sha256OfBytes(bytesOf('abc'))).toBe(
      'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad',
    );
    expect(sha256OfBytes(new Uint8Array(0))).toBe(
      'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855',
    );
    const path = join(folder, 'abc.txt');
    writeFileSync(path, 'abc');
    expect(sha256OfFile(path)).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('a file larger than one read chunk agrees with coreutils sha256sum', () => {
    const path = join(folder, 'big.bin');
    const content = Buffer.alloc(3_000_001);
    for (let i = 0; i < content.length; i++) content[i] = (i * 2654435761) >>> 24;
    writeFileSync(path, content);
    const reference = execFileSync('sha256sum', [path], { encoding: 'utf8' }).split(' ')[0];
    expect(sha256OfFile(path)).toBe(reference);
    expect(sha256OfBytes(content)).toBe(reference);
  });

  it('names a missing file and refuses a folder', () => {
    expectError(() => sha256OfFile(join(folder, 'missing')), 'FILE_NOT_FOUND', 'missing');
    expectError(() => sha256OfFile(folder), 'FILE_READ', 'is a folder');
  });
});
