import { existsSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { mechanicalRegression } from '../mechanicalRegression.js';

// EMPS real data: A. Janot, M. Gautier, M. Brunot, "Data Set and Reference Models of EMPS",
// 2019 Workshop on Nonlinear System Identification Benchmarks. Read from $MOTORPRINT_EMPS_DIR or
// ../shared/reference/open-data/emps/ relative to the repo root; never copied into the project.
const here = dirname(fileURLToPath(import.meta.url));
const repoRoot = resolve(here, '../../../..');
const dir = process.env.MOTORPRINT_EMPS_DIR ?? join(repoRoot, '../shared/reference/open-data/emps');
const file = join(dir, 'DATA_EMPS.csv');
const present = existsSync(file);
if (!present) console.log(`emps.test: skipped, ${file} not found (set MOTORPRINT_EMPS_DIR)`);

/** Drive gain gtau [N/V], SOURCE.md (exact float64 repr from the .mat file). */
const GTAU = 35.15065188248547;

describe.skipIf(!present)('on the EMPS benchmark data the Coulomb model is preferred over viscous-only friction', () => {
  it('force = gtau·vir regressed on filtered acceleration, velocity (, sign) and offset', () => {
    const lines = readFileSync(file, 'utf8').trim().split('\n').slice(1);
    const n = lines.length;
    const q = new Float64Array(n), f = new Float64Array(n);
    lines.forEach((l, k) => { const c = l.split(','); q[k] = Number(c[1]); f[k] = GTAU * Number(c[3]); });
    // Position cutoff 100 Hz and decimation by 10 as in SOURCE.md's independent re-check (derived from it).
    const reg = mechanicalRegression({ sampleInterval: 1e-3, drive: f, position: q, cutoff: 100 / 2, decimation: 10, offset: true, trim: 50 });
    expect(reg.bothDirections).toBe(true);
    expect(reg.coulombComparison.preferred).toBe('full');
    expect(reg.coulombComparison.aic[1]).toBeLessThan(reg.coulombComparison.aic[0]);
    const [M, Fv, Fc] = reg.coulomb.coefficients;
    // Published IDIM-LS values (SOURCE.md table from the EMPS description §3.4): M 95.1089 kg,
    // Fv 203.5034 N·s/m, Fc 20.3935 N. Our filter differs, so 5 % (SOURCE.md: "expect agreement at the 1 % level", widened here).
    expect(Math.abs(M! / 95.1089 - 1), `M ${M}`).toBeLessThan(0.05);
    expect(Math.abs(Fv! / 203.5034 - 1), `Fv ${Fv}`).toBeLessThan(0.05);
    expect(Math.abs(Fc! / 20.3935 - 1), `Fc ${Fc}`).toBeLessThan(0.05);
  });
});
