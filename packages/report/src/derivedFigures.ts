import { FIGURES } from './figureDefinitions.js';
import type { ConstantCovariance, ConstantName, ConstantValues, DerivedFigure } from './types.js';

const NAMES: ConstantName[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'];
/** Central-difference step on ln c (relative step of the constant). */
const LOG_STEP = 1e-5;

function isCovariance(x: ConstantValues | ConstantCovariance): x is ConstantCovariance {
  return (x as ConstantCovariance).covariance instanceof Float64Array;
}

function toValues(v: Float64Array): ConstantValues {
  return { R: v[0]!, L: v[1]!, Kt: v[2]!, Ke: v[3]!, J: v[4]!, b: v[5]!, Tc: v[6]! };
}

/**
 * The derived datasheet figures of a motor (time constants, no-load and stall values, constants in
 * common units, motor constant, speed drop per load torque, maximum output power, peak efficiency and
 * where it occurs), each with a 95 % interval when a covariance is given.
 *
 * ## Method
 * Formulas as in docs/derived-figures.md (relations of FACTS.md §4, unit factors of FACTS.md §2);
 * friction (b and Tc) is included in no-load, power and efficiency figures. Intervals by the delta
 * method: the gradient of ln f with respect to u = (ln R, ln L, ln Kt, ln Ke, ln J, ln b, Tc) by
 * central differences (step 1e-5 on each ln c; on Tc 1e-5·|Tc| or 1e-3·SE(Tc), the larger), then
 * s² = gᵀ·C_u·g and the interval f·exp(±t·s) with t = t(0.975, n − p). A figure that is ≤ 0 gets
 * the linear form f ± t·s with the gradient of f itself.
 *
 * ## References
 * Delta method: G. Casella, R. L. Berger (2002), Statistical Inference, 2nd ed., §5.5.4.
 *
 * @param constants - plain constants [SI] (no intervals) or the result of `constantCovariance`
 * @param ratedVoltage - voltage for the voltage-dependent figures [V]; null leaves them without value
 * @returns figures keyed by name (see docs/derived-figures.md), in report order
 * @throws RangeError when `ratedVoltage` is not finite and > 0 (and not null)
 * @example
 * derivedFigures({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 0 }, 12).stallTorque.value;
 * // ≈ 0.3 N·m (FACTS.md §5)
 */
export function derivedFigures(constants: ConstantValues | ConstantCovariance, ratedVoltage: number | null): Record<string, DerivedFigure> {
  if (ratedVoltage !== null && !(Number.isFinite(ratedVoltage) && ratedVoltage > 0)) {
    throw new RangeError(`derivedFigures: ratedVoltage must be a finite number > 0 or null (got ${ratedVoltage})`);
  }
  const withCov = isCovariance(constants);
  const base = withCov ? Float64Array.from(constants.values) : Float64Array.from(NAMES.map((n) => (constants as ConstantValues)[n]));
  const V = ratedVoltage ?? NaN;
  const out: Record<string, DerivedFigure> = {};
  const work = new Float64Array(7);
  for (const def of FIGURES) {
    const missing = def.uses.filter((c) => !Number.isFinite(base[NAMES.indexOf(c)]!));
    const fig: DerivedFigure = { label: def.label, value: null, unit: def.unit, ci95: null, identifiable: false, formula: def.formula, note: '' };
    out[def.key] = fig;
    if (missing.length > 0) { fig.note = `needs ${missing.join(', ')}, which the recordings do not inform`; continue; }
    if (def.needsVoltage && ratedVoltage === null) { fig.note = 'no rated voltage: none given and no voltage step seen'; continue; }
    const f = def.evaluate(toValues(base), V);
    if (!Number.isFinite(f)) { fig.note = 'not defined for these constants (friction at or above the stall torque?)'; continue; }
    fig.value = f;
    if (!withCov) { fig.identifiable = true; fig.note = 'no covariance given: no interval'; continue; }
    const cov = constants as ConstantCovariance;
    const unusable = def.uses.filter((c) => !cov.identifiable[NAMES.indexOf(c)]);
    if (unusable.length > 0) { fig.note = `no interval: ${unusable.join(', ')} not identifiable`; continue; }
    fig.identifiable = true;
    const logMode = f > 0;
    const idx = def.uses.map((c) => NAMES.indexOf(c));
    const g = new Float64Array(idx.length);
    let finite = true;
    idx.forEach((i, q) => {
      const varI = cov.covariance[i * 7 + i]!;
      if (!(varI > 0)) { g[q] = 0; return; }
      work.set(base);
      // Every coordinate is ln p (Tc included): a relative step.
      const h = LOG_STEP;
      work[i] = base[i]! * Math.exp(h);
      const fp = def.evaluate(toValues(work), V);
      work[i] = base[i]! * Math.exp(-h);
      const fm = def.evaluate(toValues(work), V);
      g[q] = logMode ? (Math.log(fp) - Math.log(fm)) / (2 * h) : (fp - fm) / (2 * h);
      if (!Number.isFinite(g[q]!)) finite = false;
    });
    let s2 = 0;
    for (let a = 0; a < idx.length; a++) {
      for (let b = 0; b < idx.length; b++) {
        if (g[a] === 0 || g[b] === 0) continue;
        s2 += g[a]! * g[b]! * cov.covariance[idx[a]! * 7 + idx[b]!]!;
      }
    }
    if (g.every((v) => v === 0)) { fig.note = 'no interval: every constant it needs was fixed by the caller'; continue; }
    const half = cov.tQuantile * Math.sqrt(Math.max(s2, 0));
    if (!finite || !Number.isFinite(half)) { fig.note = 'no interval: the propagation gave a non-finite spread'; continue; }
    fig.ci95 = logMode ? [f * Math.exp(-half), f * Math.exp(half)] : [f - half, f + half];
  }
  return out;
}
