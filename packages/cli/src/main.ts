#!/usr/bin/env node
/**
 * The `motorprint` executable: wires the process (argv, stdout, stderr, env, exit code) to runCli.
 * This is the only module that touches `process`.
 */
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { BUNDLED_SUBCOMMANDS, loadBundledCli } from './bundledCli.js';

const argv = process.argv.slice(2);
// A subcommand that does work runs from the bundle with its code cache where the build made one
// (bundledCli.ts says why and when not); everything else, and any failure to load it, from the modules.
const bundled = !BUNDLED_SUBCOMMANDS.includes(argv[0] ?? '')
  ? { unused: 'not a bundled subcommand' }
  : process.env.MOTORPRINT_PLAIN_MODULES
    ? { unused: 'MOTORPRINT_PLAIN_MODULES is set' }
    : loadBundledCli(dirname(fileURLToPath(import.meta.url)));
if (process.env.MOTORPRINT_SHOW_LOADING) {
  process.stderr.write(`motorprint: ${'runCli' in bundled ? `the bundle, code cache ${bundled.codeCache}` : `the modules: ${bundled.unused}`}\n`);
}
const runCli = 'runCli' in bundled ? bundled.runCli : (await import('./runCli.js')).runCli;

// Through this repository's own scripts (`pnpm motorprint …`, which pnpm runs in the workspace root),
// relative paths are taken from where the command was typed (INIT_CWD). Installed, the command takes
// them from its working directory, also inside another package's npm scripts.
const viaWorkspaceScript = process.env.npm_package_name === 'motorprint-workspace' && process.env.INIT_CWD !== undefined;

const code = await runCli(argv, {
  stdout: (t) => process.stdout.write(t),
  stderr: (t) => process.stderr.write(t),
  cwd: viaWorkspaceScript ? process.env.INIT_CWD! : process.cwd(),
  env: process.env,
  isTty: process.stdout.isTTY === true,
  stderrIsTty: process.stderr.isTTY === true,
  stderrColumns: process.stderr.columns,
});
process.exitCode = code;
