import type { Subcommand } from '../types.js';
import { fitCommand } from './fit.js';
import { inspectCommand } from './inspect.js';
import { lotCommand } from './lot.js';
import { showCommand } from './show.js';
import { simulateCommand } from './simulate.js';

/** Every subcommand, in the order the overall help lists them. */
export const SUBCOMMANDS: readonly Subcommand[] = [fitCommand, inspectCommand, lotCommand, showCommand, simulateCommand];
