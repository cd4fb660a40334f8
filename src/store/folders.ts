/**
 * Folder checks for commands that write several files into one folder.
 */
import { existsSync, readdirSync, statSync } from 'node:fs';

/**
 * True when writing into `path` would disturb something: it is an existing file, or a folder
 * with at least one entry. An empty folder or a missing path is free.
 *
 * @param path - where a command would write (a folder, or a file)
 */
export function isOccupied(path: string): boolean {
  if (!existsSync(path)) return false;
  return !statSync(path).isDirectory() || readdirSync(path).length > 0;
}
