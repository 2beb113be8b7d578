/**
 * The command line's fast path: one bundled script with a V8 code cache made at build time.
 *
 * Node 20 compiles every ES module afresh in every process, and compiles each function the first
 * time it runs. For `fit` on a 1e5-sample recording that is a large share of the process: loading the
 * packages' ≈ 200 modules, and V8 compiling the functions the fit calls. `pnpm build`
 * (scripts/build.mjs) therefore also writes
 * - `dist/motorprint.cjs`: `runCli` and every subcommand except `lot`, bundled by esbuild into one
 *   script (the same compiled code as the modules, in the same order of evaluation);
 * - `dist/motorprint.cjs.v8cache`: V8's code cache of that script, taken after a few training runs
 *   (scripts/make-code-cache.mjs), so it holds the bytecode of the functions a fit calls.
 *
 * The cache is V8's own format: V8 rejects it when the Node version or V8's flags differ from those
 * it was made with (or the script differs), and then compiles the script as if there were no cache.
 * The results are the same either way: the cache holds bytecode, never results.
 *
 * The plain ES modules stay, and are used for everything else: `--help`, `--version`, `lot` (its
 * worker threads load the packages' modules anyway), a build without esbuild, a bundle older than the
 * packages' tsc output, and whenever MOTORPRINT_PLAIN_MODULES is set. The bundle holds no dynamic
 * `import()` (the build checks): Node 20 runs a script compiled from a code cache without its import
 * callback.
 * MOTORPRINT_SHOW_LOADING=1 makes the executable say on stderr which it used and what V8 made of the
 * cache.
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import vm from 'node:vm';
import type { runCli as RunCli } from './runCli.js';

/** The bundled script's file name in `dist/`; its code cache is this plus {@link CODE_CACHE_SUFFIX}. */
export const BUNDLE_FILE = 'motorprint.cjs';
export const CODE_CACHE_SUFFIX = '.v8cache';
/** The subcommands the bundle serves (see the module comment for the rest). */
export const BUNDLED_SUBCOMMANDS: readonly string[] = ['fit', 'inspect', 'plan', 'show', 'simulate'];

/** The first line of the bundle starts so, then lists the packages' tsc build-info files it was made from. */
export const BUNDLE_HEAD = '// motorprint: bundled by scripts/build.mjs from the tsc output of';

/** The bundle, loaded: its `runCli`, what became of the code cache, and the script (to make a cache). */
export interface BundledCli {
  runCli: typeof RunCli;
  /** `accepted`: V8 used the cache; `rejected`: V8 refused it (another Node or flags); `absent`: no cache file or not asked. */
  codeCache: 'accepted' | 'rejected' | 'absent';
  script: vm.Script;
}

/**
 * Loads `dist/motorprint.cjs` from `distDir` with its code cache. Returns why not instead when there is
 * no bundle, when it does not load, or when it is stale: older than a package's last tsc output
 * (someone ran tsc without `pnpm build`). The caller then imports `runCli.js` as usual.
 *
 * @param distDir - the folder holding the bundle (the compiled `main.js`'s own folder)
 * @param options.useCodeCache - read the code cache (default true; the cache maker passes false)
 */
export function loadBundledCli(distDir: string, options: { useCodeCache?: boolean } = {}): BundledCli | { unused: string } {
  const file = join(distDir, BUNDLE_FILE);
  if (!existsSync(file)) return { unused: `there is no ${file} (pnpm build writes it where esbuild is installed)` };
  const source = readFileSync(file, 'utf8');
  const stale = staleBecause(source, file);
  if (stale !== null) return { unused: stale };
  let cachedData: Buffer | undefined;
  if (options.useCodeCache !== false) {
    try {
      cachedData = readFileSync(file + CODE_CACHE_SUFFIX);
    } catch {
      cachedData = undefined; // no cache: V8 compiles the script as it would any other
    }
  }
  // The CommonJS wrapper, on the script's first line so that line numbers in stack traces are the file's.
  let script: vm.Script;
  const module = { exports: {} as { runCli?: typeof RunCli } };
  try {
    script = new vm.Script(`(function (exports, require, module, __filename, __dirname) {${source}\n})`, {
      filename: file,
      ...(cachedData ? { cachedData } : {}),
    });
    (script.runInThisContext() as (...args: unknown[]) => void)(module.exports, createRequire(file), module, file, dirname(file));
  } catch (error) {
    return { unused: `${file} did not load (${error instanceof Error ? error.message : String(error)})` };
  }
  const runCli = module.exports.runCli;
  if (typeof runCli !== 'function') return { unused: `${file} exports no runCli` };
  return { runCli, codeCache: cachedData === undefined ? 'absent' : script.cachedDataRejected === true ? 'rejected' : 'accepted', script };
}

/**
 * Why the bundle is stale, or null. The build-info files named on its first line are rewritten by tsc
 * whenever it compiles a package; an installed package has none (they are not packed), so there the
 * check passes.
 */
function staleBecause(source: string, file: string): string | null {
  const firstLine = source.slice(0, source.indexOf('\n'));
  if (!firstLine.startsWith(BUNDLE_HEAD)) return `${file} does not start with the build's mark`;
  const made = statSync(file).mtimeMs;
  for (const rel of firstLine.slice(BUNDLE_HEAD.length).trim().split(' ')) {
    if (rel === '') continue;
    let mtime: number;
    try {
      mtime = statSync(join(dirname(file), rel)).mtimeMs;
    } catch {
      continue;
    }
    if (mtime > made) return `${file} is older than ${rel} (run pnpm build)`;
  }
  return null;
}
