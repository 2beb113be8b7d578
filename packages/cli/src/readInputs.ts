import { resolve } from 'node:path';
import { readRecording, type ChannelRole, type IngestOptions, type IngestResult } from '@motorprint/ingest';
import { keyValuePairs, numberOption } from './args.js';
import { UsageError } from './UsageError.js';

/** Roles a `--map ROLE=COLUMN` may name. */
export const ROLES: readonly ChannelRole[] = ['time', 'voltage', 'current', 'speed', 'position', 'torque', 'temperature'];

/** Help lines for the ingest options shared by `inspect` and `fit`. */
export const INGEST_OPTION_HELP = `  --map ROLE=COLUMN     use COLUMN (header text or 0-based index) for ROLE, overriding detection;
                        ROLE is one of ${ROLES.join(', ')}; repeat as needed
  --unit COLUMN=UNIT    unit for a column whose header has none (or overrides it), e.g.
                        --unit "Ia=mA"; repeat as needed
  --counts-per-rev N    encoder counts per revolution, for a position column in counts`;

/** The parseArgs table of the shared ingest options. */
export const INGEST_OPTIONS = {
  map: { type: 'string', multiple: true },
  unit: { type: 'string', multiple: true },
  'counts-per-rev': { type: 'string' },
} as const;

/** Turns `--map`, `--unit` and `--counts-per-rev` into ingest options; UsageError on mistakes. */
export function ingestOptionsFrom(
  subcommand: string,
  values: { map?: string[] | undefined; unit?: string[] | undefined; 'counts-per-rev'?: string | undefined },
): IngestOptions {
  const options: IngestOptions = {};
  const map: Partial<Record<ChannelRole, string | number>> = {};
  for (const [role, column] of keyValuePairs(subcommand, 'map', values.map)) {
    if (!(ROLES as readonly string[]).includes(role)) {
      throw new UsageError(`--map: unknown role "${role}"; roles are ${ROLES.join(', ')}`, subcommand);
    }
    map[role as ChannelRole] = /^\d+$/.test(column) ? Number(column) : column;
  }
  if (Object.keys(map).length > 0) options.map = map;
  const units = keyValuePairs(subcommand, 'unit', values.unit);
  if (units.length > 0) options.units = Object.fromEntries(units);
  const cpr = numberOption(subcommand, 'counts-per-rev', values['counts-per-rev'], (x) => x > 0, 'a number > 0');
  if (cpr !== undefined) options.countsPerRevolution = cpr;
  return options;
}

/** Reads one recording relative to the working directory, naming it as the user typed it. */
export function readInput(cwd: string, file: string, options: IngestOptions): Promise<IngestResult> {
  return readRecording(resolve(cwd, file), { ...options, fileName: file });
}
