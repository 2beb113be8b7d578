import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { diagnoseFit } from '@motorprint/diagnose';
import { fitMotor } from '@motorprint/estimate';
import type { MotorFit, MotorRecordingInput } from '@motorprint/estimate';
import { generateRecording } from '@motorprint/model';
import type { ExperimentKind } from '@motorprint/model';
import { chromium } from 'playwright-core';
import type { BrowserContext } from 'playwright-core';
import { buildParameterSet } from '../buildParameterSet.js';
import { renderHtmlReport } from '../renderHtmlReport.js';
import type { DiagnosisLike } from '../types.js';
import { INVENTED_PROVENANCE } from './inventedFit.js';

const CHROMIUM = '/usr/bin/chromium';
const hasChromium = existsSync(CHROMIUM);
const SKIP_REASON = `HTML report browser checks skipped: ${CHROMIUM} not found (install Debian's chromium package)`;
if (!hasChromium) console.warn(SKIP_REASON);

// Invented motor: the FACTS.md §5 constants plus Coulomb friction 4e-3 N·m (invented here), fitted
// with viscous friction only so that the diagnosis has findings to show.
const MOTOR = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 4e-3 };
function invented(kind: ExperimentKind, seed: number): MotorRecordingInput['recording'] {
  // Noise: 0.05 V, 0.2 % of stall current, 0.2 % of no-load speed (common practice, no source).
  const g = generateRecording(MOTOR, kind, { seed, noise: { voltage: 0.05, current: 0.012, speed: 0.48 } });
  const channels: Record<string, Float64Array> = {};
  for (const c of g.columns.slice(1)) channels[c.name] = c.values;
  return { time: g.columns[0]!.values, channels };
}

let html = '';
let dir = '';
let context: BrowserContext | null = null;
let fit: MotorFit;

beforeAll(async () => {
  const inputs: MotorRecordingInput[] = [
    { recording: invented('step', 21), kind: 'step', name: 'free-run step (invented)' },
    { recording: invented('steady-state', 23), kind: 'steady-state', name: 'voltage sweep (invented)' },
    { recording: invented('locked-rotor', 22), kind: 'locked-rotor', name: 'locked rotor (invented)' },
  ];
  fit = fitMotor(inputs, { coulomb: false });
  // The real diagnosis must fit the report's structural interface (checked by the compiler here).
  const diagnosis: DiagnosisLike = diagnoseFit(fit, inputs);
  const set = buildParameterSet(fit, {
    recordings: inputs.map((i) => i.recording), diagnosis, windingTemperature: 31.5,
    identification: { motor: 'invented 12 V test motor', serial: 'INV-0042', bench: 'invented bench', operator: 'invented', 'test date': '2025-03-01' },
    provenance: INVENTED_PROVENANCE,
  });
  html = renderHtmlReport({ parameterSet: set, fit, recordings: inputs.map((i) => i.recording), diagnosis, title: 'DC motor parameter report — invented test motor' });
  dir = mkdtempSync(join(tmpdir(), 'motorprint-report-'));
  writeFileSync(join(dir, 'report.html'), html);
  if (hasChromium) {
    context = await chromium.launchPersistentContext(join(dir, 'profile'), {
      executablePath: CHROMIUM, headless: true, viewport: { width: 1100, height: 1400 },
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
    });
  }
});

afterAll(async () => {
  await context?.close();
  if (dir !== '' && process.env.MOTORPRINT_KEEP_REPORT === undefined) rmSync(dir, { recursive: true, force: true });
});

describe('renderHtmlReport', () => {
  it('writes a self-contained document: no scripts, no external links, fonts or images', () => {
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).not.toMatch(/<script|<link|<img|@import|url\(|https?:\/\/(?!www\.w3\.org\/2000\/svg)/);
    for (const section of ['Constants', 'Derived figures', 'Operating curves', 'Recordings: measured and fitted', 'Findings', 'Cautions', 'Provenance']) {
      expect(html).toContain(`<h2>${section}</h2>`);
    }
    expect(html).toContain('Coulomb friction'); // the diagnosis finding of the invented friction
    expect(html).toContain('INV-0042');
    expect(html).toContain('@media print');
  });

  it('opens in headless Chromium without console errors or network requests, and every SVG draws data', async (ctx) => {
    if (context === null) { console.warn(SKIP_REASON); ctx.skip(); return; }
    const page = await context.newPage();
    const problems: string[] = [];
    page.on('console', (m) => { if (m.type() === 'error' || m.type() === 'warning') problems.push(`console ${m.type()}: ${m.text()}`); });
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    await page.route('**/*', (route) => {
      const url = route.request().url();
      if (url.startsWith('file://')) return route.continue();
      problems.push(`network request: ${url}`);
      return route.abort();
    });
    await page.goto(`file://${join(dir, 'report.html')}`, { waitUntil: 'load' });
    // Browser-side code as text: the workspace compiles without the DOM library.
    const svgs = await page.evaluate<{ width: number; drawn: number }[]>(`Array.from(document.querySelectorAll('svg')).map((s) => ({
      width: s.getBoundingClientRect().width,
      drawn: Array.from(s.querySelectorAll('path.series, polyline'))
        .filter((p) => (p.getAttribute('d') ?? p.getAttribute('points') ?? '').length > 20).length,
    }))`);
    // 3 recordings: step (current, speed), sweep (current, speed), locked rotor (current): 5 channels × 3 plots, + 2 curves.
    expect(svgs.length).toBe(17);
    for (const [i, s] of svgs.entries()) {
      expect(s.drawn, `svg ${i} has data paths`).toBeGreaterThan(0);
      expect(s.width, `svg ${i} is laid out`).toBeGreaterThan(200);
    }
    expect(problems).toEqual([]);
    await page.close();
  });

  it('renders to a non-trivial screenshot (PNG > 20 kB, many colours)', async (ctx) => {
    if (context === null) { console.warn(SKIP_REASON); ctx.skip(); return; }
    const page = await context.newPage();
    await page.goto(`file://${join(dir, 'report.html')}`, { waitUntil: 'load' });
    const png = await page.screenshot({ fullPage: true, type: 'png' });
    writeFileSync(join(dir, 'report.png'), png);
    expect(png.length).toBeGreaterThan(20_000);
    // Decode the PNG in the browser and count distinct colours of a sample of pixels.
    const stats = await page.evaluate<{ width: number; height: number; colours: number; dark: number }>(`(async () => {
      const img = new Image();
      img.src = 'data:image/png;base64,${png.toString('base64')}';
      await img.decode();
      const c = document.createElement('canvas');
      c.width = img.width; c.height = img.height;
      const g = c.getContext('2d');
      g.drawImage(img, 0, 0);
      const d = g.getImageData(0, 0, c.width, c.height).data;
      const colours = new Set();
      let dark = 0;
      for (let k = 0; k < d.length; k += 4 * 7) {
        colours.add((d[k] << 16) | (d[k + 1] << 8) | d[k + 2]);
        if (d[k] + d[k + 1] + d[k + 2] < 200) dark++;
      }
      return { width: c.width, height: c.height, colours: colours.size, dark };
    })()`);
    expect(stats.width).toBe(1100);
    expect(stats.height).toBeGreaterThan(3000); // a long page: tables, 17 plots, findings
    expect(stats.colours).toBeGreaterThan(50);
    expect(stats.dark).toBeGreaterThan(1000); // text and lines were drawn
    await page.close();
  });

  it('prints: the print stylesheet applies and Chromium makes a multi-page A4 PDF', async (ctx) => {
    if (context === null) { console.warn(SKIP_REASON); ctx.skip(); return; }
    const page = await context.newPage();
    await page.goto(`file://${join(dir, 'report.html')}`, { waitUntil: 'load' });
    await page.emulateMedia({ media: 'print' });
    // The print rules drop the page padding of <main> (screen: 24px 28px 48px).
    expect(await page.evaluate<string>(`getComputedStyle(document.querySelector('main')).paddingLeft`)).toBe('0px');
    const pdf = await page.pdf({ preferCSSPageSize: true, printBackground: true });
    writeFileSync(join(dir, 'report.pdf'), pdf);
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
    expect(pages).toBeGreaterThan(3);
    await page.close();
  });
});
