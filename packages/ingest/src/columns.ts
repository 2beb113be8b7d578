import { IngestError } from './IngestError.js';
import { isUnitToken, lookupUnit, normaliseUnitText, quantityOf, resolveUnit, rolesOfUnit, UNIT_TABLE } from './units.js';
import { CHANNEL_ROLES, SI_UNITS } from './types.js';
import type { ChannelRole, ColumnMeta, IngestIssue, IngestOptions, RecordingLayout, SignalRole, UnitSource } from './types.js';

/** A header split into its name and the unit written with it. */
export interface HeaderParts {
  name: string;
  unit: string | null;
  /** How the unit was written: `[ms]`, `(ms)`, ` / ms` (ISO 80000), or a `_ms` / ` ms` suffix. */
  syntax: 'brackets' | 'parens' | 'slash' | 'suffix' | null;
  /**
   * A second unit found as a suffix of the name part of a bracketed header that disagrees with the
   * bracketed one, e.g. `rpm` in `speed_rpm [rad/s]` (absent when they agree or there is none).
   */
  conflict?: string;
}

/**
 * Reads the trailing tokens of a name (split on `_` and spaces) as a unit: `rad_s` → `rad/s`,
 * `N_m` → `N·m`, `rad_per_s` → `rad/s`, `mA` → `mA`. Two tokens are taken when they read as a unit
 * joined by `/` (any mathjs unit: so `m_s` is a unit, if not a bench one) or by `·` (table units);
 * one token only when it is a bench unit (table alias, or a mathjs unit of a bench quantity), so
 * that `V_in` or `V_m` keep their names.
 */
function splitSuffix(text: string): { name: string; unit: string } | null {
  const tokens = text.split(/[_\s]+/).filter((t) => t !== '');
  if (tokens.length < 2) return null;
  const nameOf = (k: number): string => {
    // The name keeps its original spelling up to where the unit tokens start.
    let cut = text.length;
    for (let j = 0, at = text.length; j < k; j++) {
      at = text.lastIndexOf(tokens[tokens.length - 1 - j]!, at - 1);
      cut = at;
    }
    return text.slice(0, cut).replace(/[_\s]+$/, '');
  };
  const n = tokens.length;
  if (n >= 4 && tokens[n - 2]!.toLowerCase() === 'per') {
    const unit = `${tokens[n - 3]}/${tokens[n - 1]}`;
    if (isUnitToken(unit) || isAnyUnit(unit)) return { name: nameOf(3), unit };
  }
  if (n >= 3) {
    const a = tokens[n - 2]!;
    const b = tokens[n - 1]!;
    if (/^[A-Za-zµμ°]/.test(a) && /^[A-Za-z]/.test(b)) {
      const per = `${a}/${b}`;
      const dot = `${a}·${b}`;
      if (lookupUnit(per).length > 0) return { name: nameOf(2), unit: per };
      if (lookupUnit(dot).length > 0) return { name: nameOf(2), unit: dot };
      if (isUnitToken(per) || isAnyUnit(per)) return { name: nameOf(2), unit: per };
    }
  }
  const last = tokens[n - 1]!;
  // A number is a channel index (`Kanal 1`), never a unit suffix.
  if (!/^\d/.test(last) && isUnitToken(last)) return { name: nameOf(1), unit: last };
  return null;
}

/** True when mathjs reads a `a/b` text as a unit of any dimension (`m/s`, `furlong/s`). */
function isAnyUnit(text: string): boolean {
  // resolveUnit on time tells 'unknown' (not a unit) from 'mismatch' (a unit of another dimension).
  const r = resolveUnit('time', text);
  return !('problem' in r) || r.problem === 'mismatch';
}

/** True when two written units mean the same thing (same table entry, or the same text). */
function sameUnit(a: string, b: string): boolean {
  if (normaliseUnitText(a) === normaliseUnitText(b)) return true;
  const ha = lookupUnit(a);
  const hb = lookupUnit(b);
  return ha.some((x) => hb.some((y) => x.def === y.def));
}

/**
 * Splits `time [ms]`, `t(s)`, `U / V`, `current_mA`, `speed_rad_s`, `motor speed deg_s` into name
 * and unit. A suffix is taken when it reads as a unit (see the README's list of header forms);
 * otherwise the whole text is the name. A bracketed header whose name also ends in a unit
 * (`speed_rad_s (rad/s)`) loses that suffix from its name when the two agree.
 *
 * @example
 * splitHeader('Voltage (mV)')      // => { name: 'Voltage', unit: 'mV', syntax: 'parens' }
 * splitHeader('motor_speed_deg_s') // => { name: 'motor_speed', unit: 'deg/s', syntax: 'suffix' }
 */
export function splitHeader(header: string): HeaderParts {
  const text = header.trim();
  let parts: HeaderParts | null = null;
  let m = /^(.*?)\s*\[([^\]]*)\]\s*$/.exec(text);
  if (m) parts = { name: m[1]!.trim(), unit: m[2]!.trim() || null, syntax: 'brackets' };
  if (!parts) {
    m = /^(.*?)\s*\(([^()]*)\)\s*$/.exec(text);
    if (m && m[1]!.trim() !== '') parts = { name: m[1]!.trim(), unit: m[2]!.trim() || null, syntax: 'parens' };
  }
  if (!parts) {
    m = /^(.*\S)\s+\/\s+(\S+)$/.exec(text);
    if (m) parts = { name: m[1]!.trim(), unit: m[2]!.trim(), syntax: 'slash' };
  }
  if (parts) {
    const inner = parts.unit !== null ? splitSuffix(parts.name) : null;
    if (inner && parts.unit !== null) {
      if (sameUnit(inner.unit, parts.unit)) parts.name = inner.name;
      else if (lookupUnit(inner.unit).length > 0 && lookupUnit(parts.unit).length > 0) parts.conflict = inner.unit;
    }
    return parts;
  }
  const suffix = splitSuffix(text);
  if (suffix) return { name: suffix.name, unit: suffix.unit, syntax: 'suffix' };
  return { name: text, unit: null, syntax: null };
}

/** Whole names (after normalising, compacted) that settle a role. */
const EXACT_NAMES: Readonly<Record<ChannelRole, readonly string[]>> = {
  time: ['t', 'time', 'timestamp', 'elapsed', 'elapsedtime', 'zeit'],
  voltage: ['v', 'u', 'vin', 'vm', 'va', 'ua', 'uin', 'um', 'vmot', 'volt', 'volts', 'voltage', 'vt', 'vterm', 'uterm'],
  supplyVoltage: ['vbus', 'vbat', 'vsup', 'vsupply', 'vdc', 'vcc', 'vs', 'ubus', 'ubat', 'udc', 'usup', 'vbatt', 'vpsu', 'vlink', 'vdclink', 'udclink'],
  commandVoltage: ['vcmd', 'ucmd', 'vref', 'uref', 'vset', 'uset', 'vdac', 'udac', 'dac', 'vdem', 'udem', 'vsoll', 'usoll'],
  duty: ['duty', 'pwm', 'dutycycle', 'pwmduty', 'dutyratio'],
  current: ['i', 'ia', 'im', 'iin', 'iarm', 'imot', 'amps', 'amp', 'current', 'curr', 'cur'],
  speed: ['w', 'wm', 'n', 'omega', 'speed', 'rpm', 'rps', 'vel', 'velocity', 'tach', 'tacho'],
  position: ['theta', 'pos', 'position', 'angle', 'enc', 'encoder', 'counts', 'ticks', 'phi'],
  torque: ['tau', 'torque', 'trq', 'tq'],
  temperature: ['temp', 'temperature', 'tc'],
};

/** Words that settle a quantity anywhere in a longer name (`motor current`, `winding temp`). */
const ROLE_WORDS: Readonly<Partial<Record<ChannelRole, readonly string[]>>> = {
  time: ['time', 'timestamp'],
  voltage: ['voltage', 'volt', 'volts', 'spannung'],
  current: ['current', 'curr', 'strom'],
  speed: ['speed', 'velocity', 'omega', 'rpm', 'drehzahl', 'tach', 'tacho', 'tachometer'],
  position: ['position', 'angle', 'encoder', 'enc', 'pos', 'theta'],
  torque: ['torque', 'trq', 'drehmoment'],
  temperature: ['temp', 'temperature', 'temperatur'],
};

/** Leading symbols that settle a quantity when followed by qualifiers (`v_motor`, `i meas`, `w_shaft`, `n_tach`; n is the European symbol for speed). */
const LEADING_SYMBOLS: Readonly<Record<string, ChannelRole>> = { v: 'voltage', u: 'voltage', i: 'current', w: 'speed', n: 'speed' };

/** Qualifiers: supply side (bus, battery, DC link). */
const SUPPLY_WORDS = new Set(['supply', 'bus', 'battery', 'bat', 'batt', 'dc', 'dclink', 'link', 'mains', 'psu', 'source', 'rail', 'vcc', 'input']);
/** Qualifiers: a command, reference or set-point (what a controller asks for, not what was measured). */
const COMMAND_WORDS = new Set([
  'ref', 'reference', 'setpoint', 'set', 'sp', 'cmd', 'command', 'commanded', 'target', 'demand', 'demanded',
  'desired', 'des', 'soll', 'dac', 'request', 'requested',
]);
/** Qualifiers: the quantity at the motor, as measured. */
const MEASURED_WORDS = new Set(['terminal', 'term', 'measured', 'meas', 'actual', 'act', 'ist', 'feedback', 'fb', 'armature', 'arm', 'motor', 'mot', 'winding']);
/** Qualifiers: PWM duty. */
const DUTY_WORDS = new Set(['duty', 'pwm', 'dutycycle']);
/** Qualifiers: not a measurement of the motor (estimates, model outputs, control errors). */
const NOT_MEASURED = new Map<string, string>([
  ...['est', 'estimate', 'estimated', 'observer', 'obs', 'model', 'sim', 'simulated', 'predicted', 'pred'].map((w) => [w, 'an estimate or model output, not a measurement'] as [string, string]),
  ...['error', 'err', 'deviation'].map((w) => [w, 'a control error, not a measurement'] as [string, string]),
  ...['ambient', 'amb', 'room'].map((w) => [w, "an ambient reading, not the motor's"] as [string, string]),
]);
/** Tokens that mark a standard-deviation (spread) column of a channel. */
const SPREAD_WORDS = new Set(['sd', 'std', 'stdev', 'stddev', 'sigma', 'spread', 'σ']);

/** Names whose role also implies a unit (`rpm`, `enc`). */
const NAME_UNITS: Readonly<Record<string, string>> = { rpm: 'rpm', rps: 'rev/s', enc: 'counts', encoder: 'counts', counts: 'counts', ticks: 'counts' };

/** The role a column name suggests, or why none was given. */
export interface RoleGuess {
  role: ChannelRole | null;
  /** Unit implied by the name itself (`rpm` → rpm, `enc` → counts). */
  impliedUnit?: string;
  /** Why no role was given (absent when `role` is set). */
  why?: string;
  /** For a standard-deviation column (`speed_sd`, `σ speed`): the channel it belongs to. */
  spreadOf?: SignalRole;
  /** The name says the quantity was measured at the motor (`terminal`, `measured`, `actual`…): preferred over a plain name. */
  measured?: boolean;
  /** The roles a name mentions together (`enc_speed`: position and speed); its unit may settle it. */
  several?: ChannelRole[];
}

/** Lower-case tokens of a name: camelCase and letter–digit boundaries split, separators removed. */
function tokensOf(name: string): string[] {
  return name
    .replace(/ω/g, ' omega ')
    .replace(/θ/g, ' theta ')
    .replace(/τ/g, ' tau ')
    .replace(/σ/g, ' sigma ')
    .replace(/([a-z])([A-Z])/g, '$1 $2')
    .replace(/([A-Za-z])(\d)/g, '$1 $2')
    .toLowerCase()
    .replace(/[_\-.:/\\\s,;()[\]]+/g, ' ')
    .trim()
    .split(' ')
    .filter((t) => t !== '');
}

/** The quantity named by tokens, before qualifiers: exact name, a role word, or a leading symbol. */
function baseQuantity(tokens: readonly string[]): { role: ChannelRole | null; implied?: string; exact: boolean; why?: string; several?: ChannelRole[] } {
  const compact = tokens.join('');
  const norm = tokens.join(' ');
  for (const role of CHANNEL_ROLES) {
    if (EXACT_NAMES[role].includes(norm) || EXACT_NAMES[role].includes(compact)) {
      const implied = NAME_UNITS[compact];
      return implied ? { role, implied, exact: true } : { role, exact: true };
    }
  }
  const byWord = CHANNEL_ROLES.filter((role) => tokens.some((t) => ROLE_WORDS[role]?.includes(t)));
  if (byWord.length === 1) return { role: byWord[0]!, exact: false };
  if (byWord.length > 1) return { role: null, exact: false, why: `the name mentions several quantities (${byWord.join(', ')})`, several: byWord };
  // Compact symbols with a qualifier glued on: Vbus, Ucmd, Iact.
  for (const role of ['supplyVoltage', 'commandVoltage'] as const) {
    if (tokens.some((t) => EXACT_NAMES[role].includes(t))) return { role, exact: true };
  }
  const lead = LEADING_SYMBOLS[tokens[0]!];
  if (lead && tokens.length > 1) return { role: lead, exact: false };
  return { role: null, exact: false, why: 'the name matches no known quantity' };
}

/**
 * Guesses a column's role from its name (without the unit). Case-insensitive except the bare
 * symbol `T`, which is ambiguous (time, temperature, torque) and settled by its unit. Voltages are
 * told apart by their qualifiers: supply/bus/battery → `supplyVoltage`; command/reference/set-point/
 * DAC → `commandVoltage`; PWM/duty → `duty`; otherwise (terminal, motor, or nothing) the terminal
 * `voltage`. Set-points of other quantities, estimates and control errors get no role.
 *
 * @example
 * detectRole('Motor current') // => { role: 'current' }
 * detectRole('U_cmd')         // => { role: 'commandVoltage' }
 * detectRole('speed_ref')     // => { role: null, why: 'a speed set-point (command), not a measurement' }
 */
export function detectRole(name: string): RoleGuess {
  if (name.trim() === 'T') return { role: null, why: '"T" may be time, temperature or torque; give its unit or map the role to it' };
  const all = tokensOf(name);
  if (all.length === 0) return { role: null, why: 'the header is empty' };
  if (all.some((t) => SPREAD_WORDS.has(t)) || /\bstandard deviation\b/.test(all.join(' '))) {
    const rest = all.filter((t) => !SPREAD_WORDS.has(t) && t !== 'standard' && t !== 'deviation' && t !== 'of');
    const base = rest.length ? detectRole(rest.join(' ')) : { role: null };
    if (base.role && base.role !== 'time') return { role: null, spreadOf: base.role, why: `the spread (SD) of ${base.role}` };
    return { role: null, why: 'a spread (SD) column of no known quantity' };
  }
  for (const t of all) {
    const reason = NOT_MEASURED.get(t);
    if (reason) return { role: null, why: `the name marks ${reason}` };
  }
  const has = (set: Set<string>): boolean => all.some((t) => set.has(t));
  const measured = has(MEASURED_WORDS);
  const command = has(COMMAND_WORDS);
  const supply = has(SUPPLY_WORDS);
  const duty = has(DUTY_WORDS);
  // Strip qualifier tokens for the quantity, but keep them when they are the whole name (`dac`).
  const core = all.filter((t) => !COMMAND_WORDS.has(t) && !SUPPLY_WORDS.has(t) && !MEASURED_WORDS.has(t));
  const base = baseQuantity(core.length ? core : all);
  let role = base.role;
  if (role === null && base.several !== undefined) return { role: null, why: base.why!, several: base.several };
  if (duty && (role === null || role === 'voltage' || role === 'duty')) return { role: 'duty' };
  if (role === null) {
    if (all.includes('dac')) return { role: 'commandVoltage' };
    if (supply && !command && core.length === 0) return { role: 'supplyVoltage' };
    return { role: null, why: command ? 'the name marks a command of no known quantity' : (base.why ?? 'the name matches no known quantity') };
  }
  if (role === 'voltage' || role === 'supplyVoltage' || role === 'commandVoltage') {
    if (role === 'voltage') role = command ? 'commandVoltage' : supply ? 'supplyVoltage' : 'voltage';
    const out: RoleGuess = { role };
    if (measured && role === 'voltage') out.measured = true;
    return out;
  }
  if (command) return { role: null, why: `the name marks a ${role} set-point (command), not a measurement` };
  if (supply && role === 'current') return { role: null, why: 'a supply-side current, not the armature current' };
  const out: RoleGuess = { role };
  if (base.implied) out.impliedUnit = base.implied;
  if (measured) out.measured = true;
  return out;
}

/** Default units assumed for headers without one, with the severity of the `assumed-unit` issue. */
const DEFAULT_UNITS: Readonly<Record<Exclude<ChannelRole, 'duty'>, { unit: string; severity: 'info' | 'warning' }>> = {
  time: { unit: 's', severity: 'info' },
  voltage: { unit: 'V', severity: 'info' },
  supplyVoltage: { unit: 'V', severity: 'info' },
  commandVoltage: { unit: 'V', severity: 'info' },
  current: { unit: 'A', severity: 'info' },
  temperature: { unit: '°C', severity: 'info' },
  speed: { unit: 'rad/s', severity: 'warning' },
  position: { unit: 'rad', severity: 'warning' },
  torque: { unit: 'N·m', severity: 'warning' },
};

/**
 * Largest magnitude accepted per role, in SI; a cell beyond it drops the row (`out-of-range`).
 * Temperature also has a floor at absolute zero; a duty lies in −1…1 (signed for a bridge).
 */
export const ROLE_LIMITS: Readonly<Record<ChannelRole, { min: number; max: number }>> = {
  time: { min: -1e9, max: 1e9 },
  voltage: { min: -1e5, max: 1e5 },
  supplyVoltage: { min: -1e5, max: 1e5 },
  commandVoltage: { min: -1e5, max: 1e5 },
  duty: { min: -1, max: 1 },
  current: { min: -1e5, max: 1e5 },
  speed: { min: -1e6, max: 1e6 },
  position: { min: -1e12, max: 1e12 },
  torque: { min: -1e6, max: 1e6 },
  temperature: { min: -273.15, max: 1e4 },
};

/** What the head of the file says about its columns. */
export interface HeadColumns {
  /** Header cells (the names row). */
  headers: readonly string[];
  /** 1-based line of the names row. */
  headerLine: number;
  /** Cells of a units row under the names row, or null. */
  unitsRow: readonly string[] | null;
  unitsLine: number | null;
  /** Cells of a short-name row under the units row, or null. */
  shortNames: readonly string[] | null;
  /** Cells of the first body rows (for telling a duty's scale when no unit is written). */
  sampleRows: readonly (readonly string[])[];
  /** Char code of the decimal separator. */
  decimal: number;
}

/** A column plan as the scanner uses it. */
export interface ColumnPlan {
  columns: ColumnMeta[];
  issues: IngestIssue[];
  /** Index of the time column (−1 for a table). */
  timeIndex: number;
  layout: RecordingLayout;
}

function own<T>(record: Readonly<Record<string, T>> | undefined, key: string): T | undefined {
  return record !== undefined && Object.hasOwn(record, key) ? record[key] : undefined;
}

/** Header text normalised for the duplicate check: case, brackets and separators do not count. */
function duplicateKey(header: string): string {
  return header.toLowerCase().replace(/[[\]()_\-.:/\\\s]+/g, ' ').trim();
}

/** The spellings accepted for a role, canonical first (for error messages). */
function knownUnits(role: ChannelRole): string {
  return UNIT_TABLE[quantityOf(role)].map((d) => d.canonical).join(', ');
}

const HEADER_SOURCES: Record<NonNullable<HeaderParts['syntax']>, UnitSource> = {
  brackets: 'header-brackets',
  parens: 'header-parens',
  slash: 'header-slash',
  suffix: 'header-suffix',
};

/** A units-row cell as a unit (surrounding brackets removed; `-` and blanks mean none). */
function unitsRowCell(cell: string | undefined): string | null {
  if (cell === undefined) return null;
  const t = cell.trim().replace(/^\[(.*)\]$/, '$1').replace(/^\((.*)\)$/, '$1').trim();
  return t === '' || t === '-' || t === '—' ? null : t;
}

/**
 * Settles every column's role, unit and SI conversion from the header (and a units row and a
 * short-name row, when the file has them) and the options; settles the layout (`table` when
 * there is no time column but two or more of voltage, current, speed, torque).
 *
 * @throws IngestError `bad-option` for a map entry naming no column, `duplicate-column`,
 *   `ambiguous-role`, `unknown-unit`, `conflicting-units`, `missing-counts-per-revolution`,
 *   `no-time-column`
 */
export function planColumns(head: HeadColumns, options: IngestOptions, file: string): ColumnPlan {
  const { headers, headerLine } = head;
  const issues: IngestIssue[] = [];
  const parts = headers.map((h) => splitHeader(h));
  const trimmed = headers.map((h) => h.trim());
  const shortNames = head.shortNames?.map((s) => s.trim()) ?? null;
  const label = (c: number): string => trimmed[c] || `column ${c + 1}`;

  // Duplicate names: the same text, or the same after case, brackets and separators are set aside.
  const seen = new Map<string, number>();
  for (let c = 0; c < trimmed.length; c++) {
    if (trimmed[c] === '') continue;
    const key = duplicateKey(trimmed[c]!);
    const first = seen.get(key);
    if (first !== undefined) {
      throw new IngestError(
        'duplicate-column',
        file,
        `columns ${first + 1} ("${trimmed[first]}") and ${c + 1} ("${trimmed[c]}") of the header on line ${headerLine} have the same name${trimmed[first] === trimmed[c] ? '' : ' (case, brackets and separators aside)'}; rename one so each column can be told apart`,
        { line: headerLine, column: trimmed[c]! },
      );
    }
    seen.set(key, c);
  }

  const roleOf: (ChannelRole | null)[] = headers.map(() => null);
  const roleSource: ColumnMeta['roleSource'][] = headers.map(() => 'none');
  const whyNot: (string | undefined)[] = headers.map(() => undefined);
  const impliedUnit: (string | undefined)[] = headers.map(() => undefined);
  const spreadOf: (SignalRole | undefined)[] = headers.map(() => undefined);

  // Explicit mapping first.
  const mapped = new Set<number>();
  const map = options.map ?? {};
  for (const role of CHANNEL_ROLES) {
    const target = own<string | number>(map as Record<string, string | number>, role);
    if (target === undefined) continue;
    let index = -1;
    if (typeof target === 'number') {
      index = Number.isInteger(target) && target >= 0 && target < headers.length ? target : -1;
    } else if (typeof target === 'string') {
      const t = target.trim();
      index = trimmed.indexOf(t);
      if (index < 0) index = parts.findIndex((p) => p.name === t);
      if (index < 0) index = trimmed.findIndex((h) => h.toLowerCase() === t.toLowerCase());
      if (index < 0) index = parts.findIndex((p) => p.name.toLowerCase() === t.toLowerCase());
      if (index < 0 && shortNames) index = shortNames.findIndex((s) => s !== '' && s.toLowerCase() === t.toLowerCase());
    }
    if (index < 0) {
      throw new IngestError(
        'bad-option',
        file,
        `the map gives ${role} the column ${JSON.stringify(target)}, but the header (line ${headerLine}) has ${trimmed.map((h) => JSON.stringify(h)).join(', ')}`,
        { line: headerLine, fix: [{ option: 'map' }] },
      );
    }
    if (mapped.has(index)) {
      throw new IngestError('bad-option', file, `the map gives column ${JSON.stringify(label(index))} two roles`, { line: headerLine, fix: [{ option: 'map' }] });
    }
    mapped.add(index);
    roleOf[index] = role;
    roleSource[index] = 'map';
  }

  // Detection for the rest: from the name, then from the short name.
  const guesses: (RoleGuess | null)[] = headers.map(() => null);
  for (let c = 0; c < headers.length; c++) {
    if (mapped.has(c)) continue;
    const p = parts[c]!;
    let guess = detectRole(p.name);
    let source: ColumnMeta['roleSource'] = 'header';
    const unitHere = p.unit ?? unitsRowCell(head.unitsRow?.[c]);
    if (!guess.role && !guess.spreadOf && p.name.trim() === 'T' && unitHere) {
      const roles = rolesOfUnit(unitHere).filter((r) => r === 'time' || r === 'temperature' || r === 'torque');
      if (roles.length === 1) guess = { role: roles[0]! };
    }
    if (!guess.role && guess.several !== undefined && unitHere) {
      // A name that mentions two quantities (`enc_speed_rpm`: encoder and speed) is settled by a
      // unit that belongs to exactly one of them.
      const roles = rolesOfUnit(unitHere).filter((r) => guess.several!.includes(r));
      if (roles.length === 1) guess = { role: roles[0]! };
    }
    if (!guess.role && !guess.spreadOf && shortNames && shortNames[c]) {
      const short = detectRole(shortNames[c]!);
      if (short.role || short.spreadOf) {
        guess = short;
        source = 'short-name';
      }
    }
    if (guess.spreadOf) {
      spreadOf[c] = guess.spreadOf;
      continue;
    }
    if (!guess.role) {
      whyNot[c] = guess.why;
      continue;
    }
    guesses[c] = guess;
    roleOf[c] = guess.role;
    roleSource[c] = source;
    if (guess.impliedUnit) impliedUnit[c] = guess.impliedUnit;
  }

  // One column per role: a mapped column wins; a column the name marks as measured wins over plain
  // ones; otherwise the role is ambiguous.
  const ambiguous: { role: ChannelRole; columns: number[] }[] = [];
  for (const role of CHANNEL_ROLES) {
    const candidates = roleOf.flatMap((r, c) => (r === role ? [c] : []));
    if (candidates.length < 2) continue;
    let winners = candidates.filter((c) => roleSource[c] === 'map');
    if (winners.length === 0) {
      const measured = candidates.filter((c) => guesses[c]?.measured);
      winners = measured.length ? measured : candidates;
    }
    if (winners.length > 1) {
      ambiguous.push({ role, columns: winners });
      continue;
    }
    const winner = winners[0]!;
    for (const c of candidates) {
      if (c === winner) continue;
      roleOf[c] = null;
      roleSource[c] = 'none';
      whyNot[c] = `column "${label(winner)}" gives ${role}${roleSource[winner] === 'map' ? ' (mapped)' : ', and its name marks it as measured at the motor'}`;
      issues.push({
        code: 'duplicate-role',
        severity: 'warning',
        line: headerLine,
        column: label(c),
        message: `Column "${label(c)}" also looks like ${role}; ${whyNot[c]}, so this one is kept in extra (map ${role} to it to choose it instead).`,
        fix: [{ option: 'map', entries: [[role, label(c)]] }],
      });
    }
  }
  if (ambiguous.length > 0) {
    // The map that picks the first candidate of each role (one motor, when a file logs several).
    const pick: [string, string][] = ambiguous.map((a) => [a.role, label(a.columns[0]!)]);
    const list = ambiguous
      .map((a) => `${a.role}: ${a.columns.map((c) => `"${label(c)}" (column ${c + 1})`).join(', ')}`)
      .join('; ');
    throw new IngestError(
      'ambiguous-role',
      file,
      `more than one column could be the same quantity and nothing in their names tells which one to use — ${list}. ` +
        `Map each role to one column; e.g. for the first of each: ${pick.map(([r, h]) => `${r} → "${h}"`).join(', ')}`,
      { line: headerLine, column: label(ambiguous[0]!.columns[1]!), fix: [{ option: 'map', entries: pick }] },
    );
  }

  const columns: ColumnMeta[] = [];
  const taken = new Set(roleOf.filter((r): r is ChannelRole => r !== null));
  for (let c = 0; c < headers.length; c++) {
    const header = trimmed[c]!;
    const p = parts[c]!;
    const role = roleOf[c] ?? null;
    const rowUnit = unitsRowCell(head.unitsRow?.[c]);
    const optionRole = role ?? spreadOf[c];
    const optionUnit = own(options.units, header) ?? own(options.units, p.name) ?? (shortNames?.[c] ? own(options.units, shortNames[c]!) : undefined) ?? (optionRole ? own(options.units, optionRole) : undefined);
    if (p.conflict) {
      throw new IngestError(
        'conflicting-units',
        file,
        `column "${header}" (header line ${headerLine}) carries two different units, "${p.conflict}" in its name and "${p.unit}" in brackets; keep one`,
        { line: headerLine, column: header, fix: [{ option: 'units', entries: [[header, p.unit!]] }] },
      );
    }
    if (p.unit !== null && rowUnit !== null && !sameUnit(p.unit, rowUnit) && optionUnit === undefined) {
      throw new IngestError(
        'conflicting-units',
        file,
        `column "${header}" has the unit "${p.unit}" in its header (line ${headerLine}) but "${rowUnit}" on the units row (line ${head.unitsLine}); correct one of them or give the unit`,
        { line: head.unitsLine ?? headerLine, column: header, fix: [{ option: 'units', entries: [[header, p.unit]] }] },
      );
    }
    const writtenUnit = p.unit ?? rowUnit;
    const writtenSource: UnitSource = p.unit !== null && p.syntax ? HEADER_SOURCES[p.syntax] : rowUnit !== null ? 'units-row' : 'none';
    const base = { index: c, header, name: p.name || `column ${c + 1}` };
    const short = shortNames?.[c] ? { shortName: shortNames[c]! } : {};

    if (role === null) {
      const unit = optionUnit ?? writtenUnit;
      const unitSource: UnitSource = optionUnit !== undefined ? 'option' : writtenSource;
      const sd = spreadOf[c];
      if (sd) {
        const spreadMeta = spreadColumn(base, short, sd, unit, unitSource, head, file, options, issues);
        columns.push(spreadMeta);
        continue;
      }
      const reason = whyNot[c] ?? 'no role';
      columns.push({
        ...base, ...short, role: 'extra', roleSource: 'none', reason, unit, siUnit: null,
        factor: 1, offset: 0, canonicalUnit: null, unitSource: unit === null ? 'none' : unitSource, unitAssumed: false,
      });
      if (header === '') {
        issues.push({
          code: 'unnamed-column', severity: 'info', line: headerLine, column: label(c),
          message: `Column ${c + 1} has no header (a trailing delimiter?); its values, if any, are kept unconverted in recording.extra as "${label(c)}".`,
        });
      } else if (!issues.some((i) => i.code === 'duplicate-role' && i.column === label(c))) {
        const hint = unit ? rolesOfUnit(unit) : [];
        const setPoint = reason.includes('set-point');
        issues.push({
          code: setPoint ? 'set-point-column' : 'unrecognised-column',
          severity: setPoint ? 'info' : 'warning',
          line: headerLine,
          column: label(c),
          message:
            `Column "${label(c)}" is not a measured channel (${reason}); its values are kept unconverted in recording.extra if numeric.` +
            (hint.length && !setPoint ? ` Its unit suggests ${hint.join(' or ')}${taken.has(hint[0]!) ? ' (already given by another column)' : ''}: map ${hint[0]} to it if this is the one.` : ''),
          ...(setPoint ? {} : { fix: [hint.length ? { option: 'map' as const, entries: [[hint[0]!, label(c)]] as [string, string][] } : { option: 'map' as const }] }),
        });
      }
      continue;
    }

    let unit: string;
    let unitSource: UnitSource;
    let assumedReason: string | undefined;
    if (optionUnit !== undefined) {
      unit = optionUnit;
      unitSource = 'option';
      if (writtenUnit !== null && !sameUnit(writtenUnit, optionUnit)) {
        issues.push({
          code: 'unit-overridden', severity: 'info', line: headerLine, column: header,
          message: `Column "${header}" is read in ${optionUnit} (as given), not the ${writtenUnit} written in the ${writtenSource === 'units-row' ? 'units row' : 'header'}.`,
        });
      }
    } else if (writtenUnit !== null) {
      unit = writtenUnit;
      unitSource = writtenSource;
    } else if (impliedUnit[c]) {
      unit = impliedUnit[c]!;
      unitSource = 'name';
    } else if (role === 'duty') {
      const d = dutyDefault(c, head, options);
      if ('error' in d) {
        throw new IngestError('unknown-unit', file, `column "${header}" (header line ${headerLine}) is a PWM duty without a unit, and ${d.error}; write its unit (fraction, %, or counts with the PWM full-scale count)`, {
          line: headerLine, column: header, fix: [{ option: 'units', entries: [[header, '%']] }, { option: 'pwmMax' }],
        });
      }
      unit = d.unit;
      unitSource = 'default';
      assumedReason = d.reason;
      issues.push({
        code: 'assumed-unit', severity: 'warning', line: headerLine, column: header,
        message: `Column "${header}" has no unit; ${d.reason}. Write it in the header (e.g. "${p.name} [%]") or give it.`,
        fix: [{ option: 'units', entries: [[header, d.unit]] }],
      });
    } else {
      const d = DEFAULT_UNITS[role];
      unit = d.unit;
      unitSource = 'default';
      assumedReason = `the header gives no unit; ${role} is assumed in ${d.unit}`;
      issues.push({
        code: 'assumed-unit', severity: d.severity, line: headerLine, column: header,
        message: `Column "${header}" has no unit; ${role} is assumed to be in ${d.unit}. Write it in the header (e.g. "${p.name} [${d.unit}]") or give it.`,
        fix: [{ option: 'units', entries: [[header, d.unit]] }],
      });
    }

    const countsPer = role === 'duty' ? options.pwmMax : options.countsPerRevolution;
    const resolved = resolveUnit(role, unit, countsPer);
    if ('problem' in resolved) {
      if (resolved.problem === 'mismatch' && role !== 'time' && roleSource[c] !== 'map' && unitSource !== 'option') {
        issues.push({
          code: 'unit-mismatch', severity: 'warning', line: headerLine, column: header,
          message: `Column "${header}" is named like ${role} but ${unit} is not a ${role} unit${resolved.otherRoles.length ? ` (it is a ${resolved.otherRoles.join('/')} unit)` : ''}; it is kept unconverted in recording.extra (map the role to it and give its unit to say otherwise).`,
          fix: [{ option: 'map', entries: [[role, header]] }, { option: 'units', entries: [[header, SI_UNITS[role]]] }],
        });
        taken.delete(role);
        columns.push({
          ...base, ...short, role: 'extra', roleSource: 'none', reason: `its unit ${unit} is not a ${role} unit`, unit, siUnit: null,
          factor: 1, offset: 0, canonicalUnit: null, unitSource, unitAssumed: false,
        });
        continue;
      }
      throw new IngestError(
        'unknown-unit',
        file,
        resolved.problem === 'mismatch'
          ? `column "${header}" (header line ${headerLine}) is ${role} but "${unit}" is not a ${role} unit${resolved.otherRoles.length ? ` (it is a ${resolved.otherRoles.join('/')} unit)` : ''}; ${role} units known: ${knownUnits(role)}`
          : `column "${header}" (header line ${headerLine}): unit "${unit}" is not a known ${role} unit; known: ${knownUnits(role)} (and SI-prefixed forms mathjs reads)`,
        { line: unitSource === 'units-row' ? head.unitsLine ?? headerLine : headerLine, column: header, fix: [{ option: 'units', entries: [[header, SI_UNITS[role]]] }] },
      );
    }
    if (resolved.perCount && !(countsPer !== undefined && countsPer > 0 && Number.isFinite(countsPer))) {
      if (role === 'duty') {
        throw new IngestError('missing-pwm-max', file, `column "${header}" is a PWM duty in timer counts; give the full-scale PWM count (duty = count / full scale)`, {
          line: headerLine, column: header, fix: [{ option: 'pwmMax' }],
        });
      }
      throw new IngestError(
        'missing-counts-per-revolution',
        file,
        `column "${header}" is in encoder counts; give the encoder's counts per mechanical revolution (after quadrature)`,
        { line: headerLine, column: header, fix: [{ option: 'countsPerRevolution' }] },
      );
    }
    const gain = role === 'commandVoltage' ? options.driveGain ?? 1 : 1;
    const meta: ColumnMeta = {
      ...base, ...short, role, roleSource: roleSource[c]!, unit: unitSource === 'default' ? null : unit,
      siUnit: SI_UNITS[role], factor: resolved.factor * gain, offset: resolved.offset * gain, canonicalUnit: resolved.canonical,
      unitSource, unitAssumed: unitSource === 'default',
    };
    if (assumedReason) meta.unitAssumedReason = assumedReason;
    columns.push(meta);
  }

  // Spread columns need their channel.
  for (const col of columns) {
    if (col.role === 'spread' && !columns.some((c) => c.role === col.spreadOf)) {
      issues.push({
        code: 'spread-without-channel', severity: 'warning', line: headerLine, column: col.header,
        message: `Column "${col.header}" looks like the spread of ${col.spreadOf}, but no ${col.spreadOf} column was found; it is kept in recording.spread all the same.`,
      });
    }
  }

  const timeIndex = columns.findIndex((c) => c.role === 'time');
  if (timeIndex >= 0) return { columns, issues, timeIndex, layout: 'series' };
  const tableRoles = columns.filter((c) => ['voltage', 'supplyVoltage', 'commandVoltage', 'current', 'speed', 'torque'].includes(c.role));
  const quantities = new Set(tableRoles.map((c) => (c.role === 'supplyVoltage' || c.role === 'commandVoltage' ? 'voltage' : c.role)));
  if (quantities.size >= 2) {
    issues.push({
      code: 'table-layout', severity: 'info', line: headerLine,
      message: `No time column: read as a table of operating points (one row per point, ${tableRoles.map((c) => `"${c.header}"`).join(', ')}); recording.time holds the row order 0, 1, 2, …, not a time.`,
    });
    return { columns, issues, timeIndex: -1, layout: 'table' };
  }
  throw new IngestError(
    'no-time-column',
    file,
    `no time column among ${trimmed.map((h) => JSON.stringify(h)).join(', ')}, and fewer than two of voltage, current, speed, torque for a table of operating points; name one "time [s]" or map the time role to a column`,
    { line: headerLine, fix: [{ option: 'map', entries: [['time', 'COLUMN']] }] },
  );
}

/** A spread (SD) column: converted with its channel's unit factor (no offset: a spread of K is a spread of °C). */
function spreadColumn(
  base: { index: number; header: string; name: string },
  short: { shortName?: string },
  of: SignalRole,
  unit: string | null,
  unitSource: UnitSource,
  head: HeadColumns,
  file: string,
  options: IngestOptions,
  issues: IngestIssue[],
): ColumnMeta {
  let written = unit;
  let source = unitSource;
  let assumed = false;
  if (written === null) {
    if (of === 'duty') written = 'fraction';
    else written = DEFAULT_UNITS[of].unit;
    source = 'default';
    assumed = true;
    issues.push({
      code: 'assumed-unit', severity: 'info', line: head.headerLine, column: base.header,
      message: `Column "${base.header}" (spread of ${of}) has no unit; it is assumed to be in ${written}. Write it in the header or give it.`,
      fix: [{ option: 'units', entries: [[base.header, written]] }],
    });
  }
  const resolved = resolveUnit(of, written, of === 'duty' ? options.pwmMax : options.countsPerRevolution);
  if ('problem' in resolved || !Number.isFinite(resolved.factor)) {
    throw new IngestError('unknown-unit', file, `column "${base.header}" (spread of ${of}, header line ${head.headerLine}): "${written}" is not a ${of} unit; known: ${knownUnits(of)}`, {
      line: head.headerLine, column: base.header, fix: [{ option: 'units', entries: [[base.header, SI_UNITS[of]]] }],
    });
  }
  const meta: ColumnMeta = {
    ...base, ...short, role: 'spread', spreadOf: of, roleSource: 'header', unit: assumed ? null : written, siUnit: SI_UNITS[of],
    factor: resolved.factor, offset: 0, canonicalUnit: resolved.canonical, unitSource: source, unitAssumed: assumed,
  };
  if (assumed) meta.unitAssumedReason = `the header gives no unit; the spread of ${of} is assumed in ${written}`;
  return meta;
}

/** The unit assumed for a duty column without one: counts with a PWM full scale, else from the first rows' values. */
function dutyDefault(c: number, head: HeadColumns, options: IngestOptions): { unit: string; reason: string } | { error: string } {
  if (options.pwmMax !== undefined) return { unit: 'counts', reason: `a PWM full-scale count was given, so the duty is read in counts of ${options.pwmMax}` };
  let max = 0;
  let seen = 0;
  for (const row of head.sampleRows) {
    const cell = row[c];
    if (cell === undefined) continue;
    const s = cell.trim();
    const x = Number(head.decimal === 44 ? s.replaceAll(',', '.') : s);
    if (s === '' || !Number.isFinite(x)) continue;
    seen++;
    max = Math.max(max, Math.abs(x));
  }
  if (seen === 0) return { unit: 'fraction', reason: 'no value in the first rows tells its scale; a fraction 0…1 is assumed' };
  if (max <= 1) return { unit: 'fraction', reason: `the first ${seen} values stay within ±1 (largest ${max}), so a fraction 0…1 is assumed` };
  if (max <= 100) return { unit: '%', reason: `the first ${seen} values exceed 1 but stay within ±100 (largest ${max}), so percent is assumed` };
  return { error: `its first values reach ${max}, beyond percent` };
}
