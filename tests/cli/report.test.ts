/**
 * `report`, `quantify --report/--plot`, `calibrate --plot`, `recheck --plot` end to end: what is
 * written where, refusals that leave files as they were, inputs that went missing or changed
 * since the calibration was built, escaping of hostile manifest cells, and results CSV cells
 * guarded against spreadsheet formulas.
 *
 * Known truth: synthetic Gaussian-band scans with analytic areas (tests/helpers/band-scans.ts).
 * Formula-injection guard: a text cell starting with =, +, -, @ that is not a number gets a leading
 * apostrophe (OWASP "CSV Injection"; common practice). SHA-256 change detection: FIPS 180-4 via
 * node:crypto.
 */
import { readFileSync, readdirSync, rmSync, statSync, writeFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bandScan, writeScan } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { byClass, parseMarkup, textOf } from '../report/markup-tree.js';

const folder = temporaryFolder('bandwright-report-');
const at = (...names: string[]): string => join(folder.path, ...names);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const bandArgs = ['--gas', 'CO', '--band', '2040:2245', '--baseline', '2000:2030,2255:2290'];
/** A lot cell that would run script if a report did not escape it. */
export const HOSTILE_LOT =
  '<script>window.__bandwrightInjected = 1; document.documentElement.setAttribute("data-injected", "1")</script>';

beforeAll(async () => {
  mkdirSync(at('std'));
  const levels = [0, 0, 50, 50, 100, 100, 200, 200, 400, 400];
  const rows = ['scan,CO_ppm,uncertainty_pct,lot'];
  levels.forEach((ppm, i) => {
    const wobble = 1 + 0.002 * Math.sin(7 * i + 1);
    writeScan(
      at('std', `s${i}.${i % 2 === 0 ? 'csv' : 'jdx'}`),
      bandScan(ppm * wobble, { metadata: { ...reference } }),
    );
    // Lot cells quoted as CSV: a script tag, an ampersand and a formula-looking cell.
    const lot = i === 3 ? HOSTILE_LOT : i === 4 ? 'A&B <lot>' : `L${i}`;
    rows.push(`std/s${i}.${i % 2 === 0 ? 'csv' : 'jdx'},${ppm},1,"${lot.replace(/"/g, '""')}"`);
  });
  writeFileSync(at('standards.csv'), `${rows.join('\n')}\n`);
  writeScan(at('sample-1.jdx'), bandScan(150, { metadata: reference }));
  writeScan(at('sample-2.csv'), bandScan(20, { metadata: reference }));
  const run = await runCli(
    'calibrate',
    at('standards.csv'),
    ...bandArgs,
    '--title',
    'Bench <b>A</b> & "B"',
    '-o',
    at('co.calibration.json'),
  );
  expect(run.status, run.stderr).toBe(0);
});
afterAll(() => folder.cleanup());

/** Asserts that long text contains a string or matches a pattern, printing only the pattern when it does not. */
function has(text: string, pattern: string | RegExp): void {
  const found = typeof pattern === 'string' ? text.includes(pattern) : pattern.test(text);
  expect(found, `expected the output to contain ${String(pattern)}`).toBe(true);
}

describe('report', () => {
  it('writes <calibration without .json>.report.html beside it, self-contained, with every section', async () => {
    const run = await runCli('report', at('co.calibration.json'));
    expect(run.status, run.stderr).toBe(0);
    expect(run.stderr).toContain(`report written to ${at('co.calibration.report.html')}`);
    const html = readFileSync(at('co.calibration.report.html'), 'utf8');
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    for (const id of ['safety', 'summary', 'gas-CO', 'standards', 'rechecks', 'provenance'])
      has(html, `id="${id}"`);
    for (const text of [
      'Linearity (Mandel test)',
      'detection limit x_D (LOD)',
      'not a life-safety monitor',
      'No rechecks are recorded',
      'present, SHA-256 matches',
    ])
      has(html, text);
    expect(html.match(/<svg /g)).toHaveLength(2);
    // Self-contained: no external fetch of any kind, scripts forbidden by the page's policy.
    expect(/<script|<link|<img|<iframe|@import|url\((?!#)/i.test(html), 'an external asset or script').toBe(
      false,
    );
    expect(/\s(src|href)="(?!#)/.test(html), 'a link out of the page').toBe(false);
    has(html, 'http-equiv="Content-Security-Policy" content="default-src &#39;none&#39;');
    // The title and lot cells are shown as text.
    has(html, 'Bench &lt;b&gt;A&lt;/b&gt; &amp; &quot;B&quot;');
    has(html, 'A&amp;B &lt;lot&gt;');
    has(html, '&lt;script&gt;window.__bandwrightInjected = 1;');
    expect(html.includes('<b>A</b>'), 'unescaped title').toBe(false);
  });

  it('refuses to replace an existing report without --force, and replaces it with --force', async () => {
    const path = at('co.calibration.report.html');
    writeFileSync(path, 'keep me');
    const refused = await runCli('report', at('co.calibration.json'));
    expect(refused.status).toBe(1);
    expect(refused.stderr).toMatch(/co\.calibration\.report\.html exists; use --force to replace it/);
    expect(readFileSync(path, 'utf8')).toBe('keep me');
    const forced = await runCli('report', at('co.calibration.json'), '--force');
    expect(forced.status).toBe(0);
    expect(readFileSync(path, 'utf8')).toMatch(/^<!DOCTYPE html>/);
  });

  it('writes each plot as an SVG file with --plot, and refuses to overwrite them without --force', async () => {
    const run = await runCli(
      'report',
      at('co.calibration.json'),
      '-o',
      at('out', 'r.html'),
      '--plot',
      at('plots'),
    );
    expect(run.status, run.stderr).toBe(0);
    expect(readdirSync(at('plots')).sort()).toEqual(['CO-calibration-curve.svg', 'CO-standard-spectra.svg']);
    for (const file of readdirSync(at('plots'))) {
      const text = readFileSync(at('plots', file), 'utf8');
      expect(
        text.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg xmlns="http://www.w3.org/2000/svg"'),
      ).toBe(true);
      expect(byClass(parseMarkup(text), 'axis-label').length).toBeGreaterThanOrEqual(2);
    }
    const before = statSync(at('plots', 'CO-calibration-curve.svg')).mtimeMs;
    const again = await runCli(
      'report',
      at('co.calibration.json'),
      '-o',
      at('out', 'r2.html'),
      '--plot',
      at('plots'),
    );
    expect(again.status).toBe(1);
    expect(again.stderr).toMatch(/CO-calibration-curve\.svg exists; use --force to replace the plots/);
    expect(() => statSync(at('out', 'r2.html'))).toThrow();
    expect(statSync(at('plots', 'CO-calibration-curve.svg')).mtimeMs).toBe(before);
  });

  it('says plainly which standards are missing or changed, and draws the rest', async () => {
    const copy = temporaryFolder('bandwright-report-moved-');
    try {
      // The same calibration, built in a folder where one scan then disappears and another changes.
      mkdirSync(join(copy.path, 'std'));
      for (const file of readdirSync(at('std')))
        writeFileSync(join(copy.path, 'std', file), readFileSync(at('std', file)));
      writeFileSync(join(copy.path, 'standards.csv'), readFileSync(at('standards.csv')));
      expect(
        (
          await runCli(
            'calibrate',
            join(copy.path, 'standards.csv'),
            ...bandArgs,
            '-o',
            join(copy.path, 'co.json'),
          )
        ).status,
      ).toBe(0);
      rmSync(join(copy.path, 'std', 's2.csv'));
      writeScan(join(copy.path, 'std', 's5.jdx'), bandScan(90, { metadata: reference }));
      const run = await runCli('report', join(copy.path, 'co.json'));
      expect(run.status, run.stderr).toBe(0);
      expect(run.stderr).toMatch(
        /note: 2 of 10 standard spectra are not drawn: std\/s2\.csv \(missing\); std\/s5\.jdx \(changed since the calibration was built\)/,
      );
      const html = readFileSync(join(copy.path, 'co.report.html'), 'utf8');
      has(html, 'MISSING');
      has(html, 'CHANGED since the calibration was built (SHA-256 differs)');
      has(html, /2 of 11 recorded input file\(s\) are missing or no longer match/);
      const spectra = parseMarkup(
        /<svg [^]*?<\/svg>/g.exec(html.slice(html.indexOf('plot-spectra') - 200))?.[0] ?? '',
      );
      expect(byClass(spectra, 'spectrum')).toHaveLength(8);
    } finally {
      copy.cleanup();
    }
  });

  it('refuses a bad --wavenumber-axis as a usage error before writing anything', async () => {
    const run = await runCli(
      'report',
      at('co.calibration.json'),
      '-o',
      at('never.html'),
      '--wavenumber-axis',
      'left',
    );
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(
      /--wavenumber-axis = "left", must be descending \(high wavenumbers on the left\) or ascending/,
    );
    expect(() => statSync(at('never.html'))).toThrow();
  });
});

describe('quantify --report and --plot, calibrate --plot, recheck --plot', () => {
  it('writes the batch report: results table, one collapsed section per sample with its spectrum plot', async () => {
    // A scan that does not reach the band's window: read, but not quantified.
    writeScan(at('narrow.csv'), bandScan(50, { from: 2100, to: 2300, metadata: reference }));
    const run = await runCli(
      'quantify',
      at('co.calibration.json'),
      at('sample-1.jdx'),
      at('sample-2.csv'),
      at('narrow.csv'),
      '--report',
      at('batch.html'),
      '--plot',
      at('batch-plots'),
    );
    expect(run.status).toBe(1);
    expect(run.stderr).toContain(`report written to ${at('batch.html')}`);
    const html = readFileSync(at('batch.html'), 'utf8');
    has(html, 'Results with 95 % prediction intervals');
    expect(html.match(/<details id="sample-\d+">/g)).toHaveLength(3);
    // The narrow scan is drawn as far as it goes; its baseline windows are outside it, and the plot says so.
    expect(html.match(/class="plot plot-spectra"/g)).toHaveLength(3);
    has(html, 'narrow.csv: baseline not drawn');
    has(html, 'Could not be quantified');
    expect(readdirSync(at('batch-plots')).sort()).toEqual([
      'narrow-CO-spectrum.svg',
      'sample-1-CO-spectrum.svg',
      'sample-2-CO-spectrum.svg',
    ]);
  });

  it('refuses an existing --report before quantifying anything', async () => {
    writeFileSync(at('taken.html'), 'x');
    const run = await runCli(
      'quantify',
      at('co.calibration.json'),
      at('sample-1.jdx'),
      '--report',
      at('taken.html'),
      '--csv',
      at('taken.csv'),
    );
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/taken\.html exists; use --force to replace it/);
    expect(() => statSync(at('taken.csv'))).toThrow();
  });

  it("calibrate --plot writes the curve and the standards' spectra", async () => {
    const run = await runCli(
      'calibrate',
      at('standards.csv'),
      ...bandArgs,
      '-o',
      at('again.json'),
      '--plot',
      at('cal-plots'),
      '--wavenumber-axis',
      'ascending',
    );
    expect(run.status, run.stderr).toBe(0);
    expect(readdirSync(at('cal-plots')).sort()).toEqual([
      'CO-calibration-curve.svg',
      'CO-standard-spectra.svg',
    ]);
    const spectra = parseMarkup(readFileSync(at('cal-plots', 'CO-standard-spectra.svg'), 'utf8'));
    expect(byClass(spectra, 'axis-label').map(textOf)).toContain(
      'wavenumber / cm⁻¹ (increasing to the right)',
    );
  });

  it('recheck --plot writes the control chart of the history', async () => {
    writeScan(at('check.csv'), bandScan(100, { metadata: reference }));
    const run = await runCli(
      'recheck',
      at('again.json'),
      at('check.csv'),
      '--certified',
      '100',
      '--at',
      '2026-11-02T09:00:00Z',
      '--plot',
      at('chart'),
    );
    expect([0, 3]).toContain(run.status);
    const chart = parseMarkup(readFileSync(at('chart', 'CO-control-chart.svg'), 'utf8'));
    expect(byClass(chart, 'check')).toHaveLength(1);
    expect(byClass(chart, 'tolerance-line')).toHaveLength(2);
    const report = await runCli('report', at('again.json'));
    expect(report.status).toBe(0);
    has(readFileSync(at('again.report.html'), 'utf8'), 'Rechecks of CO');
  });
});

describe('report with a damaged recheck history', () => {
  it('still writes the report and says the history could not be read', async () => {
    writeFileSync(at('co.calibration.history.csv'), 'not a history\n');
    try {
      const run = await runCli('report', at('co.calibration.json'), '-o', at('damaged.html'));
      expect(run.status, run.stderr).toBe(0);
      has(readFileSync(at('damaged.html'), 'utf8'), 'the recheck history could not be read: ');
    } finally {
      rmSync(at('co.calibration.history.csv'));
    }
  });
});

describe('results CSV guarded against formulas', () => {
  it('writes a sample named =HYPERLINK(…) with a leading apostrophe, and shows it as text in the report', async () => {
    const name = '=HYPERLINK("http:evil","click").csv';
    writeScan(at(name), bandScan(100, { metadata: reference }));
    const previous = process.cwd();
    // The scan column holds the path as the user typed it, so type it relative to its folder.
    process.chdir(folder.path);
    try {
      const run = await runCli(
        'quantify',
        'co.calibration.json',
        name,
        '--csv',
        'guarded.csv',
        '--report',
        'guarded.html',
      );
      expect(run.status, run.stderr).toBe(0);
    } finally {
      process.chdir(previous);
    }
    const text = readFileSync(at('guarded.csv'), 'utf8');
    const rows = Papa.parse<string[]>(text.trim()).data;
    expect(rows[1]?.[0]).toBe(`'${name}`);
    has(text, `"'=HYPERLINK(""http:evil"",""click"").csv"`);
    const html = readFileSync(at('guarded.html'), 'utf8');
    has(html, '=HYPERLINK(&quot;http:evil&quot;,&quot;click&quot;).csv');
  });
});
