import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium } from 'playwright-core';
import { derivedFigures } from '@motorprint/report';
import { decisionRule } from '../decisionRule.js';
import { fitLot } from '../fitLot.js';
import { judgeLot } from '../judgeLot.js';
import { parseLotSpec } from '../parseLotSpec.js';
import { planMotorFolder } from '../planMotorFolder.js';
import { renderLotReport } from '../renderLotReport.js';
import type { LotJudgement, LotSpec, MotorOutcome } from '../types.js';
import { TERN24, writeInventedLot, type InventedMotor } from './inventedLot.js';

const CHROMIUM = '/usr/bin/chromium';
const SKIP_REASON = `lot report browser check skipped: ${CHROMIUM} not found (install Debian's chromium package)`;

// A small INVENTED lot in the demo scenario: two motors inside the spec, two clearly out of it
// (R +16 % — its stall torque Kt·V/R = 0.567 N·m falls below 0.6 N·m too —, J above its maximum), one whose step run is garbled, one that declares its runs.
const MOTORS: InventedMotor[] = [
  { serial: 'T24-7001', ...TERN24 },
  { serial: 'T24-7002', ...TERN24, R: 2.2 },
  { serial: 'T24-7003', ...TERN24, J: 1.5e-5 },
  { serial: 'T24-7004', ...TERN24 },
  { serial: 'T24-7005', ...TERN24, R: 1.86, K: 0.0515 },
];
const SPEC = JSON.stringify({
  name: 'Tern 24 (invented)', ratedVoltage: 24,
  limits: { R: { nominal: 1.9, tolerancePercent: 5 }, Kt: { nominal: 0.052, tolerancePercent: 4 }, J: { min: 9.5e-6, max: 1.25e-5 }, stallTorque: { min: 0.6, max: 0.75 } },
});

/** Verdict the true constants call for: pass when every true value lies strictly inside its limits. */
function truthVerdict(spec: LotSpec, m: InventedMotor): 'pass' | 'fail' {
  const c = { R: m.R, L: m.L, Kt: m.K, Ke: m.K, J: m.J, b: m.b, Tc: 0 };
  const figures = derivedFigures(c, spec.ratedVoltage);
  const inside = spec.limits.every((l) => {
    const x = l.key in c ? c[l.key as keyof typeof c] : figures[l.key]!.value!;
    return (l.lower === null || x > l.lower) && (l.upper === null || x < l.upper);
  });
  return inside ? 'pass' : 'fail';
}

const dir = mkdtempSync(join(tmpdir(), 'motorprint-lot-'));
let spec: LotSpec;
let outcomes: MotorOutcome[];
let judgement: LotJudgement;
const progress: string[] = [];

beforeAll(async () => {
  writeInventedLot(dir, MOTORS, 700);
  writeFileSync(join(dir, 'T24-7004', 'step.csv'), 'garbled export\n\u0001\u0002\n');
  writeFileSync(join(dir, 'T24-7005', 'runs.csv'), 'file,kind\nlocked-rotor.csv,locked-rotor\nstep.csv,step\n');
  spec = parseLotSpec(SPEC, 'spec.json');
  const plans = readdirSync(dir).sort().map((serial) => {
    const folder = join(dir, serial);
    const entries = readdirSync(folder, { withFileTypes: true }).map((e) => ({ name: e.name, isFile: e.isFile() }));
    const table = existsSync(join(folder, 'runs.csv')) ? 'file,kind\nlocked-rotor.csv,locked-rotor\nstep.csv,step\n' : null;
    return planMotorFolder(serial, folder, entries, table);
  });
  outcomes = await fitLot(plans, {
    jobs: 2, ratedVoltage: spec.ratedVoltage, tool: { name: 'motorprint', version: 'test' }, date: '2025-03-01T10:00:00Z',
    onProgress: (done, total, o) => progress.push(`${done}/${total} ${o.serial}`),
  });
  judgement = judgeLot(spec, outcomes);
}, 120_000); // fitting a lot takes seconds: more than the default hook timeout

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('fitLot on an invented lot', () => {
  it('fits on two worker threads when asked for two jobs, and reports progress once per motor', () => {
    const threads = new Set(outcomes.filter((o) => o.status === 'fitted').map((o) => o.threadId));
    expect(threads.size).toBe(2);
    expect([...threads].every((t) => t > 0)).toBe(true); // 0 is the main thread
    expect(progress).toHaveLength(MOTORS.length);
    expect(progress.at(-1)).toMatch(/^5\/5 /);
  });

  it('gives every motor the verdict its true constants call for, and an error with the file for the garbled one', () => {
    for (const m of judgement.motors) {
      const truth = MOTORS.find((x) => x.serial === m.serial)!;
      if (m.serial === 'T24-7004') {
        expect(m.verdict).toBe('error');
        expect(m.reason).toContain('T24-7004/step.csv');
        continue;
      }
      expect(m.verdict, `${m.serial}: ${m.reason}`).toBe(truthVerdict(spec, truth));
    }
    expect(judgement.motors.find((m) => m.serial === 'T24-7002')!.reason).toBe('out of spec: R, stallTorque');
    expect(judgement.motors.find((m) => m.serial === 'T24-7003')!.reason).toBe('out of spec: J');
    // derived here from MOTORS: 7001 and 7005 inside every limit, 7002 and 7003 out, 7004 garbled
    expect(judgement.counts).toEqual({ pass: 2, fail: 2, undecided: 0, error: 1 });
    const declared = outcomes.find((o) => o.serial === 'T24-7005')!;
    expect(declared.inputs.map((i) => [i.kind, i.kindSource])).toEqual([['locked-rotor', 'declared'], ['step', 'declared']]);
    expect(outcomes.find((o) => o.serial === 'T24-7001')!.inputs.map((i) => i.kindSource)).toEqual(['guessed', 'guessed']);
    // Each true value lies inside its fitted 95 % interval for the fitted motors (R, Kt, J).
    for (const o of outcomes.filter((x) => x.status === 'fitted')) {
      const t = MOTORS.find((x) => x.serial === o.serial)!;
      for (const [key, truth] of [['R', t.R], ['Kt', t.K], ['J', t.J]] as const) {
        const ci = o.values[key]!.ci95!;
        expect(truth >= ci[0] && truth <= ci[1], `${o.serial} ${key}: ${truth} in [${ci[0]}, ${ci[1]}]`).toBe(true);
      }
    }
  });

  it('refuses a job count that is not a whole number ≥ 1', async () => {
    await expect(fitLot([], { jobs: 0, ratedVoltage: null, tool: { name: 'x', version: '0' }, date: 'd' })).rejects.toThrow(RangeError);
  });

  it('renders a self-contained lot report that opens in headless Chromium with one plot per key and a marker per fitted motor', async (ctx) => {
    const html = renderLotReport({
      lotFolder: dir, spec, specFile: 'spec.json', rule: decisionRule(), judgement, tool: { name: 'motorprint', version: 'test' },
      date: '2025-03-01T10:00:00Z', cautions: ['Invented caution one.', 'Invented caution two.'],
    });
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).not.toMatch(/<script|<link|<img|@import|url\(|https?:\/\/(?!www\.w3\.org\/2000\/svg)/);
    for (const section of ['Decision rule', 'Verdicts', 'Distribution of each checked key', 'Lot statistics and capability', 'Motors that could not be fitted', 'Cautions', 'Inputs']) {
      expect(html).toContain(`<h2>${section}</h2>`);
    }
    expect(html).toContain('JCGM 106:2012');
    expect(html).toContain('Invented caution two.');
    if (!existsSync(CHROMIUM)) { console.warn(SKIP_REASON); ctx.skip(); return; }
    writeFileSync(join(dir, 'lot.html'), html);
    const context = await chromium.launchPersistentContext(join(dir, 'profile'), {
      executablePath: CHROMIUM, headless: true, viewport: { width: 1200, height: 1400 },
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
    });
    try {
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
      await page.goto(`file://${join(dir, 'lot.html')}`, { waitUntil: 'load' });
      // Browser-side code as text: the workspace compiles without the DOM library.
      const svgs = await page.evaluate<{ width: number; marks: number; fails: number; limits: number }[]>(`Array.from(document.querySelectorAll('svg.lot-distribution')).map((s) => ({
        width: s.getBoundingClientRect().width,
        marks: s.querySelectorAll('.mark').length - 3,
        fails: s.querySelectorAll('path.mark.fail').length - 1,
        limits: s.querySelectorAll('line.limit').length,
      }))`);
      expect(svgs).toHaveLength(spec.limits.length);
      for (const [i, s] of svgs.entries()) {
        expect(s.marks, `plot ${i}: one marker per fitted motor (the legend's three left out)`).toBe(4);
        expect(s.width, `plot ${i} is laid out`).toBeGreaterThan(300); // px; the plots are drawn 860 px wide (derived here)
      }
      expect(svgs.map((s) => s.limits)).toEqual([2, 2, 2, 2]);
      expect(svgs.map((s) => s.fails)).toEqual([1, 0, 1, 1]); // R and stallTorque of T24-7002, J of T24-7003
      const rows = await page.evaluate<number>(`document.querySelectorAll('table.verdicts tbody tr').length`);
      expect(rows).toBe(MOTORS.length);
      const png = await page.screenshot({ fullPage: true, type: 'png' });
      expect(png.length).toBeGreaterThan(20_000); // a blank page is a few kB (common practice, no source)
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
