/**
 * A progress bar on standard error, drawn only on an interactive terminal and at most about ten
 * times a second; when stderr is a pipe or a file nothing is drawn (messages still pass through).
 */
import type { CommandContext } from './context.js';

/** A progress display for a batch of known size. */
export interface Progress {
  /**
   * Reports how far the batch is; redraws when the last drawing is older than the interval.
   *
   * @param done - scans finished
   * @param failed - scans among them that failed
   */
  update(done: number, failed: number): void;
  /** Prints a message line on stderr without tearing the bar (the bar comes back at the next drawing). */
  note(message: string): void;
  /** Removes the bar. */
  finish(): void;
}

/** Options of {@link createProgress}. */
export interface ProgressOptions {
  /** Scans in the batch. */
  total: number;
  /** Least time between drawings, ms (default 100). */
  intervalMs?: number;
  /** Bar width in characters (default 30). */
  width?: number;
  /** Clock, ms (default `performance.now`). */
  now?: () => number;
}

/**
 * Makes a progress display for a batch.
 *
 * @param context - where messages go and whether stderr is a terminal
 * @param options - total, redraw interval, width
 * @example
 * const progress = createProgress(context, { total: paths.length });
 * progress.update(120, 1); // "[####......] 120/1000 scans, 1 failed, 850 scans/s"
 */
export function createProgress(context: CommandContext, options: ProgressOptions): Progress {
  const now = options.now ?? (() => performance.now());
  const intervalMs = options.intervalMs ?? 100;
  const width = options.width ?? 30;
  const start = now();
  let lastDraw = Number.NEGATIVE_INFINITY;
  let drawn = false;
  const clear = (): void => {
    if (drawn) context.stderr.write('\r\x1b[K');
    drawn = false;
  };
  return {
    update(done: number, failed: number): void {
      if (!context.interactive) return;
      const time = now();
      if (time - lastDraw < intervalMs && done < options.total) return;
      lastDraw = time;
      const fraction = options.total > 0 ? Math.min(1, done / options.total) : 1;
      const filled = Math.round(fraction * width);
      const seconds = (time - start) / 1000;
      const rate = seconds > 0 ? done / seconds : 0;
      const remaining = rate > 0 ? (options.total - done) / rate : Number.NaN;
      const parts = [`[${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${done}/${options.total} scans`];
      if (failed > 0) parts.push(`${failed} failed`);
      if (rate > 0) parts.push(`${rate.toFixed(0)} scans/s`);
      if (Number.isFinite(remaining) && done < options.total)
        parts.push(
          `${remaining < 60 ? `${remaining.toFixed(0)} s` : `${(remaining / 60).toFixed(1)} min`} left`,
        );
      context.stderr.write(`\r\x1b[K${parts.join(', ')}`);
      drawn = true;
    },
    note(message: string): void {
      clear();
      context.stderr.write(`${message}\n`);
    },
    finish(): void {
      clear();
    },
  };
}
