import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { expectClose } from '@motorprint/testkit';
import { describe, expect, it } from 'vitest';
import { describeRecording, guessExperimentKind, ingestText, readRecording } from '../index.js';
import type { Recording } from '../index.js';

// Invented recordings of the FACTS.md §5 motor (R 2 Ω, Kt = Ke 0.05, J 2e-5 kg·m², b 1e-5,
// inductance neglected except for the locked rotor), simulated here with forward Euler at 10 kHz.
const R = 2;
const K = 0.05;
const J = 2e-5;
const b = 1e-5;
const DT = 1e-4;

/** Deterministic noise in [−1, 1]. */
function noise(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return (2 * s) / 2147483648 - 1;
  };
}

function simulate(
  seconds: number,
  volts: (t: number) => number,
  opts: { openAfter?: number; locked?: boolean; withSpeed?: boolean; torque?: number; backEmfVoltage?: boolean } = {},
): Recording {
  const n = Math.round(seconds / DT);
  const time = new Float64Array(n);
  const voltage = new Float64Array(n);
  const current = new Float64Array(n);
  const speed = new Float64Array(n);
  const torque = new Float64Array(n);
  const rnd = noise(7);
  let w = 0;
  let i = 0;
  for (let k = 0; k < n; k++) {
    const t = k * DT;
    const open = opts.openAfter !== undefined && t >= opts.openAfter;
    const v = open ? (opts.backEmfVoltage ? K * w : 0) : volts(t);
    if (opts.locked) i += ((v - R * i) / 1e-3) * DT; // L = 1 mH for the locked rotor
    else i = open ? 0 : (v - K * w) / R;
    const load = opts.torque ?? 0;
    if (!opts.locked) w += ((K * i - b * w - load) / J) * DT;
    time[k] = t;
    voltage[k] = v + 0.01 * rnd();
    current[k] = i + 0.005 * rnd();
    speed[k] = w + 0.05 * rnd();
    torque[k] = load + 1e-5 * rnd();
  }
  const channels: Recording['channels'] = { voltage, current };
  if (opts.withSpeed !== false) channels.speed = speed;
  if (opts.torque !== undefined) channels.torque = torque;
  return { time, channels, extra: [], meta: {} as Recording['meta'] };
}

describe('guessExperimentKind reads the kind from simple evidence', () => {
  it('a voltage step with the speed rising then settling is a step', () => {
    const g = guessExperimentKind(simulate(0.3, (t) => (t < 0.03 ? 0 : 12)));
    expect(g.kind).toBe('step');
    expect(g.loaded).toBe(false);
    expect(g.reason).toMatch(/^voltage steps once from -?0(\.\d+)? V to 12 V; speed goes from .* to 23\d rad\/s and settles\.$/);
  });

  it('a record that starts at the step is a step', () => {
    expect(guessExperimentKind(simulate(0.3, () => 12)).kind).toBe('step');
  });

  it('speed ≈ 0 while current flows is a locked rotor', () => {
    const g = guessExperimentKind(simulate(0.02, (t) => (t < 0.002 ? 0 : 6), { locked: true }));
    expect(g.kind).toBe('locked-rotor');
    expect(g.reason).toContain('current reaches 3');
  });

  it('without a speed channel, a current that rises and stays is a locked rotor', () => {
    const g = guessExperimentKind(simulate(0.02, (t) => (t < 0.002 ? 0 : 6), { locked: true, withSpeed: false }));
    expect(g.kind).toBe('locked-rotor');
    expect(g.reason).toContain('there is no speed channel');
  });

  it('without a speed channel, a free-run step cannot be told and says why', () => {
    const g = guessExperimentKind(simulate(0.3, (t) => (t < 0.03 ? 0 : 12), { withSpeed: false }));
    expect(g.kind).toBe('unknown');
    expect(g.reason).toContain('declare the kind');
  });

  it('voltage and current cut while the speed decays is a coast-down', () => {
    const g = guessExperimentKind(simulate(1.5, () => 12, { openAfter: 0.3 }));
    expect(g.kind).toBe('coast-down');
    expect(g.reason).toContain('the voltage is ≈ 0');
  });

  it('open terminals that read the back EMF during the decay are a coast-down too', () => {
    const g = guessExperimentKind(simulate(1.5, () => 12, { openAfter: 0.3, backEmfVoltage: true }));
    expect(g.kind).toBe('coast-down');
    expect(g.reason).toContain('the voltage follows the speed');
  });

  it('several voltage plateaux with settled speed are a steady-state sweep', () => {
    const g = guessExperimentKind(simulate(1.2, (t) => 2 + 2 * Math.floor(t / 0.2)));
    expect(g.kind).toBe('steady-state');
    expect(g.reason).toBe('voltage holds 6 plateaux from 2 V to 12 V and the speed settles on 6 of them.');
  });

  it('a downward staircase is a steady-state sweep, not a coast-down', () => {
    expect(guessExperimentKind(simulate(1.2, (t) => 12 - 2 * Math.floor(t / 0.2))).kind).toBe('steady-state');
  });

  it('many voltage switchings (PRBS) are rich excitation', () => {
    const rnd = noise(3);
    const switches: number[] = [];
    for (let t = 0; t < 1; t += 0.004 + 0.012 * (rnd() + 1) / 2) switches.push(t);
    const g = guessExperimentKind(simulate(1, (t) => (switches.filter((s) => s <= t).length % 2 ? 12 : 0)));
    expect(g.kind).toBe('rich');
    expect(g.reason).toMatch(/voltage changes level \d+ times/);
  });

  it('a multisine is rich excitation', () => {
    const g = guessExperimentKind(simulate(1, (t) => 6 + 3 * Math.sin(2 * Math.PI * 5 * t) + 2 * Math.sin(2 * Math.PI * 17 * t) + 1.5 * Math.sin(2 * Math.PI * 41 * t)));
    expect(g.kind).toBe('rich');
  });

  it('a measured load torque marks the run as loaded', () => {
    const g = guessExperimentKind(simulate(0.3, (t) => (t < 0.03 ? 0 : 12), { torque: 0.02 }));
    expect(g.loaded).toBe(true);
    expect(g.reason).toContain('a load torque of up to 0.02 N·m was measured');
    expect(guessExperimentKind(simulate(0.3, () => 12, { torque: 0 })).loaded).toBe(false);
  });

  it('a recording with only time and an unrelated column is unknown', () => {
    const r = ingestText('time [s],aux\n0,1\n1,2\n2,3\n3,4\n4,5\n5,6\n6,7\n7,8\n8,9\n9,10\n10,11\n').recording;
    expect(guessExperimentKind(r)).toEqual({ kind: 'unknown', loaded: false, reason: 'there is no voltage, current or speed channel.' });
  });
});

describe('the demo recordings are guessed as the kind they were made as', () => {
  const root = join(dirname(fileURLToPath(import.meta.url)), '../../../../fixtures/demo');
  const have = existsSync(root);
  if (!have) console.log(`skipping the demo-fixture kinds: ${root} is absent`);
  const truthKind: Record<string, string> = { prbs: 'rich' };
  const files = have ? readdirSync(root).filter((f) => f.endsWith('.truth.json')) : [];
  it.skipIf(!have).each(files.length ? files : ['(none)'])('%s', async (truthFile) => {
    const truth = JSON.parse(readFileSync(join(root, truthFile), 'utf8')) as { experiment: string; file: string };
    const csv = join(root, truthFile.replace('.truth.json', '.csv'));
    const { recording } = await readRecording(csv);
    expect(guessExperimentKind(recording).kind).toBe(truthKind[truth.experiment] ?? truth.experiment);
  });
});

describe('describeRecording gives plain JSON for the CLI', () => {
  it('holds file, dialect, columns, rows, sampling, span, channel stats, kind and issues', () => {
    const lines = ['# invented', 'time [ms];voltage [V];current [mA];speed [rpm];note'];
    for (let k = 0; k < 200; k++) lines.push(`${k};${k < 20 ? 0 : 12};${k < 20 ? 0 : 500};${k < 20 ? 0 : Math.round(2000 * (1 - Math.exp(-(k - 20) / 16)))};${k === 50 ? 'x' : ''}`);
    lines[60] = '58;12;oops;1900;';
    const result = ingestText(lines.join('\r\n'), { fileName: 'run.csv' });
    const d = describeRecording(result);
    expect(JSON.parse(JSON.stringify(d))).toEqual(d);
    expect(d).toMatchObject({
      schema: 'motorprint.inspect/1',
      file: 'run.csv',
      dialect: { delimiter: ';', decimalSeparator: '.', lineEnding: 'CRLF', bom: false, encoding: 'string', commentLines: 1, headerLine: 2, quoted: false, bodyParser: 'fast' },
      rows: { read: 200, kept: 199, dropped: 1, droppedByReason: { 'non-numeric': 1 }, droppedRows: [{ line: 61, reason: 'non-numeric', column: 'current [mA]', detail: 'cell "oops"' }] },
      sampling: { gaps: 0 },
      timeSpan: { start: 0, end: 0.199, duration: 0.199 },
      kind: { kind: 'step', loaded: false },
    });
    // Differences of k·0.001 s carry rounding of a few ulp.
    expectClose(d.sampling.sampleRate, 1000, { rel: 1e-12 }, 'sample rate');
    expectClose(d.sampling.sampleInterval, 0.001, { rel: 1e-12 }, 'sample interval');
    expect(d.columns.map((c) => [c.header, c.role, c.unit, c.siUnit, c.assumed])).toEqual([
      ['time [ms]', 'time', 'ms', 's', false],
      ['voltage [V]', 'voltage', 'V', 'V', false],
      ['current [mA]', 'current', 'mA', 'A', false],
      ['speed [rpm]', 'speed', 'rpm', 'rad/s', false],
      ['note', 'extra', null, null, false],
    ]);
    expect(d.channels.voltage).toEqual({ unit: 'V', min: 0, max: 12, mean: (12 * 179) / 199, derived: false });
    expect(d.channels.current!.max).toBe(0.5);
    // 'note' holds no number, so it is listed as a column but not kept.
    expect(d.extra).toEqual([]);
    expect(d.columns[4]!.note).toBe('not kept: no cell is a number');
    expect(d.issues.map((i) => i.code)).toEqual(expect.arrayContaining(['unrecognised-column', 'rows-dropped', 'non-numeric-column']));
  });
});
