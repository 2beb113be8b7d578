import { IngestError } from './IngestError.js';
import { lookupUnit, resolveUnit, rolesOfUnit } from './units.js';
import { CHANNEL_ROLES, SI_UNITS } from './types.js';
import type { ChannelRole, ColumnMeta, IngestIssue, IngestOptions, UnitSource } from './types.js';

/** A header split into its name and the unit written with it. */
export interface HeaderParts {
  name: string;
  unit: string | null;
  /** How the unit was written: `[ms]`, `(ms)`, ` / ms` (ISO 80000), or a bare `_ms` suffix. */
  syntax: 'brackets' | 'parens' | 'slash' | 'suffix' | null;
}

/**
 * Splits `time [ms]`, `t(s)`, `U / V` into name and unit. Bare suffixes (`current_mA`) are taken
 * only when the part before `_` names a role and the suffix is a unit alias of that role
 * (see {@link detectRole}); otherwise the whole text is the name.
 *
 * @example
 * splitHeader('Voltage (mV)') // => { name: 'Voltage', unit: 'mV', syntax: 'parens' }
 * splitHeader('current_mA')   // => { name: 'current', unit: 'mA', syntax: 'suffix' }
 */
export function splitHeader(header: string): HeaderParts {
  const text = header.trim();
  let m = /^(.*?)\s*\[([^\]]*)\]\s*$/.exec(text);
  if (m) return { name: m[1]!.trim(), unit: m[2]!.trim() || null, syntax: 'brackets' };
  m = /^(.*?)\s*\(([^()]*)\)\s*$/.exec(text);
  if (m && m[1]!.trim() !== '') return { name: m[1]!.trim(), unit: m[2]!.trim() || null, syntax: 'parens' };
  m = /^(.*\S)\s+\/\s+(\S+)$/.exec(text);
  if (m) return { name: m[1]!.trim(), unit: m[2]!.trim(), syntax: 'slash' };
  m = /^(.+)_([^_\s]+)$/.exec(text);
  if (m) {
    const prefix = detectRole(m[1]!);
    if (prefix.role && lookupUnit(m[2]!).some((h) => h.role === prefix.role)) {
      return { name: m[1]!, unit: m[2]!, syntax: 'suffix' };
    }
  }
  return { name: text, unit: null, syntax: null };
}

/** Whole names (after normalising) that settle a role. */
const EXACT_NAMES: Readonly<Record<ChannelRole, readonly string[]>> = {
  time: ['t', 'time', 'timestamp', 'time stamp', 'elapsed', 'elapsed time', 'zeit'],
  voltage: ['v', 'u', 'vin', 'vm', 'va', 'ua', 'uin', 'um', 'vbat', 'vmot', 'vsup', 'vsupply', 'volt', 'volts', 'voltage'],
  current: ['i', 'ia', 'im', 'iin', 'iarm', 'imot', 'ibat', 'amps', 'amp', 'current', 'curr', 'cur'],
  speed: ['w', 'wm', 'n', 'omega', 'speed', 'rpm', 'rps', 'vel', 'velocity', 'tach', 'tacho'],
  position: ['theta', 'pos', 'position', 'angle', 'enc', 'encoder', 'counts', 'ticks', 'phi'],
  torque: ['tau', 'torque', 'trq', 'tq'],
  temperature: ['temp', 'temperature', 'tc'],
};

/** Words that settle a role anywhere in a longer name (`motor current`, `winding temp`). */
const ROLE_WORDS: Readonly<Record<ChannelRole, readonly string[]>> = {
  time: ['time', 'timestamp'],
  voltage: ['voltage', 'volt', 'volts', 'spannung'],
  current: ['current', 'curr', 'strom'],
  speed: ['speed', 'velocity', 'omega', 'rpm', 'drehzahl', 'tach', 'tacho', 'tachometer'],
  position: ['position', 'angle', 'encoder', 'enc', 'pos', 'theta'],
  torque: ['torque', 'trq', 'drehmoment'],
  temperature: ['temp', 'temperature', 'temperatur'],
};

/** Leading symbols that settle a role when followed by qualifiers (`v_motor`, `i meas`, `w_shaft`, `n_tach`; n is the European symbol for speed). */
const LEADING_SYMBOLS: Readonly<Record<string, ChannelRole>> = { v: 'voltage', u: 'voltage', i: 'current', w: 'speed', n: 'speed' };

/** Words that mark a command or reference rather than a measurement: such columns are not given a role. */
const NOT_MEASURED = new Set([
  'ref', 'reference', 'setpoint', 'set', 'sp', 'cmd', 'command', 'commanded', 'target', 'demand',
  'desired', 'des', 'soll', 'error', 'err', 'pwm', 'duty',
]);

/** Names whose role also implies a unit (`rpm`, `enc`). */
const NAME_UNITS: Readonly<Record<string, string>> = { rpm: 'rpm', rps: 'rev/s', enc: 'counts', encoder: 'counts', counts: 'counts', ticks: 'counts' };

/** The role a column name suggests, or why none was given. */
export interface RoleGuess {
  role: ChannelRole | null;
  /** Unit implied by the name itself (`rpm` → rpm, `enc` → counts). */
  impliedUnit?: string;
  /** Why no role was given (absent when `role` is set). */
  why?: string;
}

function normaliseName(name: string): string {
  return name
    .replace(/ω/g, ' omega ')
    .replace(/θ/g, ' theta ')
    .replace(/τ/g, ' tau ')
    .toLowerCase()
    .replace(/[_\-.:/\\\s]+/g, ' ')
    .trim();
}

/**
 * Guesses a column's role from its name (without the unit). Case-insensitive except the bare
 * symbol `T`, which is ambiguous (time, temperature, torque) and settled by its unit.
 *
 * @example
 * detectRole('Motor current') // => { role: 'current' }
 * detectRole('speed_ref')     // => { role: null, why: '…a command or reference…' }
 */
export function detectRole(name: string): RoleGuess {
  if (name.trim() === 'T') return { role: null, why: '"T" may be time, temperature or torque; give a unit or options.map' };
  const norm = normaliseName(name);
  if (norm === '') return { role: null, why: 'the header is empty' };
  const tokens = norm.split(' ');
  if (tokens.some((t) => NOT_MEASURED.has(t))) {
    return { role: null, why: 'the name marks a command or reference, not a measurement' };
  }
  const compact = tokens.join('');
  for (const role of CHANNEL_ROLES) {
    if (EXACT_NAMES[role].includes(norm) || EXACT_NAMES[role].includes(compact)) {
      const implied = NAME_UNITS[compact];
      return implied ? { role, impliedUnit: implied } : { role };
    }
  }
  const byWord = CHANNEL_ROLES.filter((role) => tokens.some((t) => ROLE_WORDS[role].includes(t)));
  if (byWord.length === 1) return { role: byWord[0]! };
  if (byWord.length > 1) return { role: null, why: `the name mentions several quantities (${byWord.join(', ')})` };
  const lead = LEADING_SYMBOLS[tokens[0]!];
  if (lead && tokens.length > 1) return { role: lead };
  return { role: null, why: 'the name matches no known quantity' };
}

/** Default units assumed for headers without one, with the severity of the `assumed-unit` issue. */
const DEFAULT_UNITS: Readonly<Record<ChannelRole, { unit: string; severity: 'info' | 'warning' }>> = {
  time: { unit: 's', severity: 'info' },
  voltage: { unit: 'V', severity: 'info' },
  current: { unit: 'A', severity: 'info' },
  temperature: { unit: '°C', severity: 'info' },
  speed: { unit: 'rad/s', severity: 'warning' },
  position: { unit: 'rad', severity: 'warning' },
  torque: { unit: 'N·m', severity: 'warning' },
};

/**
 * Largest magnitude accepted per role, in SI; a cell beyond it drops the row (`out-of-range`).
 * Temperature also has a floor at absolute zero.
 */
export const ROLE_LIMITS: Readonly<Record<ChannelRole, { min: number; max: number }>> = {
  time: { min: -1e9, max: 1e9 },
  voltage: { min: -1e5, max: 1e5 },
  current: { min: -1e5, max: 1e5 },
  speed: { min: -1e6, max: 1e6 },
  position: { min: -1e12, max: 1e12 },
  torque: { min: -1e6, max: 1e6 },
  temperature: { min: -273.15, max: 1e4 },
};

/** A column with its conversion, as the scanner uses it. */
export interface ColumnPlan {
  columns: ColumnMeta[];
  issues: IngestIssue[];
  /** Index of the time column. */
  timeIndex: number;
}

function own<T>(record: Readonly<Record<string, T>> | undefined, key: string): T | undefined {
  return record !== undefined && Object.hasOwn(record, key) ? record[key] : undefined;
}

/**
 * Settles every column's role, unit and SI conversion from the header and the options.
 *
 * @throws IngestError `bad-option` for a map entry naming no column, `unknown-unit`,
 *   `missing-counts-per-revolution`, `no-time-column`
 */
export function planColumns(headers: readonly string[], options: IngestOptions, file: string, headerLine: number): ColumnPlan {
  const issues: IngestIssue[] = [];
  const parts = headers.map((h) => splitHeader(h));
  const trimmed = headers.map((h) => h.trim());
  const roleOf: (ChannelRole | null)[] = headers.map(() => null);
  const roleSource: ColumnMeta['roleSource'][] = headers.map(() => 'none');
  const whyNot: (string | undefined)[] = headers.map(() => undefined);
  const impliedUnit: (string | undefined)[] = headers.map(() => undefined);

  // Explicit mapping first.
  const mapped = new Set<number>();
  const map = options.map ?? {};
  for (const role of CHANNEL_ROLES) {
    const target = own<string | number>(map as Record<string, string | number>, role);
    if (target === undefined) continue;
    let index = -1;
    if (typeof target === 'number') {
      index = Number.isInteger(target) && target >= 0 && target < headers.length ? target : -1;
    } else {
      const t = target.trim();
      index = trimmed.indexOf(t);
      if (index < 0) index = parts.findIndex((p) => p.name === t);
      if (index < 0) index = trimmed.findIndex((h) => h.toLowerCase() === t.toLowerCase());
      if (index < 0) index = parts.findIndex((p) => p.name.toLowerCase() === t.toLowerCase());
    }
    if (index < 0) {
      throw new IngestError(
        'bad-option',
        file,
        `options.map.${role} names ${JSON.stringify(target)}, but the header has ${trimmed.map((h) => JSON.stringify(h)).join(', ')}`,
        { line: headerLine },
      );
    }
    if (mapped.has(index)) {
      throw new IngestError('bad-option', file, `options.map gives column ${JSON.stringify(trimmed[index])} two roles`, { line: headerLine });
    }
    mapped.add(index);
    roleOf[index] = role;
    roleSource[index] = 'map';
  }

  // Detection for the rest.
  const taken = new Set<ChannelRole>(roleOf.filter((r): r is ChannelRole => r !== null));
  for (let c = 0; c < headers.length; c++) {
    if (mapped.has(c)) continue;
    const p = parts[c]!;
    let guess = detectRole(p.name);
    if (!guess.role && p.name.trim() === 'T' && p.unit) {
      const roles = rolesOfUnit(p.unit).filter((r) => r === 'time' || r === 'temperature' || r === 'torque');
      if (roles.length === 1) guess = { role: roles[0]! };
    }
    if (!guess.role) {
      whyNot[c] = guess.why;
      continue;
    }
    if (taken.has(guess.role)) {
      whyNot[c] = `another column already gives ${guess.role}`;
      issues.push({
        code: 'duplicate-role',
        severity: 'warning',
        line: headerLine,
        column: trimmed[c]!,
        message: `Column "${trimmed[c]}" also looks like ${guess.role}; the first such column is used and this one is kept in extra (use options.map.${guess.role} to choose).`,
      });
      continue;
    }
    taken.add(guess.role);
    roleOf[c] = guess.role;
    roleSource[c] = 'header';
    if (guess.impliedUnit) impliedUnit[c] = guess.impliedUnit;
  }

  const columns: ColumnMeta[] = [];
  for (let c = 0; c < headers.length; c++) {
    const header = trimmed[c]!;
    const p = parts[c]!;
    const role = roleOf[c] ?? null;
    const optionUnit = own(options.units, header) ?? own(options.units, p.name) ?? (role ? own(options.units, role) : undefined);
    if (role === null) {
      const unit = optionUnit ?? p.unit;
      columns.push({
        index: c, header, name: p.name || `column ${c + 1}`, role: 'extra', roleSource: 'none', unit, siUnit: null,
        factor: 1, offset: 0, canonicalUnit: null, unitSource: unit === null ? 'none' : optionUnit ? 'option' : 'header', unitAssumed: false,
      });
      if (!issues.some((i) => i.code === 'duplicate-role' && i.column === header)) {
        const hint = unit ? rolesOfUnit(unit) : [];
        issues.push({
          code: 'unrecognised-column',
          severity: 'warning',
          line: headerLine,
          column: header,
          message:
            `Column "${header}" was not recognised (${whyNot[c] ?? 'no role'}); its values are kept unconverted in recording.extra if numeric.` +
            (hint.length ? ` Its unit suggests ${hint.join(' or ')}${taken.has(hint[0]!) ? ' (already given by another column)' : ''}: use options.map.${hint[0]} = ${JSON.stringify(header)} if this is the one.` : ''),
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
      if (p.unit !== null && p.unit !== optionUnit) {
        issues.push({
          code: 'unit-overridden', severity: 'info', line: headerLine, column: header,
          message: `Column "${header}" is read in ${optionUnit} (options.units), not the ${p.unit} written in the header.`,
        });
      }
    } else if (p.unit !== null) {
      unit = p.unit;
      unitSource = 'header';
    } else if (impliedUnit[c]) {
      unit = impliedUnit[c]!;
      unitSource = 'name';
    } else {
      const d = DEFAULT_UNITS[role];
      unit = d.unit;
      unitSource = 'default';
      assumedReason = `the header gives no unit; ${role} is assumed in ${d.unit}`;
      issues.push({
        code: 'assumed-unit', severity: d.severity, line: headerLine, column: header,
        message: `Column "${header}" has no unit; ${role} is assumed to be in ${d.unit}. Write it in the header (e.g. "${p.name} [${d.unit}]") or pass options.units.`,
      });
    }

    const resolved = resolveUnit(role, unit, options.countsPerRevolution);
    if ('problem' in resolved) {
      if (resolved.problem === 'mismatch' && role !== 'time' && roleSource[c] !== 'map') {
        issues.push({
          code: 'unit-mismatch', severity: 'warning', line: headerLine, column: header,
          message: `Column "${header}" is named like ${role} but ${unit} is not a ${role} unit${resolved.otherRoles.length ? ` (it is a ${resolved.otherRoles.join('/')} unit)` : ''}; it is kept unconverted in recording.extra (use options.map / options.units to say otherwise).`,
        });
        taken.delete(role);
        columns.push({
          index: c, header, name: p.name, role: 'extra', roleSource: 'none', unit, siUnit: null,
          factor: 1, offset: 0, canonicalUnit: null, unitSource, unitAssumed: false,
        });
        continue;
      }
      const accepted = 'see the unit table in the @motorprint/ingest README';
      throw new IngestError(
        'unknown-unit',
        file,
        resolved.problem === 'mismatch'
          ? `column "${header}" (header line ${headerLine}) is ${role} but "${unit}" is not a ${role} unit${resolved.otherRoles.length ? ` (it is a ${resolved.otherRoles.join('/')} unit)` : ''}`
          : `column "${header}" (header line ${headerLine}): unit "${unit}" is not a known ${role} unit (${accepted})`,
        { line: headerLine, column: header },
      );
    }
    if (resolved.perCount && !(options.countsPerRevolution !== undefined && options.countsPerRevolution > 0 && Number.isFinite(options.countsPerRevolution))) {
      throw new IngestError(
        'missing-counts-per-revolution',
        file,
        `column "${header}" is in encoder counts; pass options.countsPerRevolution (counts per mechanical revolution, after quadrature)` +
          (options.countsPerRevolution !== undefined ? ` as a positive number (got ${options.countsPerRevolution})` : ''),
        { line: headerLine, column: header },
      );
    }
    const meta: ColumnMeta = {
      index: c, header, name: p.name, role, roleSource: roleSource[c]!, unit: unitSource === 'default' ? null : unit,
      siUnit: SI_UNITS[role], factor: resolved.factor, offset: resolved.offset, canonicalUnit: resolved.canonical,
      unitSource, unitAssumed: unitSource === 'default',
    };
    if (assumedReason) meta.unitAssumedReason = assumedReason;
    columns.push(meta);
  }

  const timeIndex = columns.findIndex((c) => c.role === 'time');
  if (timeIndex < 0) {
    throw new IngestError(
      'no-time-column',
      file,
      `no time column among ${trimmed.map((h) => JSON.stringify(h)).join(', ')}; name one "time [s]" or pass options.map.time`,
      { line: headerLine },
    );
  }
  return { columns, issues, timeIndex };
}
