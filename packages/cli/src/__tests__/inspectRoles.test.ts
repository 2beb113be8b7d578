import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { ingestText } from '@motorprint/ingest';
import { runCli, EXIT, type CliIo } from '@motorprint/cli';
import { experimentKindOf } from '../commands/inspect.js';

// The CSVs here are invented: packages/ingest/fixtures/ (hand-written, see its README) and
// recordings made by `motorprint simulate` in a temporary folder.

const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '../../../..');
const FIXTURES = 'packages/ingest/fixtures';

function capture(cwd = repoRoot) {
  const out: string[] = [];
  const err: string[] = [];
  const io: CliIo = { stdout: (t) => out.push(t), stderr: (t) => err.push(t), cwd, env: { NO_COLOR: '1' }, isTty: false };
  return { io, stdout: () => out.join(''), stderr: () => err.join('') };
}

/** The table row of one column in inspect's output, cells split on runs of two or more spaces. */
function row(text: string, column: string): string[] {
  const line = text.split('\n').find((l) => l.trimStart().startsWith(column));
  expect(line, `row of ${column}`).toBeDefined();
  return line!.trim().split(/\s{2,}/);
}

describe('inspect shows where each unit came from', () => {
  it('a suffix-unit header: deg/s read from the suffix, the command voltage as command', async () => {
    const c = capture();
    expect(await runCli(['inspect', `${FIXTURES}/suffix-units.csv`], c.io)).toBe(EXIT.ok);
    const text = c.stdout();
    expect(text).toMatch(/column\s+role\s+unit read\s+SI unit\s+min\s+max\s+mean/);
    expect(row(text, 'time_ms').slice(0, 4)).toEqual(['time_ms', 'time', 'ms (suffix)', 's']);
    expect(row(text, 'u_cmd_V').slice(0, 4)).toEqual(['u_cmd_V', 'command', 'V (suffix)', 'V']);
    // max 1719 deg/s = 30.0 rad/s (derived here: 1719·π/180), printed to 4 digits.
    expect(row(text, 'motor_speed_deg_s')).toEqual(['motor_speed_deg_s', 'speed', 'deg/s (suffix)', 'rad/s', '0', '30', '12']);
    expect(text).not.toMatch(/assumed/);
  });

  it('a units-row export: the units row and short-name row are named in the dialect line', async () => {
    const c = capture();
    expect(await runCli(['inspect', `${FIXTURES}/units-row.csv`], c.io)).toBe(EXIT.ok);
    const text = c.stdout();
    expect(text).toContain('header on line 2, units row on line 3, short names on line 4');
    expect(row(text, 'Time').slice(0, 4)).toEqual(['Time', 'time', 'ms (units row)', 's']);
    expect(row(text, 'Bus voltage').slice(0, 3)).toEqual(['Bus voltage', 'supply', 'V (units row)']);
  });

  it('a time-less table: layout line instead of sampling, the kind steady-state, SD columns', async () => {
    const c = capture();
    expect(await runCli(['inspect', `${FIXTURES}/steady-table.csv`], c.io)).toBe(EXIT.ok);
    const text = c.stdout();
    expect(text).toContain('experiment kind: steady-state — a table of operating points');
    expect(text).toContain('layout: table of 4 operating points');
    expect(text).not.toMatch(/sampling:|time span:/);
    expect(row(text, 'speed_sd_rpm').slice(0, 4)).toEqual(['speed_sd_rpm', 'sd of speed', 'rpm (suffix)', 'rad/s']);
  });

  it('an assumed unit says so', async () => {
    const c = capture();
    expect(await runCli(['inspect', `${FIXTURES}/supply-and-terminal.csv`], c.io)).toBe(EXIT.ok);
    expect(row(c.stdout(), 'Vbus').slice(0, 3)).toEqual(['Vbus', 'supply', 'V (assumed)']);
  });

  it('--json carries the layout, unit sources and the kind', async () => {
    const c = capture();
    expect(await runCli(['inspect', `${FIXTURES}/steady-table.csv`, `${FIXTURES}/units-row.csv`, '--json'], c.io)).toBe(EXIT.ok);
    const doc = JSON.parse(c.stdout());
    expect(doc.files[0]).toMatchObject({ schema: 'motorprint.inspect/2', layout: 'table', sampling: null, kind: { kind: 'steady-state' } });
    expect(doc.files[1].columns.map((x: { unitSource: string }) => x.unitSource)).toEqual(['units-row', 'units-row', 'units-row', 'units-row', 'units-row']);
  });
});

describe('inspect errors name the command-line flags that fix them', () => {
  it('several motors: the candidates and the --map that picks one motor', async () => {
    const c = capture();
    expect(await runCli(['inspect', `${FIXTURES}/two-motors.csv`], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toContain('(use --map current="1st motor current [A]" --map speed="1st motor velocity [rad/s]")');
    expect(c.stderr()).toContain('[ambiguous-role]');
    expect(c.stderr()).not.toMatch(/options\./);
  });

  it('the suggested --map reads the file', async () => {
    const c = capture();
    const args = ['inspect', `${FIXTURES}/two-motors.csv`, '--map', 'current=2nd motor current [A]', '--map', 'speed=2nd motor velocity [rad/s]', '--map', 'supply=supply voltage'];
    expect(await runCli(args, c.io)).toBe(EXIT.ok);
    expect(row(c.stdout(), '2nd motor velocity [rad/s]').slice(0, 2)).toEqual(['2nd motor velocity [rad/s]', 'speed']);
  });

  it('a duty in counts asks for --pwm-max; given, the command is derived', async () => {
    const bad = capture();
    expect(await runCli(['inspect', `${FIXTURES}/pwm-counts.csv`], bad.io)).toBe(EXIT.dataProblem);
    expect(bad.stderr()).toContain('(use --pwm-max N)');
    const good = capture();
    expect(await runCli(['inspect', `${FIXTURES}/pwm-counts.csv`, '--pwm-max', '1000'], good.io)).toBe(EXIT.ok);
    expect(row(good.stdout(), '(command from duty)').slice(0, 3)).toEqual(['(command from duty)', 'command', 'derived']);
  });

  it('rejects an unknown --map role and bad numbers for the new options with exit 2', async () => {
    for (const args of [['--map', 'bus=Vbus'], ['--drive-gain', '0'], ['--supply-voltage=-3'], ['--pwm-max', 'x']]) {
      const c = capture();
      expect(await runCli(['inspect', `${FIXTURES}/suffix-units.csv`, ...args], c.io)).toBe(EXIT.usage);
      expect(c.stderr()).toMatch(/--map: unknown role "bus"|--drive-gain must be|--supply-voltage must be|--pwm-max must be/);
    }
  });
});

describe('the experiment kind inspect shows', () => {
  it('is steady-state for a table, unknown with a reason without voltage or speed, coast-down from speed alone', () => {
    const table = ingestText('voltage [V],current [A],speed [rad/s]\n2,0.1,35\n4,0.2,72\n').recording;
    expect(experimentKindOf(table)).toEqual({ kind: 'steady-state', reason: 'a table of operating points (one row per point, no time column), fitted as steady-state points' });
    const noVoltage = ingestText('time [s],current [A]\n0,0\n1,1\n2,1\n').recording;
    expect(experimentKindOf(noVoltage).kind).toBe('unknown');
    expect(experimentKindOf(noVoltage).reason).toMatch(/no voltage .*and no speed/);
    // Invented speed-only log (the estimator can only fit a coast-down from it).
    const speedOnly = ingestText(`time [s],speed [rad/s]\n${Array.from({ length: 40 }, (_, k) => `${k * 0.01},${(100 * Math.exp(-k * 0.05)).toFixed(3)}`).join('\n')}\n`).recording;
    expect(experimentKindOf(speedOnly).kind).toBe('coast-down');
  });

  it('is unknown with the reason when the classifier cannot tell', () => {
    const short = ingestText('time [s],voltage [V],current [A],speed [rad/s]\n0,0,0,0\n1,1,1,1\n2,1,1,2\n').recording;
    const k = experimentKindOf(short);
    expect(k.kind).toBe('unknown');
    expect(k.reason).toMatch(/^the kind could not be told \(.+\)$/);
  });
});

describe('fit on a command-only log', () => {
  let dir = '';
  // Constants of the FACTS.md §5 worked example (R 2 Ω, L 1 mH, Kt = Ke 0.05, J 2e-5 kg·m², b 1e-5).
  const TRUE = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'mp-roles-'));
    writeFileSync(join(dir, 'motor.json'), JSON.stringify(TRUE));
    const c = capture(dir);
    const code = await runCli(['simulate', 'motor.json', '--experiment', 'step', '--volts', '12', '--seed', '4', '--sample-rate', '10000', '--duration', '0.12',
      '--noise-voltage', '0.02', '--noise-current', '0.01', '--noise-speed', '0.2', '--out', 'step.csv'], c.io);
    expect(code, c.stderr()).toBe(EXIT.ok);
    const text = readFileSync(join(dir, 'step.csv'), 'utf8');
    expect(text).toContain('voltage [V]');
    // The same numbers under a command header, and at half scale for a drive of gain 2.
    writeFileSync(join(dir, 'step-cmd.csv'), text.replace('voltage [V]', 'voltage command [V]'));
    const lines = text.split('\n');
    const header = lines.findIndex((l) => l.includes('voltage [V]'));
    const vAt = lines[header]!.split(',').indexOf('voltage [V]');
    const half = lines.map((l, k) => {
      if (k <= header || l.trim() === '' || l.startsWith('#')) return k === header ? l.replace('voltage [V]', 'U_cmd [V]') : l;
      const cells = l.split(',');
      cells[vAt] = String(Number(cells[vAt]) / 2);
      return cells.join(',');
    });
    writeFileSync(join(dir, 'step-half.csv'), half.join('\n'));
  });

  it('is fitted with the command as the input, says so, and gives the constants of the terminal-voltage fit', async () => {
    const terminal = capture(dir);
    expect(await runCli(['fit', 'step.csv', '--json'], terminal.io), terminal.stderr()).toBe(EXIT.ok);
    const command = capture(dir);
    expect(await runCli(['fit', 'step-cmd.csv', '--json'], command.io), command.stderr()).toBe(EXIT.ok);
    expect(command.stderr()).toContain('input: commanded voltage, not measured at the motor');
    const a = JSON.parse(terminal.stdout());
    const b = JSON.parse(command.stdout());
    // Same numbers in, same fit out (derived here: the input is the same array of volts).
    for (const name of ['R', 'Kt', 'J', 'b']) expect(b.parameters[name].value).toBe(a.parameters[name].value);
  });

  it('applies --drive-gain to the command', async () => {
    const c = capture(dir);
    expect(await runCli(['fit', 'step-half.csv', '--drive-gain', '2', '--json'], c.io), c.stderr()).toBe(EXIT.ok);
    expect(c.stderr()).toContain('the command × drive gain 2');
    const doc = JSON.parse(c.stdout());
    // Halved in the file and doubled by the gain: within rounding of the written decimals, the same
    // input as step.csv, so the step-run constants land within their own 3 standard errors of truth.
    for (const name of ['Kt', 'J'] as const) {
      const p = doc.parameters[name];
      expect(Math.abs(p.value - TRUE[name]) / p.standardError, name).toBeLessThan(3);
    }
  });

  it('fits a table of operating points (R pinned, as a table alone cannot part R from K) and reports K and b', async () => {
    const c = capture();
    expect(await runCli(['fit', `${FIXTURES}/steady-table.csv`, '--fix', 'R=10', '--json'], c.io), c.stderr()).toBe(EXIT.ok);
    const doc = JSON.parse(c.stdout());
    expect(doc.fit.recordings[0].kind).toBe('steady-state');
    expect(doc.parameters.Kt.value).toBeGreaterThan(0);
    expect(doc.parameters.b.value).toBeGreaterThan(0);
    expect(c.stderr()).toContain('4 operating points');
  });
});
