import { CAUTIONS } from './cautions.js';
import { inCliTerms } from './cliTerms.js';
import { SUBCOMMANDS } from './commands/index.js';
import { paintFor } from './style.js';
import { EXIT, TOOL_VERSION, type CliIo } from './types.js';
import { UsageError } from './UsageError.js';
import { describeFailure } from './describeFailure.js';

/** The overall help text: what the tool does, the subcommands, exit codes and the cautions. */
export function overallHelp(): string {
  const width = Math.max(...SUBCOMMANDS.map((c) => c.name.length));
  return [
    'motorprint — fit DC-motor constants (R, L, Kt/Ke, J, b) from bench recordings.',
    '',
    'Usage: motorprint <subcommand> [options]    (motorprint <subcommand> --help for details)',
    '',
    'Subcommands:',
    ...SUBCOMMANDS.map((c) => `  ${c.name.padEnd(width)}  ${c.summary}`),
    '',
    'Exit codes: 0 done, 1 data or fit problem, 2 command-line mistake.',
    'Colour is used only on a terminal and never when NO_COLOR is set.',
    '',
    CAUTIONS,
  ].join('\n');
}

/**
 * Runs the `motorprint` command line with the given arguments (without `node` and the script).
 * Never throws: every failure becomes a message on stderr and an exit code.
 *
 * @param argv - arguments after the program name, e.g. `['inspect', 'run1.csv', '--json']`
 * @param io - where to read and write
 * @returns the process exit code (see {@link EXIT})
 */
export async function runCli(argv: string[], rawIo: CliIo): Promise<number> {
  // Whatever a subcommand prints from the libraries is put in command-line terms on the way out.
  const io: CliIo = { ...rawIo, stdout: (t) => rawIo.stdout(inCliTerms(t)), stderr: (t) => rawIo.stderr(inCliTerms(t)) };
  const paint = paintFor(io);
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    const topic = name === 'help' ? rest[0] : undefined;
    const entry = topic === undefined ? undefined : SUBCOMMANDS.find((c) => c.name === topic);
    const sub = entry ? await entry.load() : undefined;
    io.stdout(`${sub ? `${sub.help}\n\n${CAUTIONS}` : overallHelp()}\n`);
    return name === undefined ? EXIT.usage : EXIT.ok;
  }
  if (name === '--version' || name === '-V') {
    io.stdout(`motorprint ${TOOL_VERSION}\n`);
    return EXIT.ok;
  }
  const entry = SUBCOMMANDS.find((c) => c.name === name);
  if (!entry) {
    io.stderr(
      `${paint.error('error:')} unknown subcommand "${name}". Known: ${SUBCOMMANDS.map((c) => c.name).join(', ')}.\n` +
        `Run "motorprint --help" for the list.\n`,
    );
    return EXIT.usage;
  }
  // Only the chosen subcommand's module (and the libraries it needs) is loaded.
  const sub = await entry.load();
  if (rest.includes('--help') || rest.includes('-h')) {
    io.stdout(`${sub.help}\n\n${CAUTIONS}\n`);
    return EXIT.ok;
  }
  try {
    return await sub.run(rest, io);
  } catch (err) {
    if (err instanceof UsageError) {
      io.stderr(`${paint.error('error:')} ${err.message}\nRun "motorprint ${err.subcommand ?? sub.name} --help" for usage.\n`);
      return EXIT.usage;
    }
    io.stderr(`${paint.error('error:')} ${describeFailure(err)}\n`);
    return EXIT.dataProblem;
  }
}
