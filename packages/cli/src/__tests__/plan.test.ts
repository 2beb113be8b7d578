import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli, EXIT, type CliIo } from '@motorprint/cli';

function capture(cwd: string) {
  const out: string[] = [];
  const err: string[] = [];
  const io: CliIo = { stdout: (t) => out.push(t), stderr: (t) => err.push(t), cwd, env: { NO_COLOR: '1' }, isTty: false };
  return { io, stdout: () => out.join(''), stderr: () => err.join('') };
}

const ROOT = resolve(__dirname, '../../../..');
const DEMO = join(ROOT, 'fixtures/demo');
// The demo runs as fixtures/make-demo.sh records them (invented motor fixtures/tern24.params.json).
const DEMO_RUNS = [
  'locked-rotor,levels=0/6,rate=50k', 'step,levels=0/24,rate=10k,duration=0.5',
  'coast-down,levels=24,rate=5k,duration=2', 'steady-state,levels=4.8/9.6/14.4/19.2/24,rate=2k,duration=0.25',
];
const DEMO_NOISE = 'voltage=0.05,current=0.02,speed=0.3'; // make-demo.sh
let dir = '';

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'mp-plan-'));
  // A 2 s locked-rotor hold at 6 V on the demo motor (invented): over the conservative budget.
  const c = capture(dir);
  const code = await runCli(['simulate', join(ROOT, 'fixtures/tern24.params.json'), '--experiment', 'locked-rotor', '--volts', '6', '--sample-rate', '2000',
    '--duration', '2.2', '--noise-voltage', '0.05', '--noise-current', '0.02', '--seed', '21', '--out', 'long-hold.csv'], c.io);
  expect(code, c.stderr()).toBe(EXIT.ok);
});

describe('motorprint plan', () => {
  it('predicts the SEs that fit reports on the demo recordings (R, L, K within 10 %)', async () => {
    const p = capture(dir);
    const args = ['plan', join(ROOT, 'fixtures/tern24.params.json'), '--noise', DEMO_NOISE, '--no-suggest', '--json', ...DEMO_RUNS.flatMap((r) => ['--run', r])];
    expect(await runCli(args, p.io), p.stderr()).toBe(EXIT.ok);
    const plan = JSON.parse(p.stdout());
    const f = capture(dir);
    const files = ['locked-rotor', 'step', 'coast-down', 'steady-state'].map((k) => join(DEMO, `tern24-${k}.csv`));
    expect(await runCli(['fit', ...files, '--model', 'lumped', '--no-tuning', '--json'], f.io), f.stderr()).toBe(EXIT.ok);
    const fit = JSON.parse(f.stdout());
    for (const [c, fitted] of [['R', 'R'], ['L', 'L'], ['K', 'Kt']] as const) {
      const predicted = plan.constants.find((x: { name: string }) => x.name === c).standardError as number;
      const reported = fit.parameters[fitted].standardError as number;
      expect(Math.abs(predicted / reported - 1), `${c}: plan ${predicted} vs fit ${reported}`).toBeLessThan(0.1);
    }
  }, 120_000);
  it('prints the table with shares, the time constants and the locked-rotor budget with its assumption', async () => {
    const p = capture(dir);
    const code = await runCli(['plan', '--guess', 'R=1.9', '--guess', 'L=0.00062', '--guess', 'K=0.052', '--guess', 'J=1.1e-5', '--guess', 'b=4e-6',
      '--noise', DEMO_NOISE, '--target', '1%', '--run', 'locked-rotor,levels=0/6,rate=50k', '--run', 'step,levels=0/24,rate=2k,duration=0.3'], p.io);
    expect(code, p.stderr()).toBe(EXIT.ok);
    const out = p.stdout();
    expect(out).toMatch(/Predicted standard errors \(target 1\.0 %\)/);
    expect(out).toMatch(/^R\s+1\.9\s+Ω/m);
    expect(out).toMatch(/locked-rotor 1: hold [\d.]+ ms at 3\.16 A; budget [\d.]+ s for a 20 K rise \(conservative default/);
    expect(out).toMatch(/To reach the target\n\s+.*→.*b .* → /);
  }, 120_000);
  it('rejects usage mistakes with exit 2, naming the option', async () => {
    for (const [args, pattern] of [
      [['plan', '--guess', 'R=1', '--run', 'step'], /the draft lacks L, Kt, Ke, J, b/],
      [['plan', join(ROOT, 'fixtures/tern24.params.json'), '--run', 'spin'], /--run 1 \("spin"\): the kind must come first/],
      [['plan', join(ROOT, 'fixtures/tern24.params.json'), '--run', 'step,wobble=3'], /unknown key "wobble"/],
      [['plan', join(ROOT, 'fixtures/tern24.params.json'), '--run', 'step', '--target', '150%'], /--target must be/],
      [['plan', join(ROOT, 'fixtures/tern24.params.json')], /at least one planned run/],
    ] as const) {
      const c = capture(dir);
      expect(await runCli([...args], c.io), args.join(' ')).toBe(EXIT.usage);
      expect(c.stderr()).toMatch(pattern);
    }
  });
  it('exits 1 with the CLI names when a run is unusable', async () => {
    const c = capture(dir);
    expect(await runCli(['plan', join(ROOT, 'fixtures/tern24.params.json'), '--run', 'step'], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toMatch(/--run 1: give the noise or resolution of the current or speed \(noise-current, noise-speed, step-current, step-speed or counts\)/);
    expect(c.stderr()).not.toMatch(/runs\[/);
  });

  it('says "file not found" for a missing draft, not the raw file-system code', async () => {
    const c = capture(dir);
    expect(await runCli(['plan', 'no-such-draft.json', '--run', 'step,noise-current=0.02'], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toMatch(/file not found: no-such-draft\.json \(the draft parameter set\)/);
    expect(c.stderr()).not.toMatch(/ENOENT/);
  });
});

describe('motorprint fit: locked-rotor budget and tuning; show --export', () => {
  it('warns about a hold over the budget, lists it as a finding, and adds the tuning (unless --no-tuning)', async () => {
    const c = capture(dir);
    expect(await runCli(['fit', 'long-hold.csv', '--kind', 'long-hold.csv=locked-rotor', '--json', '--out', 'hold.params.json'], c.io), c.stderr()).toBe(EXIT.ok);
    expect(c.stderr()).toMatch(/warning: long-hold\.csv held the stalled winding 1\.9\d s, longer than the [\d.]+ s budget for a 20 K rise \(conservative default/);
    expect(c.stderr()).toMatch(/local codes/);
    const doc = JSON.parse(c.stdout());
    expect(doc.findings.map((f: { code: string }) => f.code)).toContain('locked-rotor-hold-over-budget');
    expect(doc.tuning.settings.currentBandwidthHz).toEqual({ value: 1000, source: 'default' });
    expect(doc.tuning.currentLoop.Kp.value).toBeCloseTo(doc.parameters.L.value * 2 * Math.PI * 1000, 10);
    const quiet = capture(dir);
    expect(await runCli(['fit', 'long-hold.csv', '--kind', 'long-hold.csv=locked-rotor', '--json', '--no-tuning', '--thermal', 'Rth=2,Cth=400', '--rise', '40'], quiet.io)).toBe(EXIT.ok);
    expect(JSON.parse(quiet.stdout()).tuning).toBeUndefined();
    expect(quiet.stderr()).not.toMatch(/budget/);
    const bad = capture(dir);
    expect(await runCli(['fit', 'long-hold.csv', '--thermal', 'Rth=-1'], bad.io)).toBe(EXIT.usage);
    expect(bad.stderr()).toMatch(/--thermal Rth= must be a number > 0/);
  }, 120_000);
  it('show --export writes the state-space, transfer and discrete forms as JSON', async () => {
    const c = capture(dir);
    const files = ['locked-rotor', 'step'].map((k) => join(DEMO, `tern24-${k}.csv`));
    expect(await runCli(['fit', ...files, '--model', 'lumped', '--out', 'demo.params.json'], c.io), c.stderr()).toBe(EXIT.ok);
    const ss = capture(dir);
    expect(await runCli(['show', 'demo.params.json', '--export', 'state-space'], ss.io), ss.stderr()).toBe(EXIT.ok);
    const doc = JSON.parse(ss.stdout());
    expect(doc.stateSpace.A[0][0]).toBeCloseTo(-doc.constants.R / doc.constants.L, 6);
    const tf = capture(dir);
    expect(await runCli(['show', 'demo.params.json', '--export', 'transfer'], tf.io)).toBe(EXIT.ok);
    expect(JSON.parse(tf.stdout()).transfer.voltageToSpeed.denominator[0]).toBe(1);
    const dz = capture(dir);
    expect(await runCli(['show', 'demo.params.json', '--export', 'discrete', '--dt', '1e-4'], dz.io)).toBe(EXIT.ok);
    expect(JSON.parse(dz.stdout()).discrete.dt).toBe(1e-4);
    const miss = capture(dir);
    expect(await runCli(['show', 'demo.params.json', '--export', 'discrete'], miss.io)).toBe(EXIT.usage);
    expect(miss.stderr()).toMatch(/--export discrete needs --dt/);
    const text = capture(dir);
    expect(await runCli(['show', 'demo.params.json'], text.io)).toBe(EXIT.ok);
    expect(text.stdout()).toMatch(/Loop tuning/);
  }, 120_000);
});
