import { mkdtempSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli, EXIT, type CliIo } from '@motorprint/cli';
import { SUBCOMMANDS } from '../commands/index.js';
import { CLI_REWRITES, REWRITE_NEEDLES, inCliTerms } from '../cliTerms.js';

const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '../../../..');

function capture(cwd = repoRoot) {
  const out: string[] = [];
  const err: string[] = [];
  const io: CliIo = { stdout: (t) => out.push(t), stderr: (t) => err.push(t), cwd, env: { NO_COLOR: '1' }, isTty: false };
  return { io, stdout: () => out.join(''), stderr: () => err.join('') };
}

/** The options a subcommand's parser accepts, as listed by its unknown-option message. */
async function acceptedOptions(name: string): Promise<string[]> {
  const c = capture();
  expect(await runCli([name, '--zzzz-not-an-option'], c.io)).toBe(EXIT.usage);
  const list = /the options of \S+ are (.*)$/m.exec(c.stderr())?.[1];
  expect(list, c.stderr()).toBeDefined();
  return list!.split(', ').map((o) => o.trim());
}

describe('every subcommand\'s --help', () => {
  it.each(SUBCOMMANDS.map((s) => s.name))('%s: the synopsis names every option the parser accepts, and the help gives the exit codes', async (name) => {
    const options = await acceptedOptions(name);
    expect(options.length).toBeGreaterThan(0);
    const c = capture();
    expect(await runCli([name, '--help'], c.io)).toBe(EXIT.ok);
    const help = c.stdout();
    const synopsis = help.slice(0, help.indexOf('\n\n'));
    expect(synopsis.startsWith(`motorprint ${name}`)).toBe(true);
    for (const o of options) expect(synopsis, `${name} synopsis lacks ${o}`).toMatch(new RegExp(`${o}(?![\\w-])`));
    // … and names no option the parser refuses.
    for (const o of synopsis.match(/--[\w-]+/g) ?? []) expect(options, `${name} synopsis names ${o}`).toContain(o);
    expect(help).toMatch(/Exit codes: 0 [\s\S]*\s1 [\s\S]*\s2\s+command-line\s+mistake/);
  });
});

describe('option mistakes are caught before any work', () => {
  it('suggests the near option', async () => {
    const c = capture();
    expect(await runCli(['fit', 'fixtures/demo/tern24-step.csv', '--chek', 'x.csv'], c.io)).toBe(EXIT.usage);
    expect(c.stderr()).toContain('unknown option --chek; did you mean --check?');
    const d = capture();
    expect(await runCli(['inspect', 'a.csv', '--jsn'], d.io)).toBe(EXIT.usage);
    expect(d.stderr()).toContain('did you mean --json?');
  });
  it('refuses --id without =VALUE before reading a file (the file does not even exist)', async () => {
    const c = capture();
    expect(await runCli(['fit', 'no/such/run.csv', '--id', 'motor'], c.io)).toBe(EXIT.usage);
    expect(c.stderr()).toContain('--id takes KEY=VALUE (got "motor")');
    expect(c.stderr()).not.toMatch(/^read /m);
  });
  it('says an option needs a value, or takes none, in its own words', async () => {
    const c = capture();
    expect(await runCli(['fit', 'a.csv', '--id'], c.io)).toBe(EXIT.usage);
    expect(c.stderr()).toContain('error: --id needs a value');
    const d = capture();
    expect(await runCli(['fit', 'a.csv', '--json=yes'], d.io)).toBe(EXIT.usage);
    expect(d.stderr()).toContain('error: --json takes no value');
  });
  it('checks every input file before reading the first, and --out naming a folder before fitting', async () => {
    const c = capture();
    expect(await runCli(['fit', 'fixtures/demo/tern24-step.csv', '--check', 'no/such/held-out.csv'], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toBe('error: file not found: no/such/held-out.csv\n');
    const d = capture();
    expect(await runCli(['fit', 'fixtures/demo/tern24-step.csv', '--out', 'fixtures'], d.io)).toBe(EXIT.usage);
    expect(d.stderr()).toContain('fixtures is a folder; give a file name to write');
  });
});

describe('a missing file', () => {
  it.each([
    [['fit', 'no/such.csv'], 'no/such.csv', EXIT.dataProblem],
    [['inspect', 'no/such.csv'], 'no/such.csv', EXIT.dataProblem],
    [['show', 'no/such.json'], 'no/such.json', EXIT.dataProblem],
    [['simulate', 'no/such.json', '--experiment', 'step', '--out', join(tmpdir(), 'mp-words-x.csv')], 'no/such.json', EXIT.dataProblem],
    [['lot', 'fixtures/lot/tern24', '--spec', 'no/such.json'], 'no/such.json (the --spec file)', EXIT.usage],
  ] as const)('%j prints "file not found: PATH" and no raw system error', async (args, path, code) => {
    const c = capture();
    expect(await runCli([...args], c.io)).toBe(code);
    expect(c.stderr()).toContain(`error: file not found: ${path}`);
    expect(c.stderr()).not.toMatch(/ENOENT|stat '|errno|at .*\.ts:\d+/);
  });
});

describe('a file that cannot be used', () => {
  it('is named once, with its line, and a parameter set\'s problem in plain words', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-words-'));
    writeFileSync(join(dir, 'bin.csv'), Buffer.from([0x74, 0x00, 0x01, 0x02, 0x0a, 0x00]));
    writeFileSync(join(dir, 'part.json'), JSON.stringify({ schema: 'motorprint.parameter-set/1' }));
    const c = capture(dir);
    expect(await runCli(['fit', 'bin.csv'], c.io)).toBe(EXIT.dataProblem);
    expect(c.stderr()).toMatch(/^error: bin\.csv, line 1: the file contains NUL bytes/m);
    expect(c.stderr().match(/bin\.csv/g)).toHaveLength(1);
    const d = capture(dir);
    expect(await runCli(['show', 'part.json'], d.io)).toBe(EXIT.dataProblem);
    expect(d.stderr()).toBe('error: part.json: not a motorprint parameter set: identification must be an object (missing)\n');
  });
});

describe('inspect shows jitter below 1e-6 of the interval as none', () => {
  it('on an evenly sampled file, and as a share when the times wander', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-words-'));
    // Invented files: times as a logger writes them (rounding of 1e-4·k leaves ~1e-17 s of jitter).
    const even = ['time [s],voltage [V]', ...Array.from({ length: 200 }, (_, k) => `${k * 1e-4},1`)].join('\n');
    const wander = ['time [s],voltage [V]', ...Array.from({ length: 200 }, (_, k) => `${k * 1e-4 + (k % 2) * 1e-6},1`)].join('\n');
    writeFileSync(join(dir, 'even.csv'), `${even}\n`);
    writeFileSync(join(dir, 'wander.csv'), `${wander}\n`);
    const c = capture(dir);
    expect(await runCli(['inspect', 'even.csv', 'wander.csv'], c.io)).toBe(EXIT.ok);
    const [evenText, wanderText] = c.stdout().split('\n\n');
    expect(evenText).toContain('jitter none (below 1e-6 of the interval)');
    expect(evenText).not.toMatch(/e-\d+ %/);
    // Derived here: intervals alternate 1.01e-4 and 0.99e-4 s, so σ ≈ 1 % of the median interval.
    expect(wanderText).toMatch(/jitter σ 0\.99 %, max 2 % of the interval/);
  });
});

describe('command-line words', () => {
  it('turn library option and field names into options and commands', () => {
    expect(inCliTerms('a driven run with current, or J pinned to a known value')).toBe('a driven run with current, or J pinned to a known value (--fix J=VALUE)');
    expect(inCliTerms('(no temperature channel in the recordings and no winding temperature given)')).toBe('(no temperature channel in the recordings and no --winding-temp given)');
    expect(inCliTerms('3 of 9 data rows were dropped (3 non-numeric); each is listed in meta.rowsDropped with its line and reason.'))
      .toBe('3 of 9 data rows were dropped (3 non-numeric); each is listed with its line and reason by "motorprint inspect FILE".');
    expect(inCliTerms('pass options.map.supplyVoltage')).toBe('give --map supply=COLUMN');
    expect(inCliTerms('J is neither informed by another recording nor pinned to a known value')).toBe('J is neither informed by another recording nor pinned with --fix');
    expect(inCliTerms('add Coulomb friction Tc to the model, otherwise')).toBe('add Coulomb friction Tc to the model (--model coulomb), otherwise');
    expect(inCliTerms('the raw measured voltage, as asked (no rebuilt command)')).toBe('the raw measured voltage, as --measured-voltage asks (no rebuilt command)');
    expect(inCliTerms('R, J and b scale together (log current, or pin one of them)')).toBe('R, J and b scale together (log current, or pin one of them with --fix)');
    expect(inCliTerms('"coulomb": true')).toBe('"coulomb": true');
  });

  it('are rewritten the same with or without the quick test of the needles', () => {
    // The quick test may skip a text only where no pattern matches it: every pattern holds one of the
    // needles as plain text, outside any optional (?), repeated or alternative (|) part.
    for (const [pattern] of CLI_REWRITES) {
      expect(pattern.flags).toBe('g');
      const { text, alternatives } = requiredText(pattern.source);
      expect(alternatives, `${pattern.source} has alternatives outside a group`).toBe(false);
      expect(REWRITE_NEEDLES.some((needle) => text.includes(needle)), `${pattern.source} holds no needle`).toBe(true);
    }
    // The reading of a pattern's text itself: what it keeps and what it cuts.
    expect(requiredText('\\(?fitMotor option (\\w+)\\)?').text).toBe('\u0000fitMotor option \u0000\u0000');
    expect(requiredText('a|b').alternatives).toBe(true);
    const chain = (text: string): string => CLI_REWRITES.reduce((out, [p, r]) => out.replace(p, r as string), text);
    const texts = [
      'pass options.map.current', 'options.units', 'see meta.rowsDropped', 'kept unconverted in recording.extra', 'fix options.fix and options.initial',
      'pin Kt to a known value', 'Vmax pinned to a known value', 'fitMotor option coulomb: true', 'no windingTemperature option', 'fixed by the caller',
      'a plain sentence with nothing to rewrite', 'options.pwmMax and options.driveGain; given by the caller', '', 'R 1.9 Ω ± 0.01',
    ];
    for (const t of texts) expect(inCliTerms(t)).toBe(chain(t));
    // Mutation check of the test itself: a text the chain changes is among them.
    expect(texts.filter((t) => chain(t) !== t).length).toBeGreaterThan(8);
  });

  it('are not needed in the libraries: no library message names a command-line option', async () => {
    const options = new Set<string>();
    for (const s of SUBCOMMANDS) for (const o of await acceptedOptions(s.name)) options.add(o.slice(2));
    const pattern = new RegExp(`--(${[...options].join('|')})(?![\\w-])`);
    const found: string[] = [];
    for (const pkg of ['ingest', 'model', 'estimate', 'diagnose', 'report', 'lot']) {
      const walk = (d: string): void => {
        for (const name of readdirSync(d)) {
          const p = join(d, name);
          if (statSync(p).isDirectory()) { if (name !== '__tests__') walk(p); continue; }
          if (!name.endsWith('.ts')) continue;
          readFileSync(p, 'utf8').split('\n').forEach((line, i) => {
            // Messages only: comments may say which option a command line maps to.
            if (/^\s*(\*|\/\/|\/\*)/.test(line)) return;
            if (pattern.test(line)) found.push(`${p.slice(repoRoot.length + 1)}:${i + 1}: ${line.trim()}`);
          });
        }
      };
      walk(join(repoRoot, 'packages', pkg, 'src'));
    }
    expect(found).toEqual([]);
  });

  it('reach what fit prints and writes: the R note names --winding-temp, not a library option', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mp-words-'));
    writeFileSync(join(dir, 'p.json'), JSON.stringify({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }));
    const s = capture(dir);
    expect(await runCli(['simulate', 'p.json', '--experiment', 'locked-rotor', '--sample-rate', '20000', '--noise-current', '0.01', '--noise-voltage', '0.02', '--out', 'lr.csv'], s.io), s.stderr()).toBe(EXIT.ok);
    const c = capture(dir);
    expect(await runCli(['fit', 'lr.csv', '--kind', 'lr.csv=locked-rotor', '--fix', 'L=0.001', '--out', 'set.json'], c.io), c.stderr()).toBe(EXIT.ok);
    const printed = c.stdout() + c.stderr() + readFileSync(join(dir, 'set.json'), 'utf8');
    expect(printed).toContain('R at 25 °C: not computed: the winding temperature is unknown');
    expect(printed).toContain('no --winding-temp given');
    expect(printed).toContain('pinned with --fix (not fitted)');
    expect(printed).not.toMatch(/options\.\w|meta\.rowsDropped|recording\.(extra|time)|windingTemperature option|coulomb: true|by the caller/);
  });
});

/**
 * The text every match of a regular expression's source must contain, piece by piece: escapes undone,
 * word boundaries dropped, and every group, character class and optional or repeated piece replaced by
 * NUL (so that a needle found in it lies wholly in the required text); `alternatives` when a `|` lies
 * outside every group (then no single piece is required).
 */
function requiredText(source: string): { text: string; alternatives: boolean } {
  let text = '';
  let depth = 0;
  let alternatives = false;
  for (let i = 0; i < source.length; i++) {
    const c = source[i]!;
    if (c === '\\') {
      const e = source[++i]!;
      if (depth === 0) text += e === 'b' ? '' : /[wdsWDS]/.test(e) ? '\u0000' : e;
      continue;
    }
    if (c === '[' && depth === 0) {
      while (i < source.length && source[i] !== ']') i += source[i] === '\\' ? 2 : 1;
      text += '\u0000';
      continue;
    }
    if (c === '(') { if (depth++ === 0) text += '\u0000'; continue; }
    if (c === ')') { depth--; continue; }
    if (depth > 0) continue;
    if (c === '|') { alternatives = true; continue; }
    if (c === '?' || c === '*') { text = `${text.slice(0, -1)}\u0000`; continue; }
    if (c === '+' || c === '^' || c === '$') continue;
    text += c;
  }
  return { text, alternatives };
}
