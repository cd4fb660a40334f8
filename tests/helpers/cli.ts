/**
 * Running the CLI in process and making temporary folders for its files.
 */
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCaptured } from '../../src/cli/main.js';

/** What a command printed and returned. */
export interface CliRun {
  status: number;
  stdout: string;
  stderr: string;
}

/**
 * Runs `bandwright <args…>` in this process.
 *
 * @param args - arguments after the program name
 */
export function runCli(...args: string[]): Promise<CliRun> {
  return runCaptured(args);
}

/** A fresh temporary folder; `cleanup` removes it. */
export function temporaryFolder(prefix = 'bandwright-test-'): {
  path: string;
  cleanup: () => void;
  files: () => string[];
} {
  const path = mkdtempSync(join(tmpdir(), prefix));
  return {
    path,
    cleanup: () => rmSync(path, { recursive: true, force: true }),
    files: () => readdirSync(path).sort(),
  };
}
