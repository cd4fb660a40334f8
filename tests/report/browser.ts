/**
 * Headless Chromium (Debian's `chromium` package) for the report tests: screenshots and the DOM
 * after scripts have run, with no npm browser driver. Each run gets a fresh profile folder and no
 * network features, so nothing is fetched and runs do not share state.
 *
 * When no browser is found and the process runs as root with apt-get (CI, a developer machine of
 * this project), it is installed once (`apt-get install -y chromium`); when that is impossible the
 * browser tests are skipped with the reason printed.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';

const CANDIDATES = ['chromium', 'chromium-browser', 'google-chrome'];

function which(name: string): string | undefined {
  const found = spawnSync('sh', ['-c', `command -v ${name}`], { encoding: 'utf8' });
  const path = found.stdout.trim();
  return found.status === 0 && path !== '' ? path : undefined;
}

let cached: { path?: string; reason?: string } | undefined;

/**
 * Finds Chromium, installing Debian's package when it is missing and that is possible.
 *
 * @returns the browser's path, or the reason there is none
 */
export function findChromium(): { path?: string; reason?: string } {
  if (cached !== undefined) return cached;
  for (const name of CANDIDATES) {
    const path = which(name);
    if (path !== undefined) return (cached = { path });
  }
  const root = typeof process.getuid === 'function' && process.getuid() === 0;
  if (root && which('apt-get') !== undefined) {
    spawnSync(
      'sh',
      ['-c', 'apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium'],
      { stdio: 'ignore', timeout: 600_000 },
    );
    const path = which('chromium');
    if (path !== undefined) return (cached = { path });
  }
  return (cached = {
    reason:
      'chromium is not installed and could not be installed (apt-get install chromium needs root and the Debian archive): the browser checks of the HTML report are skipped',
  });
}

const FLAGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--hide-scrollbars',
  '--force-device-scale-factor=1',
];

function run(browser: string, args: string[]): string {
  const profile = mkdtempSync(join(tmpdir(), 'bandwright-chromium-'));
  try {
    return execFileSync(browser, [...FLAGS, `--user-data-dir=${profile}`, ...args], {
      encoding: 'utf8',
      timeout: 120_000,
      maxBuffer: 256 * 1024 * 1024,
      stdio: ['ignore', 'pipe', 'ignore'],
    });
  } finally {
    rmSync(profile, { recursive: true, force: true });
  }
}

/**
 * Takes a screenshot of a local HTML or SVG file.
 *
 * @param browser - Chromium's path
 * @param file - the page
 * @param png - where to write the PNG
 * @param size - window width and height, px
 * @returns the PNG's bytes
 */
export function screenshot(
  browser: string,
  file: string,
  png: string,
  size: { width: number; height: number },
): Buffer {
  run(browser, [
    `--screenshot=${png}`,
    `--window-size=${size.width},${size.height}`,
    pathToFileURL(file).href,
  ]);
  return readFileSync(png);
}

/**
 * The DOM of a local page after its scripts ran, serialised by the browser.
 *
 * @param browser - Chromium's path
 * @param file - the page
 * @param size - window size (layout depends on it)
 */
export function dumpDom(
  browser: string,
  file: string,
  size: { width: number; height: number } = { width: 1000, height: 1200 },
): string {
  return run(browser, [
    '--dump-dom',
    '--virtual-time-budget=5000',
    `--window-size=${size.width},${size.height}`,
    pathToFileURL(file).href,
  ]);
}
