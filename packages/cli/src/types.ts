/** Version printed by `--version` and written into every parameter set's provenance. */
export const TOOL_VERSION = '0.1.0';

/** Where the command line reads and writes. Injected so tests run the CLI in-process. */
export interface CliIo {
  /** Standard output (results; JSON with --json). */
  stdout: (text: string) => void;
  /** Standard error (progress, warnings, errors). */
  stderr: (text: string) => void;
  /** Directory that relative paths are resolved against. */
  cwd: string;
  /** Environment (NO_COLOR is read from here). */
  env: Record<string, string | undefined>;
  /** Whether stdout is a terminal (colour only then). */
  isTty: boolean;
  /** Whether stderr is a terminal: long jobs then show a progress line there. @default false */
  stderrIsTty?: boolean;
  /** Width of the stderr terminal [characters], when known. @default 80 */
  stderrColumns?: number;
}

/** Process exit codes of the `motorprint` command. */
export const EXIT = {
  /** The job was done. */
  ok: 0,
  /** A data or fit problem: the message names the file, line and column where it applies. */
  dataProblem: 1,
  /** The command line itself was wrong: unknown subcommand, option or value. */
  usage: 2,
} as const;

/** One subcommand: its help text and its action. */
export interface Subcommand {
  /** Name typed after `motorprint`. */
  name: string;
  /** One line shown in the overall help. */
  summary: string;
  /** Full `--help` text (without the cautions, which are appended). */
  help: string;
  /** Runs the subcommand; returns the exit code. */
  run: (args: string[], io: CliIo) => Promise<number>;
}
