/**
 * Regenerates a PNG of the example calibration report, to look at what a reader gets:
 *
 *   npx tsx tests/report/render-report-png.ts [out.png] [--height <px>]
 *
 * Runs `bandwright demo` (the invented lab scenario: 14 CO standards, samples, twelve weekly
 * checks with a drift) into a temporary folder, then takes a full-width screenshot of its
 * lab-co.report.html with headless Chromium. Prints where the PNG (and the report) are.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { main } from '../../src/cli/main.js';
import { findChromium, screenshot } from './browser.js';
import { decodePng, luminanceStatistics } from './png.js';

async function render(): Promise<number> {
  const args = process.argv.slice(2);
  const heightAt = args.indexOf('--height');
  const height = heightAt >= 0 ? Number(args[heightAt + 1]) : 7600;
  const positional = heightAt >= 0 ? args.filter((_, i) => i !== heightAt && i !== heightAt + 1) : args;
  const out = resolve(positional[0] ?? join(tmpdir(), 'bandwright-report.png'));
  const chromium = findChromium();
  if (chromium.path === undefined) {
    process.stderr.write(`${chromium.reason}\n`);
    return 1;
  }
  const folder = mkdtempSync(join(tmpdir(), 'bandwright-report-demo-'));
  const quiet = { write: () => true };
  // A fixed time, so the report's dates are the same on every run.
  process.env.SOURCE_DATE_EPOCH ??= '1795000000';
  const status = await main(['node', 'bandwright', 'demo', '--out', join(folder, 'demo')], {
    stdout: quiet,
    stderr: quiet,
    interactive: false,
  });
  if (status !== 0) {
    process.stderr.write(`bandwright demo exited with status ${status}\n`);
    return 1;
  }
  const report = join(folder, 'demo', 'lab-co.report.html');
  const image = decodePng(screenshot(chromium.path, report, out, { width: 1000, height }));
  const stats = luminanceStatistics(image);
  process.stdout.write(
    `report: ${report}\npng:    ${out} (${image.width} × ${image.height} px, luminance variance ${stats.variance.toFixed(0)}, ${(stats.inkFraction * 100).toFixed(1)} % ink)\n`,
  );
  return 0;
}

process.exitCode = await render();
