/**
 * The HTML report in a real browser (headless Chromium, Debian's package): the page renders (a
 * screenshot that is not blank), each plot's SVG has its points, curve, band and labelled axes as
 * laid out by the browser, a standard lands on its pixel, and a manifest cell holding a script
 * is shown as text and never runs.
 *
 * References: Chromium's own layout and PNG encoder (the browser is the outside judge of what a
 * reader sees); the PNG decoder in ./png.ts is itself checked against a page of known colours.
 * Pixel geometry: the SVG viewBox mapping (W3C SVG 1.1 §7.7).
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { calibrationCurveData, renderCalibrationCurve } from '../../src/report/svg/calibration-curve.js';
import { clsFitData } from '../../src/report/svg/cls-data.js';
import { renderClsFit } from '../../src/report/svg/cls-fit.js';
import { renderControlChart } from '../../src/report/svg/control-chart.js';
import { gasSpectraData, renderSpectra } from '../../src/report/svg/spectra.js';
import { makeSpectrum } from '../../src/spectrum/spectrum.js';
import { calibration as clsCalibration, clsStandards, conditions, grid, mixture } from './cls-calibration.js';
import { bandScan, writeScan } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { dumpDom, findChromium, screenshot } from './browser.js';
import { dinGas } from './din-gas.js';
import { decodePng, luminanceStatistics } from './png.js';

const chromium = findChromium();
if (chromium.path === undefined) console.warn(`bandwright browser tests: ${chromium.reason}`);
const browser = chromium.path as string;
const folder = temporaryFolder('bandwright-browser-');
const at = (...names: string[]): string => join(folder.path, ...names);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const INJECTED =
  '<script>window.__bandwrightInjected = 1; document.documentElement.setAttribute("data-injected", "1")</script>';

/** Text content of `<pre id="probe">` in a dumped DOM (the browser escapes &, < and > in text). */
function probeOf(dom: string): unknown {
  const match = /<pre id="probe">([^<]*)<\/pre>/.exec(dom);
  if (match === null) throw new Error('the probe script did not run');
  return JSON.parse((match[1] as string).replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&'));
}

/** The report with its script-forbidding policy removed and a probe script appended. */
function withProbe(html: string, script: string): string {
  const stripped = html.replace(/<meta http-equiv="Content-Security-Policy"[^>]*>/, '');
  expect(stripped.length).toBeLessThan(html.length);
  return stripped.replace('</body>', `<pre id="probe"></pre><script>${script}</script></body>`);
}

beforeAll(async () => {
  mkdirSync(at('std'));
  const rows = ['scan,CO_ppm,lot'];
  [0, 0, 50, 50, 100, 100, 200, 200, 400, 400].forEach((ppm, i) => {
    writeScan(
      at('std', `s${i}.csv`),
      bandScan(ppm * (1 + 0.002 * Math.sin(7 * i + 1)), { metadata: reference }),
    );
    rows.push(`std/s${i}.csv,${ppm},"${(i === 3 ? INJECTED : `L${i}`).replace(/"/g, '""')}"`);
  });
  writeFileSync(at('standards.csv'), `${rows.join('\n')}\n`);
  const calibrated = await runCli(
    'calibrate',
    at('standards.csv'),
    '--gas',
    'CO',
    '--band',
    '2040:2245',
    '--baseline',
    '2000:2030,2255:2290',
    '-o',
    at('co.json'),
  );
  expect(calibrated.status, calibrated.stderr).toBe(0);
  const reported = await runCli('report', at('co.json'));
  expect(reported.status, reported.stderr).toBe(0);
});
afterAll(() => folder.cleanup());

describe.skipIf(chromium.path === undefined)('HTML report in headless Chromium', () => {
  it('decodes Chromium screenshots exactly (a page of known colours)', () => {
    writeFileSync(
      at('colours.html'),
      '<!DOCTYPE html><body style="margin:0;background:#ff0000"><div style="width:50px;height:40px;background:#000000"></div></body>',
    );
    const image = decodePng(
      screenshot(browser, at('colours.html'), at('colours.png'), { width: 100, height: 80 }),
    );
    expect([image.width, image.height]).toEqual([100, 80]);
    const pixel = (x: number, y: number): number[] =>
      Array.from(
        image.pixels.subarray(
          (y * image.width + x) * image.channels,
          (y * image.width + x) * image.channels + 3,
        ),
      );
    expect(pixel(10, 10)).toEqual([0, 0, 0]);
    expect(pixel(49, 39)).toEqual([0, 0, 0]);
    expect(pixel(80, 60)).toEqual([255, 0, 0]);
    expect(pixel(50, 10)).toEqual([255, 0, 0]);
  });

  it('renders the report: the screenshot is not blank (a blank page is)', () => {
    const report = luminanceStatistics(
      decodePng(screenshot(browser, at('co.report.html'), at('report.png'), { width: 1000, height: 3000 })),
    );
    writeFileSync(at('blank.html'), '<!DOCTYPE html><body></body>');
    const blank = luminanceStatistics(
      decodePng(screenshot(browser, at('blank.html'), at('blank.png'), { width: 1000, height: 3000 })),
    );
    expect(blank.variance).toBe(0);
    expect(report.variance).toBeGreaterThan(500);
    expect(report.inkFraction).toBeGreaterThan(0.03);
  });

  it('lays out every plot with its points, curve, bands, windows and labelled axes', () => {
    const html = readFileSync(at('co.report.html'), 'utf8');
    const probe = `
      const plots = [...document.querySelectorAll('svg.plot')].map((svg) => {
        const count = (selector) => svg.querySelectorAll(selector).length;
        const box = (el) => { const r = el.getBoundingClientRect(); return [r.width, r.height]; };
        return {
          kind: [...svg.classList].find((c) => c.startsWith('plot-')),
          standards: count('.standard'),
          curveLength: [...svg.querySelectorAll('.fitted-curve')].map((p) => p.getTotalLength()),
          band: [...svg.querySelectorAll('.prediction-band, .band-window')].map(box),
          spectra: count('.spectrum'),
          baselineWindows: count('.baseline-window'),
          labels: [...svg.querySelectorAll('.axis-label')].map((t) => [t.textContent, t.getComputedTextLength()]),
          ticks: count('.tick-label'),
          legend: count('.legend-entry'),
        };
      });
      document.getElementById('probe').textContent = JSON.stringify(plots);`;
    writeFileSync(at('probe.html'), withProbe(html, probe));
    const plots = probeOf(dumpDom(browser, at('probe.html'))) as {
      kind: string;
      standards: number;
      curveLength: number[];
      band: number[][];
      spectra: number;
      baselineWindows: number;
      labels: [string, number][];
      ticks: number;
      legend: number;
    }[];
    expect(plots.map((p) => p.kind)).toEqual(['plot-calibration-curve', 'plot-spectra']);
    const [curve, spectra] = plots as [(typeof plots)[number], (typeof plots)[number]];
    expect(curve.standards).toBe(10);
    expect(curve.curveLength[0]).toBeGreaterThan(300);
    expect(curve.band[0]?.[0]).toBeGreaterThan(300);
    expect(curve.band[0]?.[1]).toBeGreaterThan(100);
    expect(curve.labels.map((l) => l[0])).toEqual([
      'CO concentration / ppm',
      'band area / AU·cm⁻¹',
      'CO concentration / ppm',
      'residual',
    ]);
    expect(spectra.spectra).toBe(10);
    expect(spectra.baselineWindows).toBe(2);
    expect(spectra.band[0]?.[0]).toBeGreaterThan(100);
    expect(spectra.labels.map((l) => l[0])).toEqual([
      'wavenumber / cm⁻¹ (decreasing to the right)',
      'absorbance (decadic) / AU',
    ]);
    for (const plot of plots) {
      // Real text: the browser measured every axis label with a font.
      for (const [text, width] of plot.labels) expect(width, text).toBeGreaterThan(5 * text.length);
      expect(plot.ticks).toBeGreaterThan(8);
      expect(plot.legend).toBeGreaterThan(3);
    }
  });

  it('lays out all four kinds of plot with their own elements and measured axis labels', () => {
    const standards = clsStandards();
    const cls = clsCalibration(standards);
    const sample = makeSpectrum({
      x: grid,
      y: mixture(80, 120, () => 0),
      yKind: 'absorbance',
      metadata: { source: 'sample.csv', ...conditions },
    });
    const svgs = [
      renderCalibrationCurve(calibrationCurveData(dinGas()), { id: 'p1' }),
      renderSpectra(gasSpectraData(dinGas(), [{ label: 's.csv', spectrum: bandScan(100) }]), { id: 'p2' }),
      renderClsFit(clsFitData(cls, sample, conditions), { id: 'p3' }),
      renderControlChart(
        {
          records: [0, 7, 14, 21].map((d, i) => ({
            time: new Date(Date.UTC(2026, 8, 1 + d)).toISOString(),
            recoveryPct: 100 - i,
            verdict: i === 3 ? ('warning' as const) : ('pass' as const),
            rules: i === 3 ? ['1-2s'] : [],
          })),
          centrePct: 100,
          tolerancePct: 5,
          sigmaPct: 1.5,
          sigmaSource: 'tolerance/3',
          trend: {
            slopePctPerDay: -1 / 7,
            interceptPct: 100,
            originTime: '2026-09-01T00:00:00.000Z',
            fittedFrom: '2026-09-01T00:00:00.000Z',
            fittedTo: '2026-09-22T00:00:00.000Z',
            projectUntil: '2026-10-20T00:00:00.000Z',
            leavesToleranceAt: '2026-10-06T00:00:00.000Z',
          },
        },
        { id: 'p4' },
      ),
    ];
    const expected: Record<string, string[]> = {
      'plot-calibration-curve': [
        '.standard',
        '.fitted-curve',
        '.prediction-band',
        '.confidence-band',
        '.limit-line line',
        '.residual',
      ],
      'plot-spectra': ['.spectrum', '.band-window', '.baseline-window', '.fitted-baseline'],
      'plot-cls-fit': ['.measured', '.fitted', '.contribution', '.residual-spectrum', '.region'],
      'plot-control-chart': [
        '.check',
        '.tolerance-line',
        '.warning-line',
        '.action-line',
        '.rule-violation',
        '.trend-line',
        '.trend-projection',
      ],
    };
    const script = `
      const expected = ${JSON.stringify(expected)};
      const result = [...document.querySelectorAll('svg.plot')].map((svg) => {
        const kind = [...svg.classList].find((c) => c.startsWith('plot-'));
        const parts = Object.fromEntries(expected[kind].map((selector) => {
          const elements = [...svg.querySelectorAll(selector)];
          const visible = elements.filter((e) => { const r = e.getBoundingClientRect(); return r.width > 0 || r.height > 0; });
          return [selector, [elements.length, visible.length]];
        }));
        const labels = [...svg.querySelectorAll('.axis-label')].map((t) => t.getComputedTextLength());
        return { kind, parts, labels };
      });
      document.getElementById('probe').textContent = JSON.stringify(result);`;
    writeFileSync(
      at('kinds.html'),
      `<!DOCTYPE html><html><body style="margin:0">${svgs.join('')}<pre id="probe"></pre><script>${script}</script></body></html>`,
    );
    const result = probeOf(dumpDom(browser, at('kinds.html'), { width: 760, height: 3000 })) as {
      kind: string;
      parts: Record<string, [number, number]>;
      labels: number[];
    }[];
    expect(result.map((r) => r.kind)).toEqual(Object.keys(expected));
    for (const plot of result) {
      for (const [selector, [count, visible]] of Object.entries(plot.parts)) {
        expect(count, `${plot.kind} ${selector}`).toBeGreaterThan(0);
        expect(visible, `${plot.kind} ${selector} drawn with a size`).toBe(count);
      }
      expect(plot.labels.length, plot.kind).toBeGreaterThanOrEqual(2);
      for (const width of plot.labels) expect(width, plot.kind).toBeGreaterThan(40);
    }
  });

  it('places a standard of known concentration and response on its pixel within 0.5 px, as the browser lays it out', () => {
    const svg = renderCalibrationCurve(calibrationCurveData(dinGas()), {
      id: 'din',
      concentrationDomain: [0, 0.5],
      responseDomain: [2000, 8000],
    });
    const script = `
      const svg = document.querySelector('svg').getBoundingClientRect();
      const frame = document.querySelector('.panel-frame[data-panel="curve"]').getBoundingClientRect();
      const marker = [...document.querySelectorAll('.standard')].find((m) => m.dataset.concentration === '0.25').getBoundingClientRect();
      document.getElementById('probe').textContent = JSON.stringify({
        frame: [frame.left - svg.left, frame.top - svg.top, frame.width, frame.height],
        centre: [marker.left + marker.width / 2 - svg.left, marker.top + marker.height / 2 - svg.top],
      });`;
    writeFileSync(
      at('geometry.html'),
      `<!DOCTYPE html><html><body style="margin:0">${svg}<pre id="probe"></pre><script>${script}</script></body></html>`,
    );
    const { frame, centre } = probeOf(dumpDom(browser, at('geometry.html'))) as {
      frame: number[];
      centre: number[];
    };
    const [left, top, width, height] = frame as [number, number, number, number];
    const expected = [left + (0.25 / 0.5) * width, top + height - ((5058 - 2000) / 6000) * height];
    expect(
      Math.abs((centre[0] as number) - (expected[0] as number)),
      `x ${centre[0]} vs ${expected[0]}`,
    ).toBeLessThanOrEqual(0.5);
    expect(
      Math.abs((centre[1] as number) - (expected[1] as number)),
      `y ${centre[1]} vs ${expected[1]}`,
    ).toBeLessThanOrEqual(0.5);
  });

  it('shows a lot cell holding a <script> as text and never runs it', () => {
    const html = readFileSync(at('co.report.html'), 'utf8');
    // 1. The report as written: the cell is text, no element came from it, nothing ran.
    const dom = dumpDom(browser, at('co.report.html'));
    expect(dom).toContain('&lt;script&gt;window.__bandwrightInjected = 1;');
    expect(/<html[^>]*data-injected/.test(dom), 'the injected script ran').toBe(false);
    expect(/<script/i.test(dom), 'a script element in the page').toBe(false);
    // 2. Even with scripts allowed in the page, the escaped cell does not run: the global is undefined.
    const probe =
      "document.getElementById('probe').textContent = JSON.stringify(typeof window.__bandwrightInjected);";
    writeFileSync(at('escaped.html'), withProbe(html, probe));
    expect(probeOf(dumpDom(browser, at('escaped.html')))).toBe('undefined');
    // 3. Control: the same cell left unescaped would run, so the check above can fail.
    const escaped =
      '&lt;script&gt;window.__bandwrightInjected = 1; document.documentElement.setAttribute(&quot;data-injected&quot;, &quot;1&quot;)&lt;/script&gt;';
    expect(html).toContain(escaped);
    writeFileSync(at('unescaped.html'), withProbe(html.replace(escaped, INJECTED), probe));
    const unescaped = dumpDom(browser, at('unescaped.html'));
    expect(probeOf(unescaped)).toBe('number');
    expect(/<html[^>]*data-injected="1"/.test(unescaped), 'the control script ran').toBe(true);
  });
});
