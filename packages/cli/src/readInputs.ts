import { resolve } from 'node:path';
import { readRecording, type ChannelRole, type IngestOptions, type IngestResult } from '@motorprint/ingest';
import { keyValuePairs, numberOption } from './args.js';
import { UsageError } from './UsageError.js';
export { cliRole, fixFlags } from './ingestFixFlags.js';

/**
 * Role names a `--map ROLE=COLUMN` may use, and the ingest role each one means. `voltage` (or
 * `terminal`) is the voltage at the motor's terminals; `supply` the bus, battery or supply voltage;
 * `command` the voltage command / reference / DAC output; `duty` a PWM duty cycle.
 */
export const CLI_ROLES: Readonly<Record<string, ChannelRole>> = {
  time: 'time',
  voltage: 'voltage',
  terminal: 'voltage',
  supply: 'supplyVoltage',
  command: 'commandVoltage',
  duty: 'duty',
  current: 'current',
  speed: 'speed',
  position: 'position',
  torque: 'torque',
  temperature: 'temperature',
};

/** Synopsis words of the ingest options shared by `inspect`, `fit` and `lot`. */
export const INGEST_OPTION_SYNOPSIS = '[--map ROLE=COLUMN] [--unit COLUMN=UNIT] [--counts-per-rev N] [--drive-gain K] [--supply-voltage V] [--pwm-max N]';

/** Help lines for the ingest options shared by `inspect`, `fit` and `lot`. */
export const INGEST_OPTION_HELP = `  --map ROLE=COLUMN     use COLUMN (header text or 0-based index) for ROLE, overriding detection;
                        ROLE is time, voltage (= terminal: measured at the motor), supply (bus,
                        battery or supply voltage), command (voltage command, reference, set-point
                        or DAC output), duty (PWM duty), current, speed, position, torque or
                        temperature; repeat as needed (e.g. to pick one motor of several)
  --unit COLUMN=UNIT    unit for a column whose header has none (or overrides it), e.g.
                        --unit "Ia=mA"; repeat as needed
  --counts-per-rev N    encoder counts per revolution, for a position column in counts
  --drive-gain K        the drive puts K × command on the motor (default 1): the command column
                        is multiplied by K
  --supply-voltage V    supply of a PWM bridge [V]: a duty column becomes a command voltage
                        duty × V (a logged supply column is used instead when there is one)
  --pwm-max N           full-scale PWM count, for a duty logged in timer counts`;

/** The parseArgs table of the shared ingest options. */
export const INGEST_OPTIONS = {
  map: { type: 'string', multiple: true },
  unit: { type: 'string', multiple: true },
  'counts-per-rev': { type: 'string' },
  'drive-gain': { type: 'string' },
  'supply-voltage': { type: 'string' },
  'pwm-max': { type: 'string' },
} as const;

/** Turns the shared ingest options into ingest options; UsageError on mistakes. */
export function ingestOptionsFrom(
  subcommand: string,
  values: {
    map?: string[] | undefined;
    unit?: string[] | undefined;
    'counts-per-rev'?: string | undefined;
    'drive-gain'?: string | undefined;
    'supply-voltage'?: string | undefined;
    'pwm-max'?: string | undefined;
  },
): IngestOptions {
  const options: IngestOptions = {};
  const map: Partial<Record<ChannelRole, string | number>> = {};
  for (const [name, column] of keyValuePairs(subcommand, 'map', values.map)) {
    const role = Object.hasOwn(CLI_ROLES, name) ? CLI_ROLES[name] : undefined;
    if (role === undefined) {
      throw new UsageError(`--map: unknown role "${name}"; roles are ${Object.keys(CLI_ROLES).join(', ')}`, subcommand);
    }
    if (map[role] !== undefined) throw new UsageError(`--map gives ${name} twice`, subcommand);
    map[role] = /^\d+$/.test(column) ? Number(column) : column;
  }
  if (Object.keys(map).length > 0) options.map = map;
  const units = keyValuePairs(subcommand, 'unit', values.unit);
  if (units.length > 0) {
    // A role spelled the command-line way also names the ingest role (a column may be called so too).
    const entries = units.flatMap(([key, unit]): [string, string][] =>
      Object.hasOwn(CLI_ROLES, key) && CLI_ROLES[key] !== key ? [[key, unit], [CLI_ROLES[key]!, unit]] : [[key, unit]],
    );
    options.units = Object.fromEntries(entries);
  }
  const cpr = numberOption(subcommand, 'counts-per-rev', values['counts-per-rev'], (x) => x > 0, 'a number > 0');
  if (cpr !== undefined) options.countsPerRevolution = cpr;
  const gain = numberOption(subcommand, 'drive-gain', values['drive-gain'], (x) => x !== 0, 'a number other than 0');
  if (gain !== undefined) options.driveGain = gain;
  const supply = numberOption(subcommand, 'supply-voltage', values['supply-voltage'], (x) => x > 0, 'a voltage > 0');
  if (supply !== undefined) options.supplyVoltage = supply;
  const pwmMax = numberOption(subcommand, 'pwm-max', values['pwm-max'], (x) => x > 0, 'a count > 0');
  if (pwmMax !== undefined) options.pwmMax = pwmMax;
  return options;
}



/** Reads one recording relative to the working directory, naming it as the user typed it. */
export function readInput(cwd: string, file: string, options: IngestOptions): Promise<IngestResult> {
  return readRecording(resolve(cwd, file), { ...options, fileName: file });
}
