import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli, EXIT, type CliIo } from '@motorprint/cli';

function capture(cwd: string) {
  const out: string[] = [];
  const err: string[] = [];
  const io: CliIo = { stdout: (t) => out.push(t), stderr: (t) => err.push(t), cwd, env: { NO_COLOR: '1' }, isTty: false };
  return { io, stdout: () => out.join(''), stderr: () => err.join('') };
}

// Constants of the FACTS.md §5 worked example (R 2 Ω, L 1 mH, Kt = Ke 0.05, J 2e-5 kg·m², b 1e-5).
const TRUE = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };
let dir = '';

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'mp-fit-'));
  writeFileSync(join(dir, 'motor.json'), JSON.stringify(TRUE));
  // Invented recordings with noise on every channel (σ: 20 mV, 10 mA, 0.2 rad/s).
  const noise = ['--noise-voltage', '0.02', '--noise-current', '0.01', '--noise-speed', '0.2'];
  for (const [kind, seed, extra] of [
    ['locked-rotor', '3', ['--sample-rate', '50000']],
    ['step', '4', ['--sample-rate', '10000', '--duration', '0.12']],
  ] as const) {
    const c = capture(dir);
    const code = await runCli(['simulate', 'motor.json', '--experiment', kind, '--volts', '12', '--seed', seed, ...extra, ...noise, '--out', `${kind}.csv`], c.io);
    expect(code, c.stderr()).toBe(EXIT.ok);
  }
});

describe('motorprint fit', () => {
  it('fits a locked-rotor and a step run jointly; every true constant lies within 3 standard errors', async () => {
    const c = capture(dir);
    const code = await runCli(['fit', 'locked-rotor.csv', 'step.csv', '--kind', 'locked-rotor.csv=locked-rotor', '--json'], c.io);
    expect(code, c.stderr()).toBe(EXIT.ok);
    const doc = JSON.parse(c.stdout());
    expect(doc.schema).toBe('motorprint.parameter-set/1');
    expect(doc.fit.converged).toBe(true);
    for (const name of ['R', 'L', 'Kt', 'Ke', 'J', 'b'] as const) {
      const p = doc.parameters[name];
      expect(p.unit.length).toBeGreaterThan(0);
      expect(p.standardError).toBeGreaterThan(0);
      const z = Math.abs(p.value - TRUE[name]) / p.standardError;
      expect(z, `${name}: ${p.value} ± ${p.standardError} vs true ${TRUE[name]}`).toBeLessThan(3);
      expect(p.ci95[0]).toBeLessThan(p.value);
      expect(p.ci95[1]).toBeGreaterThan(p.value);
    }
    expect(doc.fit.recordings[1].kind).toBe('step');
    expect(Array.isArray(doc.findings)).toBe(true);
  });
  it('prints a readable table with intervals and the solver status', async () => {
    const c = capture(dir);
    const code = await runCli(['fit', 'locked-rotor.csv', 'step.csv', '--kind', 'locked-rotor.csv=locked-rotor'], c.io);
    expect(code, c.stderr()).toBe(EXIT.ok);
    expect(c.stdout()).toMatch(/constant\s+value\s+unit\s+std\. error\s+95 % interval/);
    expect(c.stdout()).toMatch(/solver: converged/);
  });
  it('pins a constant with --fix and names what a locked-rotor run alone cannot inform', async () => {
    const c = capture(dir);
    const code = await runCli(['fit', 'locked-rotor.csv', '--kind', 'locked-rotor.csv=locked-rotor', '--fix', 'L=0.001', '--json'], c.io);
    expect(code, c.stderr()).toBe(EXIT.ok);
    const doc = JSON.parse(c.stdout());
    expect(doc.parameters.L).toMatchObject({ value: 0.001, fixed: true, ci95: null });
    // A constant no recording informs is listed with value null and no interval, never as a number.
    expect(doc.parameters.J).toMatchObject({ value: null, ci95: null, identifiable: false });
    expect(doc.notInformed.map((u: { name: string }) => u.name)).toEqual(expect.arrayContaining(['J', 'b']));
  });
  it('rejects usage mistakes with exit 2', async () => {
    const a = capture(dir);
    expect(await runCli(['fit', 'step.csv', '--kind', 'other.csv=step'], a.io)).toBe(EXIT.usage);
    expect(a.stderr()).toMatch(/not among the files/);
    const b = capture(dir);
    expect(await runCli(['fit', 'step.csv', '--fix', 'Q=1'], b.io)).toBe(EXIT.usage);
    expect(b.stderr()).toMatch(/unknown constant "Q"/);
    const k = capture(dir);
    expect(await runCli(['fit', 'step.csv', '--kind', 'step.csv=spin'], k.io)).toBe(EXIT.usage);
    const e = capture(dir);
    expect(await runCli(['fit'], e.io)).toBe(EXIT.usage);
  });
  it('exits 1 naming the file when a recording cannot be read', async () => {
    writeFileSync(join(dir, 'broken.csv'), 'time [s],voltage [V],current [A]\n0,1,1\n0.001,1\n');
    const c = capture(dir);
    expect(await runCli(['fit', 'broken.csv'], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toMatch(/broken\.csv/);
  });
});

describe('motorprint fit --out / --report and motorprint show', () => {
  it('writes a parameter set that validates on read-back, that show prints and simulate accepts', async () => {
    const c = capture(dir);
    const code = await runCli(
      ['fit', 'locked-rotor.csv', 'step.csv', '--kind', 'locked-rotor.csv=locked-rotor', '--out', 'set/motor.json', '--report', 'set/report.html', '--id', 'motor=bench sample (invented)', '--winding-temp', '75'],
      c.io,
    );
    expect(code, c.stderr()).toBe(EXIT.ok);
    const set = JSON.parse(readFileSync(join(dir, 'set/motor.json'), 'utf8'));
    expect(set.schema).toBe('motorprint.parameter-set/1');
    expect(set.provenance.inputs).toHaveLength(2);
    expect(set.provenance.inputs[0].sha256).toMatch(/^[0-9a-f]{64}$/);
    // Copper law k = 234.5 from 75 °C to 25 °C: factor (234.5 + 25)/(234.5 + 75) = 259.5/309.5 (FACTS.md §3 form).
    expect(set.resistanceAtReference.factor).toBeCloseTo(259.5 / 309.5, 12);
    const html = readFileSync(join(dir, 'set/report.html'), 'utf8');
    expect(html).toMatch(/<svg/);
    expect(html).toMatch(/winding/i);
    const show = capture(dir);
    expect(await runCli(['show', 'set/motor.json'], show.io)).toBe(EXIT.ok);
    expect(show.stdout()).toMatch(/motor: bench sample \(invented\)/);
    expect(show.stdout()).toMatch(/stall torque/);
    const md = capture(dir);
    expect(await runCli(['show', 'set/motor.json', '--format', 'md'], md.io)).toBe(EXIT.ok);
    expect(md.stdout()).toMatch(/\|/);
    const sim = capture(dir);
    expect(await runCli(['simulate', 'set/motor.json', '--experiment', 'step', '--out', 'again.csv'], sim.io)).toBe(EXIT.ok);
  });
  it('show exits 1 on a file that is not a parameter set, naming the path in the document', async () => {
    writeFileSync(join(dir, 'bad-set.json'), JSON.stringify({ schema: 'motorprint.parameter-set/1', parameters: { R: { value: 'x' } } }));
    const c = capture(dir);
    expect(await runCli(['show', 'bad-set.json'], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toMatch(/bad-set\.json: not a motorprint parameter set/);
  });
});

describe('motorprint fit chooses the friction model the data support', () => {
  it('reports the Coulomb model when the comparison supports it, and says so; --coulomb no (or --model lumped) keeps viscous only', async () => {
    const d = mkdtempSync(join(tmpdir(), 'mp-coulomb-'));
    // Invented motor with Coulomb friction Tc = 6 mN·m (about 1 % of its stall torque at 24 V).
    const motor = { R: 1.9, L: 6.2e-4, Kt: 0.052, Ke: 0.052, J: 1.1e-5, b: 4e-6, Tc: 0.006 };
    writeFileSync(join(d, 'm.json'), JSON.stringify(motor));
    const noise = ['--noise-voltage', '0.05', '--noise-current', '0.02', '--noise-speed', '0.3'];
    for (const [kind, extra, seed] of [
      ['locked-rotor', ['--volts', '6', '--sample-rate', '50000'], '4'],
      ['prbs', ['--volts', '24', '--sample-rate', '5000'], '3'],
    ] as const) {
      const c = capture(d);
      expect(await runCli(['simulate', 'm.json', '--experiment', kind, ...extra, ...noise, '--seed', seed, '--out', `${kind}.csv`], c.io), c.stderr()).toBe(EXIT.ok);
    }
    const auto = capture(d);
    expect(await runCli(['fit', 'locked-rotor.csv', 'prbs.csv', '--json'], auto.io), auto.stderr()).toBe(EXIT.ok);
    const doc = JSON.parse(auto.stdout());
    expect(doc.variant.coulomb).toBe(true);
    expect(doc.model.extensions).toContain('coulomb');
    expect(doc.model.candidates.find((c: { added: string | null }) => c.added === 'coulomb')).toMatchObject({ accepted: true });
    for (const name of ['R', 'L', 'Kt', 'J', 'b', 'Tc'] as const) {
      const p = doc.parameters[name];
      const z = Math.abs(p.value - motor[name]) / p.standardError;
      expect(z, `${name}: ${p.value} ± ${p.standardError} vs true ${motor[name]}`).toBeLessThan(3);
    }
    const text = capture(d);
    expect(await runCli(['fit', 'locked-rotor.csv', 'prbs.csv'], text.io)).toBe(EXIT.ok);
    expect(text.stdout()).toMatch(/Model: the data support Coulomb friction/);
    const viscous = capture(d);
    expect(await runCli(['fit', 'locked-rotor.csv', 'prbs.csv', '--json', '--coulomb', 'no'], viscous.io)).toBe(EXIT.ok);
    expect(JSON.parse(viscous.stdout()).variant.coulomb).toBe(false);
    const lumped = capture(d);
    expect(await runCli(['fit', 'locked-rotor.csv', 'prbs.csv', '--json', '--model', 'lumped'], lumped.io)).toBe(EXIT.ok);
    expect(JSON.parse(lumped.stdout()).model.forced).toBe(true);
  });
});
