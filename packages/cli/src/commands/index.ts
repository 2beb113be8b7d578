import type { Subcommand } from '../types.js';

/**
 * One entry of the subcommand list: what the overall help needs (name and summary) without the
 * module that does the work. `load` imports that module on demand, so `motorprint --help` and a
 * subcommand do not pay for the libraries the others use (mathjs through ingest, the estimator,
 * the report writers). Each summary is checked against its module's own in the tests.
 */
export interface SubcommandEntry {
  /** Name typed after `motorprint`. */
  name: string;
  /** One line shown in the overall help (the same text as the loaded subcommand's `summary`). */
  summary: string;
  /** Imports the subcommand's module and returns the subcommand. */
  load: () => Promise<Subcommand>;
}

/** Every subcommand, in the order the overall help lists them. */
export const SUBCOMMANDS: readonly SubcommandEntry[] = [
  {
    name: 'fit',
    summary: 'fit R, L, Kt/Ke, J, b (and the friction, limit and heating terms the data support), with intervals',
    load: async () => (await import('./fit.js')).fitCommand,
  },
  {
    name: 'inspect',
    summary: 'show what was read from bench recordings (columns, units, dropped rows, sampling, kind)',
    load: async () => (await import('./inspect.js')).inspectCommand,
  },
  {
    name: 'lot',
    summary: 'judge a lot of motors (one folder each) against a spec, with lot statistics and a SQLite store',
    load: async () => (await import('./lot.js')).lotCommand,
  },
  {
    name: 'plan',
    summary: 'predict the standard errors of planned bench runs, suggest changes, and give the locked-rotor time budget',
    load: async () => (await import('./plan.js')).planCommand,
  },
  {
    name: 'show',
    summary: 'print a parameter set written by "fit --out" (text, Markdown, CSV or JSON)',
    load: async () => (await import('./show.js')).showCommand,
  },
  {
    name: 'simulate',
    summary: 'write an invented bench recording of a motor with known constants',
    load: async () => (await import('./simulate.js')).simulateCommand,
  },
];
