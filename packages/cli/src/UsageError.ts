/** A mistake on the command line (exit code 2). The message says what to type instead. */
export class UsageError extends Error {
  override name = 'UsageError';
  /** Subcommand whose usage was wrong, for the "see --help" hint. */
  readonly subcommand: string | undefined;
  constructor(message: string, subcommand?: string) {
    super(message);
    this.subcommand = subcommand;
  }
}
