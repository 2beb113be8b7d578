/**
 * `@motorprint/cli`: the `motorprint` command line, runnable in-process for tests and scripts.
 * @packageDocumentation
 */
export { runCli, overallHelp } from './runCli.js';
export { EXIT } from './types.js';
export type { CliIo, Subcommand } from './types.js';
export { CAUTIONS } from './cautions.js';
export { readParamsFile, PARAM_KEYS } from './readParamsFile.js';
