import { createRequire } from 'node:module';
import type { Unit } from 'mathjs';
import type { ChannelRole } from './types.js';

/**
 * One bench unit: the spellings accepted for it and how mathjs converts it to the role's SI unit.
 * `exact` overrides the mathjs factor where mathjs's product of rounded constants is not the
 * correctly rounded exact factor (see {@link EXACT_FACTORS}).
 */
export interface UnitDefinition {
  /** Canonical spelling reported in meta, e.g. `rpm`. */
  canonical: string;
  /** mathjs expression, converted with `unit(1, mathjs).toNumber(si)`. */
  mathjs: string;
  /** Accepted spellings, matched after {@link normaliseUnitText}. */
  aliases: readonly string[];
  /** Spellings also matched without regard to case (only unambiguous words). */
  caseInsensitive?: readonly string[];
  /** True for counts: the factor needs `countsPerRevolution` (encoder) or `pwmMax` (duty). */
  perCount?: boolean;
  /** A factor fixed by definition (duty fractions and percent), used instead of mathjs. */
  fixed?: number;
}

/**
 * The quantity a unit is looked up for: the voltage-like roles share the voltage units.
 * Every {@link ChannelRole} maps to one.
 */
export type UnitQuantity = Exclude<ChannelRole, 'supplyVoltage' | 'commandVoltage'>;

/** The unit quantity of a role (`supplyVoltage` and `commandVoltage` are voltages). */
export function quantityOf(role: ChannelRole): UnitQuantity {
  return role === 'supplyVoltage' || role === 'commandVoltage' ? 'voltage' : role;
}

/** The mathjs expression of each quantity's SI target (duty is dimensionless and not converted by mathjs). */
const SI_MATHJS: Readonly<Record<Exclude<UnitQuantity, 'duty'>, string>> = {
  time: 's',
  voltage: 'V',
  current: 'A',
  speed: 'rad/s',
  position: 'rad',
  torque: 'N m',
  temperature: 'degC',
};

/**
 * Exact conversion factors to N·m, from FACTS.md §2 (derived there from the 1959 inch and pound
 * and the 1901 g_n; NIST SP 811 App. B tabulates 7.061 552 E-03 and 1.129 848 E-01). mathjs 15 has
 * no ozf, and its products of rounded doubles give lbf·in = 0.11298482902761668 and
 * ozf (= lbf/16) · in = 0.007061551814226043, one ulp away from the correctly rounded values used
 * here; the unit tests show the difference. (Its lbf·ft, 1.3558179483314003, is already the
 * correctly rounded 1.3558179483314004 of FACTS.md, so no override is needed there.)
 */
export const EXACT_FACTORS: Readonly<Record<string, number>> = {
  'ozf·in': 0.00706155181422604375,
  'lbf·in': 0.1129848290276167,
};

/** Unit alias table, per quantity. Every alias is unit-tested. */
export const UNIT_TABLE: Readonly<Record<UnitQuantity, readonly UnitDefinition[]>> = {
  time: [
    { canonical: 's', mathjs: 's', aliases: ['s', 'sec', 'secs'], caseInsensitive: ['second', 'seconds', 'sec', 'secs'] },
    { canonical: 'ms', mathjs: 'ms', aliases: ['ms', 'msec'], caseInsensitive: ['millisecond', 'milliseconds', 'msec'] },
    { canonical: 'us', mathjs: 'us', aliases: ['us', 'µs', 'μs', 'usec'], caseInsensitive: ['microsecond', 'microseconds', 'usec'] },
    { canonical: 'ns', mathjs: 'ns', aliases: ['ns'], caseInsensitive: ['nanosecond', 'nanoseconds'] },
    { canonical: 'min', mathjs: 'minute', aliases: ['min'], caseInsensitive: ['minute', 'minutes'] },
    { canonical: 'h', mathjs: 'hour', aliases: ['h', 'hr'], caseInsensitive: ['hour', 'hours'] },
  ],
  voltage: [
    { canonical: 'V', mathjs: 'V', aliases: ['V'], caseInsensitive: ['volt', 'volts'] },
    { canonical: 'mV', mathjs: 'mV', aliases: ['mV'], caseInsensitive: ['millivolt', 'millivolts'] },
    { canonical: 'uV', mathjs: 'uV', aliases: ['uV', 'µV', 'μV'] },
    { canonical: 'kV', mathjs: 'kV', aliases: ['kV'] },
  ],
  duty: [
    { canonical: 'fraction', mathjs: '', fixed: 1, aliases: ['1', 'fraction', 'frac', 'p.u.', 'pu'], caseInsensitive: ['fraction', 'frac', 'p.u.', 'pu'] },
    { canonical: '%', mathjs: '', fixed: 0.01, aliases: ['%', 'percent', 'pct'], caseInsensitive: ['percent', 'pct'] },
    { canonical: 'PWM counts', mathjs: '', aliases: ['counts', 'count', 'cnt', 'cts', 'ticks', 'lsb'], caseInsensitive: ['counts', 'count', 'cnt', 'cts', 'ticks', 'lsb'], perCount: true },
  ],
  current: [
    { canonical: 'A', mathjs: 'A', aliases: ['A'], caseInsensitive: ['amp', 'amps', 'ampere', 'amperes'] },
    { canonical: 'mA', mathjs: 'mA', aliases: ['mA'], caseInsensitive: ['milliamp', 'milliamps', 'milliampere', 'milliamperes'] },
    { canonical: 'uA', mathjs: 'uA', aliases: ['uA', 'µA', 'μA'] },
  ],
  speed: [
    { canonical: 'rad/s', mathjs: 'rad/s', aliases: ['rad/s', 'rad/sec', 'rad·s⁻¹'], caseInsensitive: ['rad/s', 'rad/sec'] },
    { canonical: 'rpm', mathjs: 'rpm', aliases: ['rpm', 'r/min', 'rev/min', '1/min', 'min⁻¹', 'U/min'], caseInsensitive: ['rpm', 'rev/min', 'r/min', 'u/min'] },
    { canonical: 'krpm', mathjs: 'krpm', aliases: ['krpm'], caseInsensitive: ['krpm'] },
    { canonical: 'rev/s', mathjs: 'rev/s', aliases: ['rev/s', 'r/s', 'rps'], caseInsensitive: ['rps', 'rev/s'] },
    { canonical: 'deg/s', mathjs: 'deg/s', aliases: ['deg/s', '°/s', 'dps', 'deg/sec'], caseInsensitive: ['deg/s', 'dps', 'deg/sec'] },
    { canonical: 'counts/s', mathjs: 'rev/s', aliases: ['counts/s', 'count/s', 'cnt/s', 'cts/s'], perCount: true },
  ],
  position: [
    { canonical: 'rad', mathjs: 'rad', aliases: ['rad'], caseInsensitive: ['rad', 'radian', 'radians'] },
    { canonical: 'deg', mathjs: 'deg', aliases: ['deg', '°'], caseInsensitive: ['deg', 'degree', 'degrees'] },
    { canonical: 'rev', mathjs: 'rev', aliases: ['rev', 'revs'], caseInsensitive: ['rev', 'revs', 'revolution', 'revolutions', 'turn', 'turns'] },
    { canonical: 'counts', mathjs: 'rev', aliases: ['counts', 'count', 'cnt', 'cnts', 'cts', 'ticks', 'inc'], caseInsensitive: ['counts', 'count', 'cnt', 'cnts', 'cts', 'ticks', 'tick', 'increments'], perCount: true },
  ],
  torque: [
    { canonical: 'N·m', mathjs: 'N m', aliases: ['N·m', 'Nm'] },
    { canonical: 'mN·m', mathjs: 'mN m', aliases: ['mN·m', 'mNm'] },
    { canonical: 'N·cm', mathjs: 'N cm', aliases: ['N·cm', 'Ncm'] },
    { canonical: 'ozf·in', mathjs: 'ozf in', aliases: ['ozf·in', 'oz·in', 'ozin', 'ozfin', 'in·oz', 'in·ozf'], caseInsensitive: ['ozf·in', 'oz·in', 'ozin', 'in·oz'] },
    { canonical: 'lbf·in', mathjs: 'lbf in', aliases: ['lbf·in', 'lb·in', 'lbfin', 'lbin', 'in·lb', 'in·lbf'], caseInsensitive: ['lbf·in', 'lb·in', 'in·lb', 'in·lbf'] },
    { canonical: 'lbf·ft', mathjs: 'lbf ft', aliases: ['lbf·ft', 'lb·ft', 'ft·lb', 'ft·lbf'], caseInsensitive: ['lbf·ft', 'lb·ft', 'ft·lb', 'ft·lbf'] },
    { canonical: 'kgf·cm', mathjs: 'kgf cm', aliases: ['kgf·cm', 'kg·cm', 'kgcm'], caseInsensitive: ['kgf·cm', 'kg·cm', 'kgcm'] },
  ],
  temperature: [
    { canonical: '°C', mathjs: 'degC', aliases: ['°C', 'degC', 'deg·C', 'C'], caseInsensitive: ['degc', 'celsius', '°c'] },
    { canonical: 'K', mathjs: 'K', aliases: ['K'], caseInsensitive: ['kelvin'] },
    { canonical: '°F', mathjs: 'degF', aliases: ['°F', 'degF', 'deg·F', 'F'], caseInsensitive: ['degf', 'fahrenheit', '°f'] },
  ],
};

/**
 * Normalises a written unit for lookup: trims; µ (U+00B5) and μ (U+03BC) → `u` is NOT done (both
 * are listed as aliases) — instead `·`, `⋅`, `*`, `×`, `.`, `-` and spaces between parts become `·`,
 * `℃` becomes `°C`, and `^-1` / `^(-1)` become `⁻¹`.
 *
 * @example
 * normaliseUnitText(' N m ') // => 'N·m'
 * normaliseUnitText('oz-in') // => 'oz·in'
 */
export function normaliseUnitText(text: string): string {
  return text
    .trim()
    .replace(/℃/g, '°C')
    .replace(/\s*\^\s*\(?\s*-\s*1\s*\)?/g, '⁻¹')
    .replace(/\s*[·⋅*×.\- ]+\s*/g, '·')
    .replace(/^·+|·+$/g, '');
}

interface AliasHit {
  role: UnitQuantity;
  def: UnitDefinition;
}

let aliasIndex: { exact: Map<string, AliasHit[]>; folded: Map<string, AliasHit[]> } | undefined;

function index(): { exact: Map<string, AliasHit[]>; folded: Map<string, AliasHit[]> } {
  if (aliasIndex) return aliasIndex;
  const exact = new Map<string, AliasHit[]>();
  const folded = new Map<string, AliasHit[]>();
  const add = (map: Map<string, AliasHit[]>, key: string, hit: AliasHit): void => {
    const list = map.get(key);
    if (list) list.push(hit);
    else map.set(key, [hit]);
  };
  for (const role of Object.keys(UNIT_TABLE) as UnitQuantity[]) {
    for (const def of UNIT_TABLE[role]) {
      for (const alias of def.aliases) add(exact, normaliseUnitText(alias), { role, def });
      for (const alias of def.caseInsensitive ?? []) add(folded, normaliseUnitText(alias).toLowerCase(), { role, def });
    }
  }
  aliasIndex = { exact, folded };
  return aliasIndex;
}

/** Finds the table entries a written unit may mean, for every role (exact spelling first, then case-folded). */
export function lookupUnit(text: string): AliasHit[] {
  const key = normaliseUnitText(text);
  const { exact, folded } = index();
  return exact.get(key) ?? folded.get(key.toLowerCase()) ?? [];
}

type MathJs = typeof import('mathjs');
type MathInstance = ReturnType<MathJs['create']>;
let mathInstance: MathInstance | undefined;

/**
 * A private mathjs instance with the bench units mathjs lacks (rev, rpm, krpm, ozf). mathjs is
 * loaded here, on the first conversion that needs it, not when the package is imported: loading
 * it and building the instance costs more than reading a 1e5-row recording, and a recording whose
 * columns are all in SI units needs no conversion at all.
 */
function math(): MathInstance {
  if (mathInstance) return mathInstance;
  const { create, createUnitDependencies, unitDependencies } = createRequire(import.meta.url)('mathjs') as MathJs;
  const m = create({ unitDependencies: unitDependencies!, createUnitDependencies: createUnitDependencies! });
  m.createUnit('rev', { definition: m.unit(2 * Math.PI, 'rad') });
  m.createUnit('rpm', { definition: '1 rev/minute' });
  m.createUnit('krpm', { definition: '1000 rpm' });
  // 1 ozf = 1 lbf / 16 exactly (FACTS.md §1).
  m.createUnit('ozf', { definition: '0.0625 lbf' });
  mathInstance = m;
  return m;
}

/**
 * The factor and offset mathjs gives for `expr` → `si`, so that SI = factor · x + offset.
 * Built once per column, never per cell.
 */
export function mathjsConversion(expr: string, si: string): { factor: number; offset: number } {
  const m = math();
  const offset = m.unit(0, expr).toNumber(si);
  if (offset === 0) return { factor: m.unit(1, expr).toNumber(si), offset: 0 };
  // Offset scales (°F, K → °C): f(1) − f(0) would lose digits; take the scale from the unit
  // definitions instead (SI base = (x + offset) · value · prefix).
  const scale = (u: Unit): number => {
    const part = (u as unknown as { units: { unit: { value: number }; prefix: { value: number }; power: number }[] }).units;
    if (part.length !== 1 || part[0]!.power !== 1) return Number.NaN;
    return part[0]!.unit.value * part[0]!.prefix.value;
  };
  const factor = scale(m.unit(expr) as Unit) / scale(m.unit(si) as Unit);
  return { factor: Number.isNaN(factor) ? m.unit(1, expr).toNumber(si) - offset : factor, offset };
}

/** A resolved unit for one column. */
export interface ResolvedUnit {
  canonical: string;
  factor: number;
  offset: number;
  perCount: boolean;
}

/** Why a unit could not be used for a role. */
export interface UnitProblem {
  problem: 'unknown' | 'mismatch';
  /** Quantities the unit does belong to (for `mismatch`). */
  otherRoles: UnitQuantity[];
}

/**
 * Resolves a written unit for a role to a factor and offset to SI. Tries the alias table, then
 * mathjs's own parser (so `ks` or `cV` also work), and checks the dimension against the role.
 *
 * @param role - the column's role (voltage-like roles take voltage units)
 * @param text - the unit as written, e.g. `r/min`
 * @param countsPer - counts per revolution (encoder counts) or the PWM full-scale count (duty in
 *   counts); `undefined` gives `perCount: true` with factor NaN
 * @returns the conversion, or the reason it cannot be used
 * @example
 * resolveUnit('speed', 'r/min') // => { canonical: 'rpm', factor: 0.10471975511965977, offset: 0, perCount: false }
 */
export function resolveUnit(role: ChannelRole, text: string, countsPer?: number): ResolvedUnit | UnitProblem {
  const quantity = quantityOf(role);
  const hits = lookupUnit(text);
  const hit = hits.find((h) => h.role === quantity);
  if (hit) {
    const def = hit.def;
    if (def.fixed !== undefined) return { canonical: def.canonical, factor: def.fixed, offset: 0, perCount: false };
    if (quantity === 'duty') {
      return { canonical: def.canonical, factor: countsPer === undefined ? Number.NaN : 1 / countsPer, offset: 0, perCount: true };
    }
    const si = SI_MATHJS[quantity];
    if (def.perCount) {
      const perRev = mathjsConversion(def.mathjs, si).factor;
      const factor = countsPer === undefined ? Number.NaN : perRev / countsPer;
      return { canonical: def.canonical, factor, offset: 0, perCount: true };
    }
    const exact = EXACT_FACTORS[def.canonical];
    // A unit that is already the SI target converts by 1 and 0 (what mathjs gives too; tested).
    const { factor, offset } = exact !== undefined ? { factor: exact, offset: 0 } : def.mathjs === si ? { factor: 1, offset: 0 } : mathjsConversion(def.mathjs, si);
    return { canonical: def.canonical, factor, offset, perCount: false };
  }
  if (hits.length > 0) return { problem: 'mismatch', otherRoles: [...new Set(hits.map((h) => h.role))] };
  // Not in the table: let mathjs try (e.g. 'ks', 'cV'); check the dimension.
  const others = mathjsQuantities(text);
  if (others === null) return { problem: 'unknown', otherRoles: [] };
  // A valid unit of another dimension (e.g. m for a position) is a mismatch, not an unknown unit.
  if (quantity === 'duty' || !others.includes(quantity)) return { problem: 'mismatch', otherRoles: others };
  const { factor, offset } = mathjsConversion(text.trim(), SI_MATHJS[quantity]);
  return { canonical: text.trim(), factor, offset, perCount: false };
}

/** The quantities mathjs says a unit expression measures, or null when mathjs cannot read it as a unit. */
function mathjsQuantities(text: string): UnitQuantity[] | null {
  const m = math();
  let parsed: Unit;
  try {
    parsed = m.unit(text.trim()) as Unit;
  } catch {
    return null;
  }
  if (parsed.value !== null) return null;
  const others: UnitQuantity[] = [];
  for (const r of Object.keys(SI_MATHJS) as (keyof typeof SI_MATHJS)[]) {
    if (parsed.equalBase(m.unit(SI_MATHJS[r]))) others.push(r);
  }
  return others;
}

/** Quantities a written unit could belong to (used to hint at a mapping for unrecognised columns). */
export function rolesOfUnit(text: string): UnitQuantity[] {
  return [...new Set(lookupUnit(text).map((h) => h.role))];
}

/**
 * True when a token reads as a unit of one of the bench quantities: an alias in the table, or
 * (for tokens with a `/`, or at least two letters) a mathjs unit whose dimension is one of them.
 * Used to tell a unit suffix (`_mA`, `_rad_s`) or a units row from a name.
 *
 * @example
 * isUnitToken('deg/s') // => true
 * isUnitToken('in')    // => false (a length, not a bench quantity)
 */
export function isUnitToken(text: string): boolean {
  const t = text.trim();
  if (t === '') return false;
  if (lookupUnit(t).length > 0) return true;
  if (!/^[A-Za-zµμ°%]/.test(t) || !(t.includes('/') || /[A-Za-zµμ]{2}/.test(t))) return false;
  const q = mathjsQuantities(t);
  return q !== null && q.length > 0;
}
