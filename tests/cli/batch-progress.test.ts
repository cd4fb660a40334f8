/**
 * The progress bar: drawn on an interactive terminal only, at most once per interval (10 a second
 * by default), with messages printed on their own line without tearing it.
 */
import { describe, expect, it } from 'vitest';
import type { CommandContext } from '../../src/cli/context.js';
import { createProgress } from '../../src/cli/progress.js';

function context(interactive: boolean): CommandContext & { text: () => string } {
  let text = '';
  return {
    stdout: { write: () => true },
    stderr: { write: (s: string) => (text += s) },
    interactive,
    status: 0,
    text: () => text,
  };
}

describe('createProgress', () => {
  it('draws nothing when stderr is not a terminal, but passes messages through', () => {
    const ctx = context(false);
    const progress = createProgress(ctx, { total: 10, now: () => 0 });
    progress.update(5, 0);
    progress.note('bandwright: a.jdx: no such file');
    progress.finish();
    expect(ctx.text()).toBe('bandwright: a.jdx: no such file\n');
  });

  it('redraws at most once per interval, always at the end, and clears the line when done', () => {
    const ctx = context(true);
    let clock = 0;
    const progress = createProgress(ctx, { total: 100, now: () => clock, width: 10 });
    let drawings = 0;
    for (let done = 1; done <= 100; done++) {
      clock = done * 5; // 5 ms a scan: 500 ms in all
      const before = ctx.text().length;
      progress.update(done, done >= 50 ? 1 : 0);
      if (ctx.text().length > before) drawings++;
    }
    // First drawing at once, then every 100 ms (at 105, 205, 305, 405 ms), and the last at 500 ms.
    expect(drawings).toBe(6);
    // eslint-disable-next-line no-control-regex -- the line is redrawn after the terminal's erase-line code, ESC [K
    expect(ctx.text()).toMatch(/\r\x1b\[K\[##########\] 100\/100 scans, 1 failed, 200 scans\/s$/);
    progress.note('a message');
    expect(ctx.text().endsWith('\r\x1b[Ka message\n')).toBe(true);
    progress.update(100, 1);
    progress.finish();
    expect(ctx.text().endsWith('\r\x1b[K')).toBe(true);
  });

  it('shows the time left from the rate so far', () => {
    const ctx = context(true);
    let clock = 0;
    const progress = createProgress(ctx, { total: 1000, now: () => clock, width: 4 });
    clock = 2000;
    progress.update(100, 0); // 50 scans/s, 900 left: 18 s
    expect(ctx.text()).toBe('\r\x1b[K[....] 100/1000 scans, 50 scans/s, 18 s left');
  });
});
