#!/usr/bin/env node
/**
 * The `motorprint` executable: wires the process (argv, stdout, stderr, env, exit code) to runCli.
 * This is the only module that touches `process`.
 */
import { runCli } from './runCli.js';

// Through this repository's own scripts (`pnpm motorprint …`, which pnpm runs in the workspace root),
// relative paths are taken from where the command was typed (INIT_CWD). Installed, the command takes
// them from its working directory, also inside another package's npm scripts.
const viaWorkspaceScript = process.env.npm_package_name === 'motorprint-workspace' && process.env.INIT_CWD !== undefined;

const code = await runCli(process.argv.slice(2), {
  stdout: (t) => process.stdout.write(t),
  stderr: (t) => process.stderr.write(t),
  cwd: viaWorkspaceScript ? process.env.INIT_CWD! : process.cwd(),
  env: process.env,
  isTty: process.stdout.isTTY === true,
  stderrIsTty: process.stderr.isTTY === true,
  stderrColumns: process.stderr.columns,
});
process.exitCode = code;
