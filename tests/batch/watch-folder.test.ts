/**
 * Folder watching: which files count as complete. A rename or link changes a file's status-change
 * time (ctime) but not its modification time (mtime), while a write sets both (POSIX stat(2):
 * st_ctime is updated by rename, chmod, link and by writes; st_mtime only by writes). A file is
 * taken when ctime > mtime, or when its size and mtime hold still over the settle interval
 * (clock given to the watcher, so the tests control time).
 */
import { appendFileSync, mkdirSync, renameSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import {
  createFolderWatcher,
  openProcessedRecord,
  readProcessedRecord,
  type FileStamp,
} from '../../src/batch/watch-folder.js';
import { temporaryFolder } from '../helpers/cli.js';

const root = temporaryFolder('bandwright-watch-folder-');
let count = 0;
function freshFolder(): string {
  const path = join(root.path, `f${count++}`);
  mkdirSync(path);
  return path;
}
afterAll(() => root.cleanup());
const pause = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

describe('createFolderWatcher', () => {
  it('takes a file written in place only after its size and mtime held still for the settle time', () => {
    const folder = freshFolder();
    let clock = 0;
    const watcher = createFolderWatcher(folder, { settleMs: 500, now: () => clock });
    writeFileSync(join(folder, 'a.csv'), 'part 1\n');
    expect(watcher.poll()).toEqual([]);
    expect(watcher.pending()).toEqual(['a.csv']);
    expect(watcher.nextDelayMs()).toBe(500);
    clock = 300;
    appendFileSync(join(folder, 'a.csv'), 'part 2 makes it longer\n');
    expect(watcher.poll()).toEqual([]); // changed: the settle time starts again
    clock = 700;
    expect(watcher.poll()).toEqual([]); // 400 ms unchanged < 500
    clock = 800;
    const ready = watcher.poll();
    expect(ready.map((file) => [file.name, file.how])).toEqual([['a.csv', 'settled']]);
    expect(ready[0]?.stamp.size).toBe(statSync(join(folder, 'a.csv')).size);
    watcher.markProcessed(ready[0] as (typeof ready)[number]);
    clock = 5000;
    expect(watcher.poll()).toEqual([]);
    expect(watcher.pending()).toEqual([]);
  });

  it('takes a file renamed into place at once, and never a hidden one', async () => {
    const folder = freshFolder();
    const watcher = createFolderWatcher(folder, { settleMs: 60_000, now: () => 0 });
    writeFileSync(join(folder, '.incoming.tmp.csv'), 'x,absorbance\n1,2\n');
    expect(watcher.poll()).toEqual([]);
    expect(watcher.pending()).toEqual([]);
    await pause(30); // the rename's ctime must fall in a later clock tick than the last write
    renameSync(join(folder, '.incoming.tmp.csv'), join(folder, 'b.csv'));
    expect(watcher.poll().map((file) => [file.name, file.how])).toEqual([['b.csv', 'renamed']]);
  });

  it('treats a file whose mtime was set back (cp -p, rsync) as complete: ctime > mtime', () => {
    const folder = freshFolder();
    const watcher = createFolderWatcher(folder, { settleMs: 60_000, now: () => 0 });
    const path = join(folder, 'c.jdx');
    writeFileSync(path, '##TITLE=x\n');
    const past = new Date(Date.now() - 3_600_000);
    utimesSync(path, past, past);
    expect(watcher.poll().map((file) => file.how)).toEqual(['renamed']);
  });

  it('skips files of other extensions and ignored paths; a processed file that changes comes back once', () => {
    const folder = freshFolder();
    let clock = 0;
    const processed = new Map<string, FileStamp>();
    const watcher = createFolderWatcher(folder, {
      settleMs: 100,
      now: () => clock,
      processed,
      ignore: [join(folder, 'results.csv')],
    });
    writeFileSync(join(folder, 'notes.docx'), 'no');
    writeFileSync(join(folder, 'results.csv'), 'scan\n');
    writeFileSync(join(folder, 'd.CSV'), 'first version\n');
    watcher.poll();
    clock = 200;
    const first = watcher.poll();
    expect(first.map((file) => file.name)).toEqual(['d.CSV']);
    watcher.markProcessed(first[0] as (typeof first)[number]);
    expect(processed.get('d.CSV')?.size).toBe(14);
    appendFileSync(join(folder, 'd.CSV'), 'second version\n');
    clock = 300;
    expect(watcher.poll()).toEqual([]);
    clock = 500;
    const again = watcher.poll();
    expect(again.map((file) => [file.name, file.previously?.size, file.stamp.size])).toEqual([
      ['d.CSV', 14, 29],
    ]);
  });

  it('refuses a folder that does not exist', () => {
    expect(() => createFolderWatcher(join(root.path, 'nowhere'))).toThrow(/nowhere: no such folder/);
  });
});

describe('processed-files record', () => {
  it('reads back what was added, the latest line winning, and ignores a last line cut short', () => {
    const path = join(freshFolder(), '.state');
    expect(readProcessedRecord(path).size).toBe(0);
    const record = openProcessedRecord(path);
    record.add('a.jdx', { size: 10, mtimeMs: 1796165483029.1294 });
    record.add('b.jdx', { size: 20, mtimeMs: 2 });
    record.add('a.jdx', { size: 11, mtimeMs: 3 });
    record.close();
    appendFileSync(path, '{"name":"c.jdx","si');
    const read = readProcessedRecord(path);
    expect([...read]).toEqual([
      ['a.jdx', { size: 11, mtimeMs: 3 }],
      ['b.jdx', { size: 20, mtimeMs: 2 }],
    ]);
    // Reopening drops the cut line, so the next record is on its own line.
    const reopened = openProcessedRecord(path);
    reopened.add('d.jdx', { size: 5, mtimeMs: 1796165483029.1294 });
    reopened.close();
    expect(readProcessedRecord(path).get('d.jdx')).toEqual({ size: 5, mtimeMs: 1796165483029.1294 });
    expect(readProcessedRecord(path).size).toBe(3);
  });

  it('names the line of a complete line that is not a record', () => {
    const path = join(freshFolder(), '.state');
    writeFileSync(path, '{"name":"a","size":1,"mtimeMs":2}\nhello\n');
    expect(() => readProcessedRecord(path)).toThrow(/\.state line 2: not a processed-file record/);
  });
});
