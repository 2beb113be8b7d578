import type { CliIo } from './types.js';

/** Text styling that honours NO_COLOR (https://no-color.org) and only colours a terminal. */
export interface Paint {
  bold: (s: string) => string;
  dim: (s: string) => string;
  warn: (s: string) => string;
  error: (s: string) => string;
  good: (s: string) => string;
}

/** Returns ANSI painters when colour is allowed for this output, identity functions otherwise. */
export function paintFor(io: CliIo): Paint {
  const noColor = io.env.NO_COLOR !== undefined && io.env.NO_COLOR !== '';
  const on = io.isTty && !noColor;
  const wrap = (open: number, close: number) => (s: string) => (on ? `\u001b[${open}m${s}\u001b[${close}m` : s);
  return { bold: wrap(1, 22), dim: wrap(2, 22), warn: wrap(33, 39), error: wrap(31, 39), good: wrap(32, 39) };
}
