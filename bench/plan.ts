/**
 * Plan bench: `planExperiments`' predicted standard errors against the spread of `fitMotor`
 * (lumped model, viscous friction: the model the plan predicts for) over 150 seeded simulations
 * of each planned scenario on the Tern 24 demo motor (invented). Prints per kind and constant the
 * predicted SE, the SD of the fitted values and their ratio. Goal: every identified row within
 * 20 % (ratio 0.8–1.2). With 150 fits the ratio itself scatters by about 1/√(2·149) ≈ 6 %
 * (derived here), so a row just outside the band is not by itself a failure of the prediction.
 */
import { SCENARIOS, spreadOf, TERN24 } from '../packages/estimate/src/__tests__/planSpread.js';

const SEEDS = 150;

export default async function run(): Promise<void> {
  const rows: string[][] = [['kind', 'constant', 'predicted SE', 'spread (SD)', 'ratio', 'fits', 'within 20 %']];
  let inside = 0, total = 0;
  for (const sc of SCENARIOS) {
    const t0 = Date.now();
    for (const r of spreadOf(TERN24, sc, SEEDS)) {
      const ok = Math.abs(r.ratio - 1) <= 0.2;
      inside += ok ? 1 : 0; total++;
      rows.push([sc.label, r.constant, r.predicted.toPrecision(3), r.spread.toPrecision(3), r.ratio.toFixed(2), String(r.fits), ok ? 'yes' : 'NO']);
    }
    console.error(`plan bench: ${sc.label} done in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  }
  const w = rows[0]!.map((_, j) => Math.max(...rows.map((r) => r[j]!.length)));
  for (const r of rows) console.log(r.map((c, j) => c.padEnd(w[j]!)).join('  '));
  console.log(`\n${inside} of ${total} rows within 20 % (goal: all)`);
}
