import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli, EXIT, type CliIo } from '@motorprint/cli';
import { createProgress } from '../progress.js';

const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '../../../..');
const ERASE = '\r\u001b[2K';

function capture(stderrIsTty: boolean, stderrColumns?: number) {
  const out: string[] = [];
  const err: string[] = [];
  const io: CliIo = {
    stdout: (t) => out.push(t), stderr: (t) => err.push(t), cwd: repoRoot, env: { NO_COLOR: '1' }, isTty: false,
    stderrIsTty, ...(stderrColumns === undefined ? {} : { stderrColumns }),
  };
  return { io, out, err };
}

describe('createProgress', () => {
  it('writes nothing and hands back the same io when stderr is not a terminal', () => {
    const c = capture(false);
    const progress = createProgress(c.io, 'motorprint fit');
    progress.update('fitting 1 recording', 0.2);
    progress.io.stderr('a message\n');
    progress.done();
    expect(progress.io).toBe(c.io);
    expect(c.err).toEqual(['a message\n']);
    expect(c.out).toEqual([]);
  });
  it('draws one line with the stage and the percentage on a terminal, rewritten in place, and clears it at the end', () => {
    let t = 0;
    const c = capture(true);
    const progress = createProgress(c.io, 'motorprint fit', () => t);
    progress.update('reading a.csv', 0);
    t = 500;
    progress.update('fitting 1 recording', 0.15);
    progress.done();
    expect(c.err).toEqual([
      `${ERASE}motorprint fit: reading a.csv — 0 %`,
      `${ERASE}motorprint fit: fitting 1 recording — 15 %`,
      ERASE,
    ]);
    expect(c.out).toEqual([]);
  });
  it('redraws the same stage at most every 100 ms, a new stage at once, and clamps the fraction to 0…100 %', () => {
    let t = 0;
    const c = capture(true);
    const progress = createProgress(c.io, 'job', () => t);
    progress.update('a', 0.1);
    t = 50;
    progress.update('a', 0.2); // same stage within 100 ms: skipped
    progress.update('b', 7); // new stage: drawn, clamped to 100 %
    t = 200;
    progress.update('b', -1); // same stage after 100 ms: drawn, clamped to 0 %
    progress.update('c', Number.NaN);
    expect(c.err).toEqual([`${ERASE}job: a — 10 %`, `${ERASE}job: b — 100 %`, `${ERASE}job: b — 0 %`, `${ERASE}job: c — 0 %`]);
  });
  it('clears the line before a message and draws it again after, so messages stay readable', () => {
    const c = capture(true);
    const progress = createProgress(c.io, 'job', () => 0);
    progress.io.stderr('before any line\n');
    progress.update('a', 0.5);
    progress.io.stderr('read a.csv: 10 rows\n');
    progress.done();
    progress.done(); // a second call writes nothing more
    expect(c.err).toEqual(['before any line\n', `${ERASE}job: a — 50 %`, ERASE, 'read a.csv: 10 rows\n', `${ERASE}job: a — 50 %`, ERASE]);
  });
  it('cuts the line to the terminal width', () => {
    const c = capture(true, 30);
    const progress = createProgress(c.io, 'motorprint fit', () => 0);
    progress.update('reading a-very-long-recording-name.csv', 0);
    const line = c.err[0]!.slice(ERASE.length);
    expect(line.length).toBe(29);
    expect(line.endsWith('…')).toBe(true);
  });
});

describe('motorprint fit progress', () => {
  const args = ['fit', 'fixtures/demo/tern24-locked-rotor.csv', 'fixtures/demo/tern24-step.csv', '--json'];
  it('shows the stages and fractions on a terminal stderr and leaves the JSON on stdout untouched', async () => {
    const c = capture(true);
    expect(await runCli(args, c.io), c.err.join('')).toBe(EXIT.ok);
    const err = c.err.join('');
    expect(err).toContain(`${ERASE}motorprint fit: reading tern24-locked-rotor.csv — 0 %`);
    expect(err).toMatch(/motorprint fit: fitting 2 recordings — 15 %/);
    expect(err).toMatch(/motorprint fit: checking the fit — 35 %/);
    expect(err).toMatch(/motorprint fit: trying Coulomb friction — \d+ %/);
    expect(err.endsWith(ERASE)).toBe(true);
    const stdout = c.out.join('');
    expect(stdout).not.toContain('\r');
    expect(stdout).not.toContain('\u001b');
    expect(JSON.parse(stdout).parameters.R.value).toBeGreaterThan(0);
  });
  it('writes no progress line when stderr is not a terminal', async () => {
    const c = capture(false);
    expect(await runCli(args, c.io), c.err.join('')).toBe(EXIT.ok);
    const err = c.err.join('');
    expect(err).toMatch(/fitting 2 recording\(s\) and choosing the model…/);
    expect(err).not.toContain('\r');
    expect(err).not.toContain('\u001b');
    expect(err).not.toContain('%');
  });
});
