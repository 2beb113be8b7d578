#!/usr/bin/env node
/**
 * Writes the V8 code cache of the command line's bundle (packages/cli/dist/motorprint.cjs.v8cache),
 * called by scripts/build.mjs after it bundles. packages/cli/src/bundledCli.ts says what the two files
 * are for.
 *
 * V8 caches the bytecode of the functions compiled when the cache is taken, so the cache is taken
 * after training runs: the bundled command line inspects and fits the invented demo recordings in
 * fixtures/demo (as `pnpm demo` does), simulates an invented PRBS run of the demo motor and fits it,
 * writing its files to a temporary folder and throwing its output away. A cache this Node already
 * accepts is kept. Without the demo recordings the cache is taken without training (it then holds
 * only what loading compiles).
 */
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const cliDist = join(root, 'packages', 'cli', 'dist');
const { BUNDLE_FILE, CODE_CACHE_SUFFIX, loadBundledCli } = await import(pathToFileURL(join(cliDist, 'bundledCli.js')).href);
const cacheFile = join(cliDist, BUNDLE_FILE + CODE_CACHE_SUFFIX);

if (existsSync(cacheFile)) {
  const kept = loadBundledCli(cliDist);
  if ('runCli' in kept && kept.codeCache === 'accepted') process.exit(0);
}
const cli = loadBundledCli(cliDist, { useCodeCache: false });
if (!('runCli' in cli)) {
  console.error(`make-code-cache: no code cache, the bundle cannot be loaded: ${cli.unused}`);
  rmSync(cacheFile, { force: true });
  process.exit(0);
}

const demo = join(root, 'fixtures', 'demo');
const runs = ['locked-rotor', 'step', 'coast-down', 'steady-state'].map((k) => join(demo, `tern24-${k}.csv`));
const prbs = join(demo, 'tern24-prbs.csv');
const logger = join(demo, 'tern24-step-logger.csv');
const scratch = mkdtempSync(join(tmpdir(), 'motorprint-code-cache-'));
const simulated = join(scratch, 'prbs.csv');
const training = [
  ['inspect', logger],
  ['fit', prbs, '--json'],
  ['simulate', join(root, 'fixtures', 'tern24.params.json'), '--experiment', 'prbs', '--out', simulated, '--duration', '2',
    '--noise-current', '0.012', '--noise-speed', '0.48', '--seed', '1'],
  ['fit', simulated, '--json'],
  ['fit', ...runs, '--check', prbs, '--id', 'motor=Tern 24 (invented)', '--out', join(scratch, 'set.json'), '--report', join(scratch, 'report.html')],
];
const sink = { stdout: () => {}, stderr: () => {}, cwd: root, env: {}, isTty: false, stderrIsTty: false, stderrColumns: undefined };
let trained = 0;
try {
  if ([...runs, prbs, logger, join(root, 'fixtures', 'tern24.params.json')].every((f) => existsSync(f))) {
    for (const argv of training) {
      const code = await cli.runCli(argv, sink);
      if (code === 0 || code === 1) trained++;
    }
  }
} finally {
  rmSync(scratch, { recursive: true, force: true });
}
writeFileSync(cacheFile, cli.script.createCachedData());
if (trained < training.length) console.error(`make-code-cache: ${trained} of ${training.length} training runs done; the cache holds less`);
