#!/usr/bin/env node
/**
 * `pnpm build`: compiles every package with `tsc --build tsconfig.build.json` (dependency order, only
 * what changed), then bundles each package's `dist/distributions.js` (the one module that imports
 * stdlib's probability distributions) into a single file with esbuild.
 *
 * Why: each stdlib function is spread over a few hundred small CommonJS modules; resolving and
 * compiling them took about 0.1 s of every process that fits (measured with `node --cpu-prof`:
 * ~410 modules for the t quantile alone). One bundled file loads in a few milliseconds. The code is
 * stdlib's, unchanged (names kept, its Apache-2.0 notices at the end of the file); the source module
 * `src/distributions.ts` still imports the packages, so tests and type checks read stdlib directly.
 *
 * A `dist/distributions.js` that is already a bundle (first line below) is left alone, so running
 * this again after an incremental build that did not touch it costs nothing. Where esbuild is not
 * installed the compiled re-export stays: it works, it only loads more slowly.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const require = createRequire(join(root, 'package.json'));
const MARK = '// motorprint: bundled by scripts/build.mjs';

execFileSync(process.execPath, [require.resolve('typescript/bin/tsc'), '-b', join(root, 'tsconfig.build.json'), ...process.argv.slice(2)], { cwd: root, stdio: 'inherit' });

let esbuild = null;
try {
  esbuild = await import(require.resolve('esbuild'));
} catch {
  console.error('build: esbuild is not installed; dist/distributions.js stays a plain re-export (slower to load, same results)');
}
if (esbuild !== null) {
  for (const dir of readdirSync(join(root, 'packages')).sort()) {
    const file = join(root, 'packages', dir, 'dist', 'distributions.js');
    if (!existsSync(file) || readFileSync(file, 'utf8').startsWith(MARK)) continue;
    const out = await esbuild.build({
      entryPoints: [file],
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
      // stdlib's CommonJS asks for Node built-ins (tty, util) at load: an ES module has no `require`.
      banner: { js: "import { createRequire as __motorprintRequire } from 'node:module'; const require = __motorprintRequire(import.meta.url);" },
    });
    const text = out.outputFiles[0].text;
    // (tsc's source map beside it describes the re-export; the bundle does not point to it.)
    writeFileSync(file, `${MARK} from src/distributions.ts and the stdlib packages it imports (see scripts/build.mjs)\n${text}`);
  }
}
