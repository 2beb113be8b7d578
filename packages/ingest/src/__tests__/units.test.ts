import { execFileSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { expectClose } from '@motorprint/testkit';
import { describe, expect, it } from 'vitest';
import { EXACT_FACTORS, ingestText, IngestError, mathjsConversion, normaliseUnitText, resolveUnit, UNIT_TABLE } from '../index.js';
import type { UnitQuantity } from '../index.js';

const CPR = 4096;
/** The ingest package's folder (where a child process resolves `@motorprint/ingest` and tsx). */
const packageRoot = join(dirname(fileURLToPath(import.meta.url)), '..', '..');

/**
 * Expected SI factor (and offset) per canonical unit, written down independently of the code.
 * Sources: SI prefixes (exact); FACTS.md §1–2, which cites NIST SP 811 (2008) App. B.8 for the
 * tabulated figures: r/min → rad/s 2π/60 = 0.10471975511965977, ozf·in → N·m
 * 0.00706155181422604375, lbf·in → N·m 0.1129848290276167, lbf·ft → N·m 1.3558179483314004,
 * V/krpm row → 1 krpm = 2000π/60 rad/s = 104.71975511965977; g_n = 9.80665 m/s² exact (3rd CGPM),
 * so 1 kgf·cm = 0.0980665 N·m (derived here); the radian per revolution 2π (definition);
 * K → °C offset −273.15 and °F → °C (x − 32)·5/9 (definitions of the scales).
 */
const EXPECTED: Record<string, { factor: number; offset?: number }> = {
  s: { factor: 1 },
  ms: { factor: 1e-3 },
  us: { factor: 1e-6 },
  ns: { factor: 1e-9 },
  min: { factor: 60 },
  h: { factor: 3600 },
  V: { factor: 1 },
  mV: { factor: 1e-3 },
  uV: { factor: 1e-6 },
  kV: { factor: 1e3 },
  A: { factor: 1 },
  mA: { factor: 1e-3 },
  uA: { factor: 1e-6 },
  'rad/s': { factor: 1 },
  rpm: { factor: 0.10471975511965977 },
  krpm: { factor: 104.71975511965977 },
  'rev/s': { factor: 2 * Math.PI },
  'deg/s': { factor: Math.PI / 180 },
  'counts/s': { factor: (2 * Math.PI) / CPR },
  rad: { factor: 1 },
  deg: { factor: Math.PI / 180 },
  rev: { factor: 2 * Math.PI },
  counts: { factor: (2 * Math.PI) / CPR },
  'N·m': { factor: 1 },
  'mN·m': { factor: 1e-3 },
  'N·cm': { factor: 1e-2 },
  'ozf·in': { factor: 0.00706155181422604375 },
  'lbf·in': { factor: 0.1129848290276167 },
  'lbf·ft': { factor: 1.3558179483314004 },
  'kgf·cm': { factor: 0.0980665 },
  '°C': { factor: 1, offset: 0 },
  K: { factor: 1, offset: -273.15 },
  '°F': { factor: 5 / 9, offset: -160 / 9 },
  // Duty as a fraction of full scale (derived here): 1 % = 0.01; a PWM count is 1 / full-scale
  // count, and the tests pass CPR as the full scale.
  fraction: { factor: 1 },
  '%': { factor: 0.01 },
  'PWM counts': { factor: 1 / CPR },
};

describe('every unit alias converts to SI through mathjs with the right factor', () => {
  const roles = Object.keys(UNIT_TABLE) as UnitQuantity[];
  for (const role of roles) {
    for (const def of UNIT_TABLE[role]) {
      const spellings = [...def.aliases, ...(def.caseInsensitive ?? []), ...(def.caseInsensitive ?? []).map((a) => a.toUpperCase())];
      it(`${role}: ${def.canonical} from ${spellings.map((s) => JSON.stringify(s)).join(', ')}`, () => {
        const want = EXPECTED[def.canonical];
        expect(want, `EXPECTED lacks ${def.canonical}`).toBeDefined();
        for (const spelling of spellings) {
          const got = resolveUnit(role, spelling, CPR);
          expect('problem' in got ? got : got.canonical, spelling).toBe(def.canonical);
          if ('problem' in got) continue;
          expectClose(got.factor, want!.factor, { rel: 1e-15 }, `${spelling} factor`);
          expectClose(got.offset, want!.offset ?? 0, { abs: 1e-12 }, `${spelling} offset`);
        }
      });
    }
  }

  it('accepts the separator spellings of N·m (Nm, N.m, N*m, N m, N-m, N⋅m)', () => {
    for (const s of ['Nm', 'N.m', 'N*m', 'N m', 'N-m', 'N⋅m', 'N·m']) {
      expect(resolveUnit('torque', s)).toMatchObject({ canonical: 'N·m', factor: 1 });
    }
    for (const s of ['mNm', 'mN.m', 'mN*m', 'mN m', 'mN·m']) expect(resolveUnit('torque', s)).toMatchObject({ canonical: 'mN·m' });
    for (const s of ['oz-in', 'oz.in', 'oz in', 'ozf·in', 'OZ-IN', 'in-oz']) expect(resolveUnit('torque', s)).toMatchObject({ canonical: 'ozf·in' });
    for (const s of ['lbf-in', 'lb-in', 'in-lb', 'in.lbf']) expect(resolveUnit('torque', s)).toMatchObject({ canonical: 'lbf·in' });
  });

  it('normalises unit text before lookup', () => {
    expect(normaliseUnitText(' N m ')).toBe('N·m');
    expect(normaliseUnitText('rad s^-1')).toBe('rad·s⁻¹');
    expect(normaliseUnitText('min^(-1)')).toBe('min⁻¹');
    expect(normaliseUnitText('℃')).toBe('°C');
  });

  it('falls back to mathjs for units outside the table and checks their dimension', () => {
    expect(resolveUnit('time', 'ks')).toMatchObject({ canonical: 'ks', factor: 1000 });
    expect(resolveUnit('voltage', 'cV')).toMatchObject({ canonical: 'cV' });
    expect(resolveUnit('voltage', 'mA')).toMatchObject({ problem: 'mismatch', otherRoles: ['current'] });
    expect(resolveUnit('voltage', 'furlongs per fortnight')).toMatchObject({ problem: 'unknown' });
    expect(resolveUnit('voltage', '__proto__')).toMatchObject({ problem: 'unknown' });
  });

  it('needs counts per revolution for counts', () => {
    const r = resolveUnit('position', 'counts');
    expect(r).toMatchObject({ canonical: 'counts', perCount: true });
    expect('factor' in r && Number.isNaN(r.factor)).toBe(true);
  });
});

describe('exact torque factors (FACTS.md §2, NIST SP 811 App. B) differ from mathjs by an ulp', () => {
  // FACTS.md §2: ozf·in = 0.0254 × 0.45359237 × 9.80665 / 16 N·m exactly; lbf·in = 0.0254 × 4.4482216152605.
  it('mathjs lbf·in is 0.11298482902761668, not the correctly rounded 0.1129848290276167', () => {
    const viaMathjs = mathjsConversion('lbf in', 'N m').factor;
    expect(viaMathjs).toBe(0.11298482902761668);
    expect(EXACT_FACTORS['lbf·in']).toBe(0.1129848290276167);
    expect(viaMathjs).not.toBe(EXACT_FACTORS['lbf·in']);
    expectClose(viaMathjs, 0.1129848290276167, { rel: 4 * Number.EPSILON }, 'mathjs lbf·in within 4 ulp');
  });

  it('mathjs has no ozf; with ozf = lbf/16 it gives 0.007061551814226043, not 0.00706155181422604375', () => {
    const viaMathjs = mathjsConversion('ozf in', 'N m').factor;
    expect(viaMathjs).toBe(0.007061551814226043);
    expect(viaMathjs).not.toBe(EXACT_FACTORS['ozf·in']);
    expectClose(viaMathjs, 0.00706155181422604375, { rel: 4 * Number.EPSILON }, 'mathjs ozf·in within 4 ulp');
  });

  it('mathjs lbf·ft already is the correctly rounded 1.3558179483314004 (FACTS.md §2), so it needs no override', () => {
    expect(mathjsConversion('lbf ft', 'N m').factor).toBe(1.3558179483314004);
    expect(EXACT_FACTORS['lbf·ft']).toBeUndefined();
  });

  it('mathjs r/min agrees exactly with 2π/60 = 0.10471975511965977 (FACTS.md §2)', () => {
    expect(mathjsConversion('rpm', 'rad/s').factor).toBe(0.10471975511965977);
  });

  it('a torque column in oz-in is converted with the exact factor', () => {
    const r = ingestText('time [s],torque [oz-in]\n0,0\n1,1\n2,141.61193266123495\n');
    // FACTS.md §2: 1 N·m = 141.61193266123495 ozf·in (derived there).
    expect(r.recording.channels.torque![1]).toBe(0.00706155181422604375);
    expectClose(r.recording.channels.torque![2]!, 1, { rel: 1e-15 }, '141.6 ozf·in in N·m');
  });
});

describe('unit conversion in a file', () => {
  it('converts kelvin to °C with its offset', () => {
    const r = ingestText('time [s],winding temp [K]\n0,293.15\n1,300\n2,373.15\n');
    expectClose(r.recording.channels.temperature![0]!, 20, { abs: 1e-12 }, '293.15 K');
    expectClose(r.recording.channels.temperature![2]!, 100, { abs: 1e-12 }, '373.15 K');
  });

  it('converts positions in counts with counts per revolution and errors without it', () => {
    const csv = 'time [s],position [counts]\n0,0\n0.001,1024\n0.002,2048\n';
    const r = ingestText(csv, { countsPerRevolution: 4096 });
    expect(Array.from(r.recording.channels.position!)).toEqual([0, Math.PI / 2, Math.PI]);
    expect(() => ingestText(csv)).toThrowError(IngestError);
    try {
      ingestText(csv);
    } catch (e) {
      expect(e).toMatchObject({ code: 'missing-counts-per-revolution', column: 'position [counts]', line: 1 });
      expect((e as Error).message).toContain("give the encoder's counts per mechanical revolution");
      expect((e as IngestError).fix).toEqual([{ option: 'countsPerRevolution' }]);
    }
  });

  it('rejects an unknown unit on a recognised column, naming the column', () => {
    try {
      ingestText('time [s],voltage [a.u.]\n0,0\n1,1\n2,2\n');
      expect.unreachable();
    } catch (e) {
      expect(e).toMatchObject({ name: 'IngestError', code: 'unknown-unit', column: 'voltage [a.u.]', line: 1 });
      expect((e as Error).message).toContain('not a known voltage unit');
    }
  });

  it('keeps a column whose unit contradicts its name in extra, with a warning', () => {
    const r = ingestText('time [s],position [m]\n0,0\n1,0.1\n2,0.2\n');
    expect(r.recording.channels.position).toBeUndefined();
    expect(r.recording.extra.map((e) => e.name)).toEqual(['position [m]']);
    expect(r.issues.find((i) => i.code === 'unit-mismatch')).toMatchObject({ column: 'position [m]', severity: 'warning' });
  });
});

describe('a unit that already is the SI target needs no mathjs', () => {
  // The SI target of each quantity, as a mathjs expression (duty is not converted by mathjs).
  const SI: Record<Exclude<UnitQuantity, 'duty'>, string> = { time: 's', voltage: 'V', current: 'A', speed: 'rad/s', position: 'rad', torque: 'N m', temperature: 'degC' };

  it('every table unit converts with bit for bit the factor and offset mathjs gives (the SI units by 1 and 0)', () => {
    let identities = 0;
    for (const [quantity, si] of Object.entries(SI) as [Exclude<UnitQuantity, 'duty'>, string][]) {
      for (const def of UNIT_TABLE[quantity]) {
        if (def.perCount || def.fixed !== undefined || EXACT_FACTORS[def.canonical] !== undefined) continue;
        const viaMathjs = mathjsConversion(def.mathjs, si);
        const got = resolveUnit(quantity, def.aliases[0]!);
        expect('factor' in got && Object.is(got.factor, viaMathjs.factor) && Object.is(got.offset, viaMathjs.offset), `${quantity}: ${def.canonical}`).toBe(true);
        if (def.mathjs === si) {
          identities++;
          expect(viaMathjs).toEqual({ factor: 1, offset: 0 });
        }
      }
    }
    expect(identities).toBe(Object.keys(SI).length);
  });

  it('reading a recording in SI units does not load mathjs; one in rpm does', () => {
    const script = (csv: string): string => [
      "import { createRequire } from 'node:module';",
      "import { ingestText } from '@motorprint/ingest';",
      `const r = ingestText(${JSON.stringify(csv)});`,
      'const loaded = Object.keys(createRequire(import.meta.url).cache).some((p) => /[\\\\/]mathjs[\\\\/]/.test(p));',
      'process.stdout.write(JSON.stringify({ rows: r.recording.time.length, loaded }));',
    ].join('\n');
    const run = (csv: string): { rows: number; loaded: boolean } => {
      const out = execFileSync(process.execPath, ['--conditions=@motorprint/source', '--import', 'tsx', '--input-type=module', '-e', script(csv)], { cwd: packageRoot, encoding: 'utf8' });
      return JSON.parse(out) as { rows: number; loaded: boolean };
    };
    const body = '0,0,0,0\n0.001,1,0.1,2\n0.002,1,0.2,4\n0.003,1,0.25,5\n';
    expect(run(`time [s],voltage [V],current [A],speed [rad/s]\n${body}`)).toEqual({ rows: 4, loaded: false });
    expect(run(`time [s],voltage [V],current [A],speed [rpm]\n${body}`)).toEqual({ rows: 4, loaded: true });
  });
});
