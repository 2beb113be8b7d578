#!/usr/bin/env node
/**
 * `pnpm build`: assembles the WebAssembly kernels (scripts/assemble-kernels.mjs), compiles every package with `tsc --build tsconfig.build.json` (dependency order, only
 * what changed; extra arguments such as `--force` go to tsc), then bundles the few modules that
 * import third-party CommonJS libraries (VENDOR below) into one ES module each, with esbuild, and
 * last the command line into one script with its V8 code cache (scripts/make-code-cache.mjs; see
 * packages/cli/src/bundledCli.ts).
 *
 * Why: Node loads CommonJS from an ES module through its loader and an export scan of every file.
 * stdlib spreads each distribution function over a few hundred small files (~430 for the four we use:
 * ≈ 0.1 s of every process that fits, measured with `node --cpu-prof`); ml-matrix with
 * ml-levenberg-marquardt took ≈ 45 ms and papaparse ≈ 18 ms. Bundled, they load in ≈ 25, 12 and 6 ms.
 * The code is the libraries' own, unchanged (names kept, their license notices at the end of each
 * file); the source modules still import the packages, so tests and type checks read them directly.
 *
 * Each bundle is made from the source module (src/NAME.ts) on every build, over tsc's compiled
 * re-export, so it always holds the library versions installed now (an upgrade needs no --force);
 * the file is written only when it changes. Where esbuild is not installed the compiled re-exports
 * stay: they work, they only load more slowly.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const require = createRequire(join(root, 'package.json'));
const MARK = '// motorprint: bundled by scripts/build.mjs';

/** The compiled modules that are bundled (package folder, module), each the only importer of its libraries. */
const VENDOR = [
  ['estimate', 'distributions'], // @stdlib/stats-base-dists-{t-quantile,f-cdf,chisquare-cdf,normal-cdf}
  ['estimate', 'matrices'], // ml-matrix, ml-levenberg-marquardt
  ['ingest', 'csvParser'], // papaparse
];

// WebAssembly kernels: NAME.wat → NAME.wasm.ts (written only when it changes).
execFileSync(process.execPath, [join(root, 'scripts', 'assemble-kernels.mjs')], { cwd: root, stdio: 'inherit' });

execFileSync(process.execPath, [require.resolve('typescript/bin/tsc'), '-b', join(root, 'tsconfig.build.json'), ...process.argv.slice(2)], { cwd: root, stdio: 'inherit' });

let esbuild = null;
try {
  esbuild = await import(require.resolve('esbuild'));
} catch {
  console.error('build: esbuild is not installed; the vendor modules stay plain re-exports (slower to load, same results)');
}
if (esbuild !== null) {
  for (const [dir, name] of VENDOR) {
    const source = join(root, 'packages', dir, 'src', `${name}.ts`);
    const file = join(root, 'packages', dir, 'dist', `${name}.js`);
    if (!existsSync(source)) throw new Error(`build: ${source} is missing (update VENDOR in scripts/build.mjs)`);
    const out = await esbuild.build({
      entryPoints: [source],
      absWorkingDir: join(root, 'packages', dir),
      bundle: true,
      format: 'esm',
      platform: 'node',
      target: 'node20',
      minify: true,
      keepNames: true,
      legalComments: 'eof',
      write: false,
      logLevel: 'warning',
      // CommonJS inside may ask for Node built-ins (stdlib: tty, util) at load: an ES module has no `require`.
      banner: { js: "import { createRequire as __motorprintRequire } from 'node:module'; const require = __motorprintRequire(import.meta.url);" },
    });
    // (tsc's source map beside it describes the re-export; the bundle does not point to it.)
    const text = `${MARK} from src/${name}.ts and the libraries it imports (see scripts/build.mjs)\n${out.outputFiles[0].text}`;
    if (!existsSync(file) || readFileSync(file, 'utf8') !== text) writeFileSync(file, text);
  }
}

// The command line's bundle and its V8 code cache (packages/cli/src/bundledCli.ts says why and how
// they are used). Without esbuild there is no bundle and the command line runs from the modules.
const cliDist = join(root, 'packages', 'cli', 'dist');
const { BUNDLE_FILE, BUNDLE_HEAD, CODE_CACHE_SUFFIX } = await import(pathToFileURL(join(cliDist, 'bundledCli.js')).href);
const bundleFile = join(cliDist, BUNDLE_FILE);
const cacheFile = bundleFile + CODE_CACHE_SUFFIX;
if (esbuild === null) {
  rmSync(bundleFile, { force: true });
  rmSync(cacheFile, { force: true });
} else {
  const lotCommand = join(cliDist, 'commands', 'lot.js');
  const out = await esbuild.build({
    entryPoints: [join(cliDist, 'runCli.js')],
    absWorkingDir: root,
    bundle: true,
    format: 'cjs',
    platform: 'node',
    target: 'node20',
    write: false,
    metafile: true,
    logLevel: 'warning',
    // mathjs is large and loaded only for unusual units (ingest's units.ts, through require): the cli
    // package depends on it so that it resolves from the bundle's folder.
    external: ['mathjs'],
    // import.meta.url serves createRequire (mathjs, Node built-ins): the bundle's own URL does.
    define: { 'import.meta.url': '__motorprintBundleUrl' },
    plugins: [{
      // `lot` runs from the modules (its worker threads load them anyway) and main.js never hands it to
      // the bundle: the bundle holds, in its place, a module that says so if it is ever reached.
      name: 'lot-runs-from-the-modules',
      setup(build) {
        build.onResolve({ filter: /lot\.js$/ }, (args) =>
          resolve(args.resolveDir, args.path) === lotCommand ? { path: 'lot', namespace: 'not-in-the-bundle' } : undefined);
        build.onLoad({ filter: /.*/, namespace: 'not-in-the-bundle' }, () => ({
          contents: "throw new Error('motorprint: the lot subcommand is not in the bundle; main.js runs it from the modules');",
          loader: 'js',
        }));
      },
    }],
  });
  // The packages' tsc build-info files: a bundle older than any of them is stale and not used.
  const buildInfo = [...new Set(Object.keys(out.metafile.inputs).map((f) => f.match(/^(packages\/[^/]+)\/dist\//)?.[1]).filter(Boolean))]
    .map((pkg) => relative(cliDist, join(root, pkg, 'dist', 'tsconfig.build.tsbuildinfo')))
    .sort();
  const head = `${BUNDLE_HEAD} ${buildInfo.join(' ')}`;
  const text = `${head}\nvar __motorprintBundleUrl = require('node:url').pathToFileURL(__filename).href;\n${out.outputFiles[0].text}`;
  // A script compiled from a code cache cannot import() (Node 20 loses its import callback), and the
  // bundle's only dynamic imports were the subcommands, which esbuild inlines.
  const dynamicImport = text.match(/.{0,60}[^\w$.]import\(.{0,60}/);
  if (dynamicImport) throw new Error(`build: the command line's bundle would contain a dynamic import(): ${dynamicImport[0]}`);
  const changed = !existsSync(bundleFile) || readFileSync(bundleFile, 'utf8') !== text;
  writeFileSync(bundleFile, text); // also when unchanged: it must be newer than tsc's output
  if (changed) rmSync(cacheFile, { force: true });
  execFileSync(process.execPath, [join(root, 'scripts', 'make-code-cache.mjs')], { cwd: root, stdio: 'inherit' });
}
