/**
 * The command line's bundle with its V8 code cache (bundledCli.ts; written by scripts/build.mjs and
 * scripts/make-code-cache.mjs): the same output as the modules, used only for the subcommands it
 * serves, refused when it is older than the packages' tsc output, and still right when V8 refuses
 * the cache. The process tests need the build (`pnpm install` runs it); without the bundle they skip
 * and say why.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { BUNDLE_FILE, BUNDLE_HEAD, BUNDLED_SUBCOMMANDS, CODE_CACHE_SUFFIX, loadBundledCli } from '../bundledCli.js';
import { SUBCOMMANDS } from '../commands/index.js';
import type { CliIo } from '../types.js';

const here = dirname(fileURLToPath(import.meta.url));
const repoRoot = resolve(here, '../../../..');
const dist = resolve(here, '../../dist');
const bundle = join(dist, BUNDLE_FILE);
const demo = join(repoRoot, 'fixtures', 'demo');
const missing = existsSync(bundle) ? null : `there is no ${bundle} (pnpm build writes it)`;
if (missing !== null) console.warn(`bundled command line tests skipped: ${missing}`);

const scratch = mkdtempSync(join(tmpdir(), 'mp-bundle-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

/** Runs the compiled executable, saying on stderr where it runs from (MOTORPRINT_SHOW_LOADING). */
function motorprint(args: string[], plain = false) {
  const env: NodeJS.ProcessEnv = {};
  for (const [k, v] of Object.entries(process.env)) if (!/^npm_|^MOTORPRINT_/i.test(k) && k !== 'INIT_CWD') env[k] = v;
  Object.assign(env, { NO_COLOR: '1', MOTORPRINT_SHOW_LOADING: '1' }, plain ? { MOTORPRINT_PLAIN_MODULES: '1' } : {});
  const r = spawnSync(process.execPath, [join(dist, 'main.js'), ...args], { cwd: repoRoot, env, encoding: 'utf8', maxBuffer: 64 << 20 });
  const [loading = '', ...rest] = (r.stderr ?? '').split('\n');
  return { status: r.status, stdout: r.stdout ?? '', loading, stderr: rest.join('\n') };
}

function memoryIo(): CliIo & { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  return { out, err, stdout: (t) => void out.push(t), stderr: (t) => void err.push(t), cwd: repoRoot, env: {}, isTty: false, stderrIsTty: false };
}

describe('the bundled command line', () => {
  it('serves every subcommand but lot', () => {
    expect([...BUNDLED_SUBCOMMANDS].sort()).toEqual(SUBCOMMANDS.map((c) => c.name).filter((n) => n !== 'lot').sort());
  });

  it('fits the demo PRBS run to the same parameter set as the modules, from its code cache', (ctx) => {
    if (missing !== null) ctx.skip(missing);
    const file = join(demo, 'tern24-prbs.csv');
    const fromBundle = motorprint(['fit', file, '--json']);
    const fromModules = motorprint(['fit', file, '--json'], true);
    expect(fromBundle.status, fromBundle.stderr).toBe(0);
    expect(fromBundle.loading).toBe('motorprint: the bundle, code cache accepted');
    expect(fromModules.loading).toBe('motorprint: the modules: MOTORPRINT_PLAIN_MODULES is set');
    // Only the time of writing differs.
    const undated = (t: string) => t.replace(/"date": "[^"]+"/, '"date": …');
    expect(fromBundle.stdout).toMatch(/"date": "\d{4}-/);
    expect(undated(fromBundle.stdout)).toBe(undated(fromModules.stdout));
    expect(fromBundle.stderr).toBe(fromModules.stderr);
  });

  it('prints the same text report and the same errors as the modules', (ctx) => {
    if (missing !== null) ctx.skip(missing);
    const runs = ['tern24-locked-rotor.csv', 'tern24-step.csv'].map((f) => join(demo, f));
    for (const args of [['fit', ...runs], ['inspect', runs[1]!], ['fit', join(scratch, 'no-such.csv')], ['fit', runs[0]!, '--chek', 'x']]) {
      const a = motorprint(args);
      const b = motorprint(args, true);
      expect(a.loading, args.join(' ')).toMatch(/^motorprint: the bundle/);
      expect({ status: a.status, stdout: a.stdout, stderr: a.stderr }, args.join(' ')).toEqual({ status: b.status, stdout: b.stdout, stderr: b.stderr });
    }
  });

  it('reads a unit that needs mathjs (speed in rad/min, with a logger offset) through the bundle', (ctx) => {
    if (missing !== null) ctx.skip(missing);
    // Invented: a 2 kHz log with 12-bit-like steps in current and speed logged in rad/min.
    const rows = ['time [s],voltage [V],current [A],speed [rad/min]'];
    for (let k = 0; k < 400; k++) {
      const t = k / 2000;
      const i = Math.round((0.5 + 0.3 * Math.exp(-t / 0.01) + 0.004) / 0.0025) * 0.0025;
      const w = Math.round(60 * 200 * (1 - Math.exp(-t / 0.05)));
      rows.push(`${t.toFixed(4)},12.00,${i.toFixed(4)},${w}`);
    }
    const file = join(scratch, 'rad-per-minute.csv');
    writeFileSync(file, `${rows.join('\n')}\n`);
    const a = motorprint(['inspect', file, '--json']);
    expect(a.status, a.stderr).toBe(0);
    expect(a.loading).toMatch(/^motorprint: the bundle/);
    expect(a.stdout).toContain('rad/min');
    expect(a.stdout).toBe(motorprint(['inspect', file, '--json'], true).stdout);
  });

  it('leaves --help, --version and lot to the modules', (ctx) => {
    if (missing !== null) ctx.skip(missing);
    for (const args of [['--help'], ['--version'], ['lot', '--help']]) {
      const r = motorprint(args);
      expect(r.status, args.join(' ')).toBe(0);
      expect(r.loading, args.join(' ')).toBe('motorprint: the modules: not a bundled subcommand');
    }
  });

  it('is not used when older than a package\'s tsc output, and still right when V8 refuses its cache', async (ctx) => {
    if (missing !== null) ctx.skip(missing);
    // A copy laid out as the build lays it out: dist/ with the bundle, and the build-info files its
    // first line names, relative to it.
    const copyDist = join(scratch, 'packages', 'cli', 'dist');
    mkdirSync(copyDist, { recursive: true });
    const text = readFileSync(bundle, 'utf8');
    const named = text.slice(BUNDLE_HEAD.length, text.indexOf('\n')).trim().split(' ');
    expect(named.length).toBeGreaterThanOrEqual(5);
    writeFileSync(join(copyDist, BUNDLE_FILE), text);
    const buildInfo = join(copyDist, named[0]!);
    mkdirSync(dirname(buildInfo), { recursive: true });
    writeFileSync(buildInfo, '{}');
    const made = Date.now() / 1000;
    utimesSync(join(copyDist, BUNDLE_FILE), made, made);

    utimesSync(buildInfo, made + 60, made + 60); // tsc ran after the bundle was made
    const stale = loadBundledCli(copyDist);
    expect('unused' in stale && stale.unused).toMatch(/is older than .*tsconfig\.build\.tsbuildinfo \(run pnpm build\)/);

    utimesSync(buildInfo, made - 60, made - 60);
    const noCache = loadBundledCli(copyDist);
    expect('runCli' in noCache && noCache.codeCache).toBe('absent');

    // The build's cache with a script that differs by one comment: V8 refuses it and compiles afresh.
    writeFileSync(join(copyDist, BUNDLE_FILE), `${text}// changed\n`);
    utimesSync(join(copyDist, BUNDLE_FILE), made, made);
    copyFileSync(bundle + CODE_CACHE_SUFFIX, join(copyDist, BUNDLE_FILE + CODE_CACHE_SUFFIX));
    const refused = loadBundledCli(copyDist);
    if (!('runCli' in refused)) throw new Error(refused.unused);
    expect(refused.codeCache).toBe('rejected');
    const io = memoryIo();
    const code = await refused.runCli(['inspect', join(demo, 'tern24-step.csv')], io);
    const { runCli } = await import('../runCli.js');
    const modulesIo = memoryIo();
    expect(code).toBe(await runCli(['inspect', join(demo, 'tern24-step.csv')], modulesIo));
    expect(io.out.join('')).toContain('tern24-step.csv');
    expect(io.out.join('')).toBe(modulesIo.out.join(''));

    // A bundle cut off in the middle (a build interrupted while writing) is set aside, not a crash.
    writeFileSync(join(copyDist, BUNDLE_FILE), text.slice(0, text.length >> 1));
    utimesSync(join(copyDist, BUNDLE_FILE), made, made);
    const cut = loadBundledCli(copyDist);
    expect('unused' in cut && cut.unused).toMatch(/did not load \(/);

    const noMark = join(scratch, 'no-mark');
    mkdirSync(noMark);
    writeFileSync(join(noMark, BUNDLE_FILE), text.slice(text.indexOf('\n') + 1));
    const unmarked = loadBundledCli(noMark);
    expect('unused' in unmarked && unmarked.unused).toMatch(/does not start with the build's mark/);
  });
});
