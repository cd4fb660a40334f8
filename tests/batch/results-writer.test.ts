/**
 * Streaming results files: rows go to `.<name>.partial-<pid>` and the file appears whole on
 * commit (the project's rule: no partial or overwritten output, files renamed into place); append
 * mode checks the header of the file it grows. The checks are on file contents and names, the
 * behaviour POSIX rename(2) guarantees (the target is replaced atomically; common practice).
 */
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { assertAppendable, openResultsWriter, partialResultsPath } from '../../src/batch/results-writer.js';
import { temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-writer-');
const at = (name: string) => join(folder.path, name);
afterAll(() => folder.cleanup());

describe('replace mode', () => {
  it('streams rows into the partial file and renames it into place on commit', () => {
    const writer = openResultsWriter(at('r.csv'), {
      mode: 'replace',
      header: 'scan,CO_ppm\n',
      flushIntervalMs: 0,
    });
    expect(writer.writingPath).toBe(partialResultsPath(at('r.csv')));
    expect(writer.writingPath).toBe(at(`.r.csv.partial-${process.pid}`));
    writer.write('a.jdx,1\n');
    writer.write('b.jdx,2\n');
    // Written out as they come (flush interval 0) but the target does not exist yet.
    expect(readFileSync(writer.writingPath, 'utf8')).toBe('scan,CO_ppm\na.jdx,1\nb.jdx,2\n');
    expect(existsSync(at('r.csv'))).toBe(false);
    expect(writer.rows).toBe(2);
    writer.commit();
    expect(readFileSync(at('r.csv'), 'utf8')).toBe('scan,CO_ppm\na.jdx,1\nb.jdx,2\n');
    expect(existsSync(writer.writingPath)).toBe(false);
  });

  it('buffers small rows until the buffer or the interval is reached', () => {
    let clock = 0;
    const writer = openResultsWriter(at('b.jsonl'), {
      mode: 'replace',
      bufferCharacters: 10,
      flushIntervalMs: 100,
      now: () => clock,
    });
    writer.write('{"a":1}\n');
    expect(readFileSync(writer.writingPath, 'utf8')).toBe('');
    writer.write('{"b":2}\n'); // 16 characters pending ≥ 10
    expect(readFileSync(writer.writingPath, 'utf8')).toBe('{"a":1}\n{"b":2}\n');
    writer.write('{"c":3}\n');
    clock = 150;
    writer.write('{"d":4}\n'); // pending since t = 0, now 150 ≥ 100 ms
    expect(readFileSync(writer.writingPath, 'utf8')).toBe('{"a":1}\n{"b":2}\n{"c":3}\n{"d":4}\n');
    writer.commit();
  });

  it('refuses an existing file without overwrite, keeps it intact, and replaces it with overwrite', () => {
    writeFileSync(at('old.csv'), 'previous\n');
    expect(() => openResultsWriter(at('old.csv'), { mode: 'replace', header: 'scan\n' })).toThrow(
      /old\.csv exists; use `overwrite` to replace it/,
    );
    const writer = openResultsWriter(at('old.csv'), { mode: 'replace', header: 'scan\n', overwrite: true });
    writer.write('a\n');
    expect(readFileSync(at('old.csv'), 'utf8')).toBe('previous\n');
    writer.commit();
    expect(readFileSync(at('old.csv'), 'utf8')).toBe('scan\na\n');
  });

  it('abort removes the partial file and leaves an earlier file untouched', () => {
    writeFileSync(at('keep.csv'), 'earlier\n');
    const writer = openResultsWriter(at('keep.csv'), { mode: 'replace', header: 'scan\n', overwrite: true });
    writer.write('x\n');
    writer.abort();
    expect(readFileSync(at('keep.csv'), 'utf8')).toBe('earlier\n');
    expect(readdirSync(folder.path).filter((name) => name.includes('keep.csv.partial'))).toEqual([]);
  });

  it('does not replace a file that appeared meanwhile without overwrite, and names where the rows are', () => {
    const writer = openResultsWriter(at('race.csv'), { mode: 'replace', header: 'scan\n' });
    writer.write('a\n');
    writeFileSync(at('race.csv'), 'someone else\n');
    expect(() => writer.commit()).toThrow(
      /race\.csv appeared while the results were written; they are kept in .*\.race\.csv\.partial-/,
    );
    expect(readFileSync(at('race.csv'), 'utf8')).toBe('someone else\n');
    expect(readFileSync(writer.writingPath, 'utf8')).toBe('scan\na\n');
  });
});

describe('append mode', () => {
  it('creates a missing file with its header and appends each row at once', () => {
    const writer = openResultsWriter(at('grow.csv'), { mode: 'append', header: 'scan,CO_ppm\n' });
    expect(readFileSync(at('grow.csv'), 'utf8')).toBe('scan,CO_ppm\n');
    writer.write('a.jdx,1\n');
    expect(readFileSync(at('grow.csv'), 'utf8')).toBe('scan,CO_ppm\na.jdx,1\n');
    writer.commit();
    const again = openResultsWriter(at('grow.csv'), { mode: 'append', header: 'scan,CO_ppm\n' });
    again.write('b.jdx,2\n');
    again.commit();
    expect(readFileSync(at('grow.csv'), 'utf8')).toBe('scan,CO_ppm\na.jdx,1\nb.jdx,2\n');
  });

  it("refuses a CSV whose header is not the calibration's, naming both", () => {
    writeFileSync(at('other.csv'), 'scan,NO_ppm\na,1\n');
    expect(() => openResultsWriter(at('other.csv'), { mode: 'append', header: 'scan,CO_ppm\n' })).toThrow(
      /other\.csv line 1: the header "scan,NO_ppm" does not match this calibration's columns "scan,CO_ppm"/,
    );
    expect(readFileSync(at('other.csv'), 'utf8')).toBe('scan,NO_ppm\na,1\n');
  });

  it('refuses a file whose last line was cut short', () => {
    writeFileSync(at('cut.csv'), 'scan,CO_ppm\na,1\nb,');
    expect(() => assertAppendable(at('cut.csv'), 'scan,CO_ppm\n')).toThrow(
      /cut\.csv: the last line is incomplete/,
    );
  });

  it('accepts a JSON-lines file of results and refuses any other', () => {
    writeFileSync(at('ok.jsonl'), '{"scan":"a.jdx","gases":[],"calibrationSha256":"ab"}\n');
    expect(() => assertAppendable(at('ok.jsonl'), undefined)).not.toThrow();
    writeFileSync(at('notes.jsonl'), 'some notes\n');
    expect(() => assertAppendable(at('notes.jsonl'), undefined)).toThrow(
      /notes\.jsonl line 1: not a bandwright results line/,
    );
    writeFileSync(at('empty.jsonl'), '');
    expect(() => assertAppendable(at('empty.jsonl'), undefined)).not.toThrow();
  });
});
