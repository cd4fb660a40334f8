/**
 * Folder checks for commands that write several files into one folder.
 */
import { existsSync, readdirSync, statSync } from 'node:fs';

/**
 * True when `path` is an existing folder with at least one entry (or an existing file).
 *
 * @param path - folder path
 */
export function isNonEmptyFolder(path: string): boolean {
  if (!existsSync(path)) return false;
  return !statSync(path).isDirectory() || readdirSync(path).length > 0;
}
