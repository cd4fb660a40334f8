/**
 * What a command needs from its surroundings: where to print, so tests can run commands in
 * process and read what they printed.
 */
import type { TextSink } from '../batch/sinks.js';

export type { TextSink };

/** Output streams and the exit status a command wants. */
export interface CommandContext {
  /** Results (tables, JSON). */
  stdout: TextSink;
  /** Messages, warnings, progress. */
  stderr: TextSink;
  /** Whether stderr is an interactive terminal (progress bars only then). */
  interactive: boolean;
  /** Exit status to return; commands raise it, never lower it. */
  status: number;
}

/** Raises the context's exit status to at least `status`. */
export function raiseStatus(context: CommandContext, status: number): void {
  context.status = Math.max(context.status, status);
}

/** Prints a line on stderr with the tool's prefix. */
export function note(context: CommandContext, message: string): void {
  context.stderr.write(`${message}\n`);
}
