import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { runCli, EXIT, type CliIo } from '@motorprint/cli';

const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '../../../..');

function capture(cwd = repoRoot, env: Record<string, string | undefined> = {}) {
  const out: string[] = [];
  const err: string[] = [];
  const io: CliIo = { stdout: (t) => out.push(t), stderr: (t) => err.push(t), cwd, env, isTty: true };
  return { io, stdout: () => out.join(''), stderr: () => err.join('') };
}

describe('motorprint (overall)', () => {
  it('prints the overall help with the cautions and exits 0 on --help', async () => {
    const c = capture();
    expect(await runCli(['--help'], c.io)).toBe(EXIT.ok);
    expect(c.stdout()).toContain('inspect');
    expect(c.stdout()).toContain('simulate');
    expect(c.stdout()).toMatch(/Locked-rotor tests heat the winding fast/);
    expect(c.stdout()).toMatch(/local electrical codes/);
  });
  it('exits 2 with the list of subcommands on an unknown subcommand', async () => {
    const c = capture();
    expect(await runCli(['fitt'], c.io)).toBe(EXIT.usage);
    expect(c.stderr()).toMatch(/unknown subcommand "fitt"/);
  });
  it('shows every subcommand help with the cautions', async () => {
    for (const sub of ['inspect', 'simulate']) {
      const c = capture();
      expect(await runCli([sub, '--help'], c.io)).toBe(EXIT.ok);
      expect(c.stdout()).toContain(`motorprint ${sub}`);
      expect(c.stdout()).toMatch(/guards/);
    }
  });
  it('uses no colour when NO_COLOR is set, even on a terminal', async () => {
    const plain = capture(repoRoot, { NO_COLOR: '1' });
    await runCli(['inspect', 'fixtures/demo/tern24-step-logger.csv'], plain.io);
    expect(plain.stdout()).not.toMatch(/\u001b\[/);
    const coloured = capture(repoRoot, {});
    await runCli(['inspect', 'fixtures/demo/tern24-step-logger.csv'], coloured.io);
    expect(coloured.stdout()).toMatch(/\u001b\[/);
  });
});

describe('motorprint inspect', () => {
  it('reads the invented logger-dialect demo file and lists its dropped row with line and column', async () => {
    const c = capture(repoRoot, { NO_COLOR: '1' });
    expect(await runCli(['inspect', 'fixtures/demo/tern24-step-logger.csv'], c.io)).toBe(EXIT.ok);
    const text = c.stdout();
    expect(text).toMatch(/semicolon-separated, decimal comma, CRLF/);
    // Line 1204 is the garbled row written by fixtures/to-logger-dialect.mjs (data row k = 1200,
    // after 2 comment lines and the header: 1200 + 3 + 1).
    expect(text).toMatch(/line 1204, column "I_arm \(mA\)": non-numeric/);
    expect(text).toMatch(/1 dropped/);
  });
  it('prints one JSON document with --json, with SI summaries that match the file', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-inspect-'));
    // Invented three-row file: time in ms, current in mA, speed in rpm.
    writeFileSync(join(dir, 'a.csv'), 'time [ms],voltage [V],current [mA],speed [rpm]\n0,0,0,0\n1,12,500,60\n2,12,1000,120\n');
    const c = capture(dir);
    expect(await runCli(['inspect', 'a.csv', '--json'], c.io)).toBe(EXIT.ok);
    const doc = JSON.parse(c.stdout());
    const d = doc.files[0];
    expect(d.rows.read).toBe(3);
    // 1000 mA = 1 A; 120 rpm = 120·2π/60 = 4π rad/s (FACTS.md §2, r/min → rad/s = 2π/60).
    expectClose(d.channels.current.max, 1, { rel: 1e-15 }, 'current max [A]');
    expectClose(d.channels.speed.max, 4 * Math.PI, { rel: 1e-15 }, 'speed max [rad/s]');
    expectClose(d.timeSpan.duration, 2e-3, { rel: 1e-12 }, 'duration [s]');
  });
  it('applies --map and --unit to a header it cannot read by itself', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-inspect-'));
    // Invented file with bare names.
    writeFileSync(join(dir, 'b.csv'), 't,u,ia,n\n0,0,0,0\n0.001,12,500,60\n0.002,12,1000,120\n');
    const c = capture(dir);
    const code = await runCli(
      ['inspect', 'b.csv', '--json', '--map', 'time=t', '--map', 'voltage=u', '--map', 'current=ia', '--map', 'speed=n', '--unit', 'ia=mA', '--unit', 'n=rpm', '--unit', 'u=V', '--unit', 't=s'],
      c.io,
    );
    expect(code).toBe(EXIT.ok);
    const d = JSON.parse(c.stdout()).files[0];
    expectClose(d.channels.current.max, 1, { rel: 1e-15 }, 'current max [A]');
    expectClose(d.channels.speed.max, 4 * Math.PI, { rel: 1e-15 }, 'speed max [rad/s]');
  });
  it('exits 1 and names file, line and column when time steps back', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-inspect-'));
    writeFileSync(join(dir, 'back.csv'), 'time [s],voltage [V]\n0,1\n0.002,1\n0.001,1\n0.003,1\n');
    const c = capture(dir);
    expect(await runCli(['inspect', 'back.csv'], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toMatch(/back\.csv/);
    expect(c.stderr()).toMatch(/line 4/);
  });
  it('exits 1 for a missing file and 2 for a bad option', async () => {
    const c = capture();
    expect(await runCli(['inspect', 'no/such/file.csv'], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toMatch(/no\/such\/file\.csv/);
    const d = capture();
    expect(await runCli(['inspect', 'x.csv', '--map', 'flux=x'], d.io)).toBe(EXIT.usage);
    expect(d.stderr()).toMatch(/unknown role "flux"/);
    const e = capture();
    expect(await runCli(['inspect', '--bogus'], e.io)).toBe(EXIT.usage);
  });
});

describe('motorprint simulate', () => {
  it('writes an invented, labelled recording and a truth sidecar that round-trips through inspect', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-sim-'));
    // Constants of the FACTS.md §5 worked example (R 2 Ω, L 1 mH, K 0.05, J 2e-5, b 1e-5).
    writeFileSync(join(dir, 'p.json'), JSON.stringify({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }));
    const c = capture(dir);
    const code = await runCli(['simulate', 'p.json', '--experiment', 'step', '--volts', '12', '--sample-rate', '10000', '--duration', '0.1', '--out', 'step.csv'], c.io);
    expect(code).toBe(EXIT.ok);
    const csv = readFileSync(join(dir, 'step.csv'), 'utf8');
    expect(csv.startsWith('# INVENTED recording')).toBe(true);
    const truth = JSON.parse(readFileSync(join(dir, 'step.truth.json'), 'utf8'));
    expect(truth.params.R).toBe(2);
    expect(truth.experiment).toBe('step');
    const i = capture(dir);
    expect(await runCli(['inspect', 'step.csv', '--json'], i.io)).toBe(EXIT.ok);
    const d = JSON.parse(i.stdout()).files[0];
    expect(d.rows.dropped).toBe(0);
    expect(d.kind.kind).toBe('step');
    // Clean trajectory: the final speed approaches ω_ss = 238.095… rad/s (FACTS.md §5) within the
    // record; after 0.1 s the table gives 237.7286089 rad/s (step at 10 % of the record shifts it).
    expect(d.channels.speed.max).toBeGreaterThan(230);
    expect(d.channels.speed.max).toBeLessThan(238.1);
  });
  it('accepts a fit-style parameter set ({"parameters": {"R": {"value": …}}})', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-sim-'));
    const set = { parameters: { R: { value: 2, unit: 'Ω' }, L: { value: 1e-3, unit: 'H' }, Kt: { value: 0.05, unit: 'N·m/A' }, Ke: { value: 0.05, unit: 'V·s/rad' }, J: { value: 2e-5, unit: 'kg·m²' }, b: { value: 1e-5, unit: 'N·m·s/rad' } } };
    writeFileSync(join(dir, 'set.json'), JSON.stringify(set));
    const c = capture(dir);
    expect(await runCli(['simulate', 'set.json', '--experiment', 'locked-rotor', '--out', 'lr.csv'], c.io)).toBe(EXIT.ok);
  });
  it('rejects a missing constant, an unknown constant and an unknown experiment with clear messages', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-sim-'));
    writeFileSync(join(dir, 'short.json'), JSON.stringify({ R: 2, L: 1e-3, Kt: 0.05, J: 2e-5 }));
    writeFileSync(join(dir, 'odd.json'), JSON.stringify({ R: 2, L: 1e-3, Kt: 0.05, J: 2e-5, b: 0, flux: 3 }));
    const a = capture(dir);
    expect(await runCli(['simulate', 'short.json', '--experiment', 'step', '--out', 'x.csv'], a.io)).toBe(EXIT.dataProblem);
    expect(a.stderr()).toMatch(/short\.json: missing constant "b"/);
    const b = capture(dir);
    expect(await runCli(['simulate', 'odd.json', '--experiment', 'step', '--out', 'x.csv'], b.io)).toBe(EXIT.dataProblem);
    expect(b.stderr()).toMatch(/unknown constant "flux"/);
    const k = capture(dir);
    expect(await runCli(['simulate', 'short.json', '--experiment', 'spin', '--out', 'x.csv'], k.io)).toBe(EXIT.usage);
    expect(k.stderr()).toMatch(/--experiment must be one of/);
  });
});
