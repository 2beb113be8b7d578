#!/usr/bin/env node
/**
 * The `motorprint` executable: wires the process (argv, stdout, stderr, env, exit code) to runCli.
 * This is the only module that touches `process`.
 */
import { runCli } from './runCli.js';

const code = await runCli(process.argv.slice(2), {
  stdout: (t) => process.stdout.write(t),
  stderr: (t) => process.stderr.write(t),
  cwd: process.env.INIT_CWD ?? process.cwd(),
  env: process.env,
  isTty: process.stdout.isTTY === true,
});
process.exitCode = code;
