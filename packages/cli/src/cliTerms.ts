/**
 * The command line's words for what the libraries say in their own terms. Library messages name
 * library options and fields (`options.fix`, `meta.rowsDropped`) or say a thing plainly ("pin R to
 * a known value"); the command line prints them with the option that does it (`--fix R=VALUE`).
 * Kept free of library imports: the error printer of every subcommand uses it.
 */

const CONSTANT = '(R|L|Kt|Ke|J|b|Tc|Ts|c|Vmax|Imax|Rth|Cth)';

/** Each rewrite: what a library writes, and what the command line prints instead. Applied in order. */
export const CLI_REWRITES: readonly (readonly [RegExp, string | ((...groups: string[]) => string)])[] = [
  // Ingest options named in library messages (the `fix` list of an error carries the flags too).
  [/pass options\.map\.(\w+)/g, (_m, role) => `give --map ${cliRoleName(role!)}=COLUMN`],
  [/options\.map\.(\w+)/g, (_m, role) => `--map ${cliRoleName(role!)}=COLUMN`],
  [/options\.units\b/g, '--unit COLUMN=UNIT'],
  [/options\.countsPerRevolution\b/g, '--counts-per-rev N'],
  [/options\.pwmMax\b/g, '--pwm-max N'],
  [/options\.supplyVoltage\b/g, '--supply-voltage V'],
  [/options\.driveGain\b/g, '--drive-gain K'],
  // Fields of the library's recording.
  [/each is listed in meta\.rowsDropped with its line and reason/g, 'each is listed with its line and reason by "motorprint inspect FILE"'],
  [/\bmeta\.rowsDropped\b/g, 'the dropped-row list of "motorprint inspect FILE"'],
  [/kept unconverted in recording\.extra/g, 'kept unconverted as an extra column'],
  [/\brecording\.extra\b/g, 'the extra columns'],
  [/recording\.time holds the row order 0, 1, 2, …, not a time/g, 'the row order 0, 1, 2, … stands in for time'],
  // Fit options.
  [/\boptions\.fix\b/g, '--fix'],
  [/\boptions\.initial\b/g, '--guess'],
  [new RegExp(`\\b${CONSTANT} pinned to a known value`, 'g'), (_m, c) => `${c} pinned to a known value (--fix ${c}=VALUE)`],
  [new RegExp(`\\bpin ${CONSTANT} to a known value`, 'g'), (_m, c) => `pin ${c} to a known value (--fix ${c}=VALUE)`],
  [/\bnor pinned to a known value\b/g, 'nor pinned with --fix'],
  [/\bpin one of them\b/g, 'pin one of them with --fix'],
  [/\bthe raw measured voltage, as asked\b/g, 'the raw measured voltage, as --measured-voltage asks'],
  [/\bfit with the measured voltage\b/g, 'fit with the measured voltage (--measured-voltage)'],
  [/\bFit with Coulomb friction in the model\b/g, 'Fit with Coulomb friction in the model (--model coulomb)'],
  [/\badd Coulomb friction Tc to the model\b/g, 'add Coulomb friction Tc to the model (--model coulomb)'],
  [/\(?fitMotor option coulomb: true\)?/g, '(--model coulomb)'],
  // Report options.
  [/\bno windingTemperature option\b/g, 'no --winding-temp'],
  [/\bno winding temperature given\b/g, 'no --winding-temp given'],
  [/\bgiven by the caller\b/g, 'given on the command line'],
  [/\bfixed by the caller\b/g, 'pinned with --fix'],
];

/**
 * Literal pieces of text, one of which every match of every {@link CLI_REWRITES} pattern contains
 * (the words test checks each pattern holds one outside any optional or alternative part). A text
 * with none of them matches no pattern; searching for them is cheaper than compiling and running
 * one regular expression of all the patterns (≈ 2 ms in a fresh process, for ≈ 160 strings).
 */
export const REWRITE_NEEDLES: readonly string[] = [
  'options.', 'meta.rowsDropped', 'recording.', 'to a known value', 'pin one of them', 'measured voltage',
  'Coulomb friction', 'fitMotor option', 'windingTemperature', 'winding temperature', 'by the caller',
];

/** The command-line spelling of an ingest role (`supplyVoltage` → `supply`). */
function cliRoleName(role: string): string {
  if (role === 'supplyVoltage') return 'supply';
  if (role === 'commandVoltage') return 'command';
  return role;
}

/**
 * A library message in command-line terms: library option and field names become the options and
 * commands that do the same, plain "pin R to a known value" gains its `--fix R=VALUE`.
 *
 * @param text - a message, or a whole printed text
 * @returns the text with every {@link CLI_REWRITES} entry applied
 * @example
 * inCliTerms('a coast-down, or J pinned to a known value'); // => 'a coast-down, or J pinned to a known value (--fix J=VALUE)'
 */
export function inCliTerms(text: string): string {
  // Most texts hold none of the patterns: a text with none of the needles matches none of them (nor
  // can one match after another, as no rewrite has run), and is passed over without 25 passes.
  if (!REWRITE_NEEDLES.some((needle) => text.includes(needle))) return text;
  let out = text;
  for (const [pattern, replacement] of CLI_REWRITES) {
    out = typeof replacement === 'string' ? out.replace(pattern, replacement) : out.replace(pattern, replacement as (...groups: string[]) => string);
  }
  return out;
}

/**
 * A copy of a JSON document with every string in command-line terms ({@link inCliTerms}), except
 * under the keys in `keep` (identification and provenance are the user's own words).
 */
export function documentInCliTerms<T>(doc: T, keep: readonly string[] = ['identification', 'provenance']): T {
  const walk = (v: unknown): unknown => {
    if (typeof v === 'string') return inCliTerms(v);
    if (Array.isArray(v)) return v.map(walk);
    if (v !== null && typeof v === 'object' && !ArrayBuffer.isView(v)) {
      const o: Record<string, unknown> = {};
      for (const [k, x] of Object.entries(v)) o[k] = keep.includes(k) ? x : walk(x);
      return o;
    }
    return v;
  };
  return walk(doc) as T;
}
