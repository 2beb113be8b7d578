import type { CovarianceSummary, IdentifiabilityVerdict, RecordingDescription } from './types.js';

const ELECTRICAL_KINDS = new Set(['locked-rotor', 'step', 'prbs', 'multisine', 'loaded', 'unknown']);
const MOTION_KINDS = new Set(['step', 'prbs', 'multisine', 'loaded', 'steady-state', 'unknown']);

/**
 * Says, per parameter, whether the given recordings can inform it — with the reason and the
 * recording that would inform it when they cannot — combining structural rules of the DC-motor
 * equations with the rank information of the covariance summary.
 *
 * ## Method
 * V = R·i + L·di/dt + Ke·ω and J·dω/dt = Kt·i − b·ω − Tc·sgn(ω). Rules, in order:
 * - R needs a current channel on a recording that is driven (not a coast-down);
 * - L needs current on a driven recording (how finely the sampling resolves τe = L/R is left to
 *   the covariance: the exact discretisation can pin L down even when τe is shorter than dt);
 * - without a current or torque channel Kt, J and b enter the speed only as Kt/J and b/J (and
 *   R·J, so R too): J and Kt are not informed apart, and neither is R;
 * - with Kt and Ke both named (not imposed equal), Kt apart from J needs a torque channel;
 * - b and Tc need speed; a coast-down alone gives only b/J and Tc/J;
 * - finally any parameter the covariance summary marks as lying on a dropped direction.
 *
 * @param names - fitted parameter names (R, L, Kt, Ke, J, b, Tc or others), length p
 * @param summary - covariance summary at the optimum, or null when there is none yet
 * @param recordings - plain descriptions: name, kind, channels present, sample interval [s]
 * @param options - `electricalTimeConstant` τe [s] when known (estimate or datasheet)
 * @returns one {@link IdentifiabilityVerdict} per name, in order
 * @throws TypeError when names/recordings are not arrays or the summary does not match p
 * @throws RangeError when a sample interval or τe is not a positive finite number
 * @example
 * assessIdentifiability(['L'], null, [{ name: 'run', kind: 'step', channels: ['voltage', 'speed'], sampleInterval: 1e-3 }],
 *   { electricalTimeConstant: 5e-4 })[0].identifiable; // => false
 */
export function assessIdentifiability(
  names: readonly string[],
  summary: CovarianceSummary | null,
  recordings: readonly RecordingDescription[],
  options: { electricalTimeConstant?: number } = {},
): IdentifiabilityVerdict[] {
  const fn = 'assessIdentifiability';
  if (!Array.isArray(names)) throw new TypeError(`${fn}: names must be an array of strings`);
  if (!Array.isArray(recordings)) throw new TypeError(`${fn}: recordings must be an array of descriptions`);
  if (summary !== null && (typeof summary !== 'object' || !Array.isArray(summary.identifiable) || summary.identifiable.length !== names.length)) {
    throw new TypeError(`${fn}: summary.identifiable must have ${names.length} entries`);
  }
  recordings.forEach((r, i) => {
    if (r === null || typeof r !== 'object' || !Array.isArray(r.channels)) throw new TypeError(`${fn}: recordings[${i}] must be { name, kind, channels, sampleInterval }`);
    if (!(r.sampleInterval > 0) || !Number.isFinite(r.sampleInterval)) {
      throw new RangeError(`${fn}: recordings[${i}].sampleInterval must be > 0 (got ${r.sampleInterval})`);
    }
  });
  const tauE = options.electricalTimeConstant;
  if (tauE !== undefined && (!(tauE > 0) || !Number.isFinite(tauE))) throw new RangeError(`${fn}: options.electricalTimeConstant must be > 0 (got ${tauE})`);
  const has = (r: RecordingDescription, c: string): boolean => r.channels.includes(c as never);
  const driven = recordings.filter((r) => r.kind !== 'coast-down');
  const withCurrent = driven.filter((r) => has(r, 'current') && ELECTRICAL_KINDS.has(r.kind));
  const withTorque = recordings.filter((r) => has(r, 'torque'));
  const withSpeed = recordings.filter((r) => has(r, 'speed') || has(r, 'position'));
  const moving = withSpeed.filter((r) => MOTION_KINDS.has(r.kind));
  const separateK = names.includes('Kt') && names.includes('Ke');
  const fmt = (x: number): string => x.toPrecision(3);

  return names.map((name, j) => {
    const no = (reason: string, wouldInform: string): IdentifiabilityVerdict => ({ name, identifiable: false, reason, wouldInform });
    switch (name) {
      case 'R':
        if (driven.every((r) => !has(r, 'current'))) {
          return no('no driven recording logs current; from speed alone R enters only with J and b (τm′ = J·R/(R·b + Kt·Ke)), not on its own',
            'a locked-rotor step with current, or any driven run that logs current');
        }
        break;
      case 'L': {
        if (withCurrent.length === 0) {
          const dts = withSpeed.map((r) => r.sampleInterval);
          const why = tauE !== undefined && dts.length > 0
            ? `no recording logs current, and speed sees L only through τe = ${fmt(tauE)} s, ${tauE < Math.min(...dts) ? 'shorter than' : 'compared with'} the sample interval dt = ${fmt(Math.min(...dts))} s`
            : 'no driven recording logs current; speed sees L only through the electrical time constant τe = L/R, far below the mechanical one';
          return no(why, 'a locked-rotor step with current sampled at least 10× faster than L/R');
        }
        // How well the current pins L down at a given sample interval is the information
        // matrix's call (the exact discretisation can pin L even when τe < dt), not a rule here.
        break;
      }
      case 'Kt':
      case 'J':
        if (withCurrent.length === 0 && withTorque.length === 0) {
          return no('without current or torque only Kt/J and b/J enter the speed equation, so Kt and J cannot be told apart',
            'a free-run step or PRBS that logs current as well as speed, or a loaded run with a torque transducer');
        }
        if (separateK && withTorque.length === 0) {
          return no('with Kt and Ke fitted apart, current and speed give Ke (back-EMF) and Kt/J only; Kt apart from J needs a torque measurement',
            'a loaded run with a torque transducer, or impose Kt = Ke (SI)');
        }
        if (moving.length === 0) return no('no recording shows the rotor moving under drive', 'a free-run step, PRBS or multisine with speed');
        break;
      case 'Ke':
        if (withSpeed.length === 0) return no('no recording logs speed or position, so the back-EMF is not seen', 'a free-run step or coast-down with speed');
        break;
      case 'b':
      case 'Tc':
        if (withSpeed.length === 0) return no('no recording logs speed or position', 'a coast-down or steady-state sweep with speed');
        if (moving.length === 0 && withCurrent.length === 0 && withTorque.length === 0) {
          return no(`a coast-down alone shows only ${name}/J (deceleration), not ${name} itself`, 'a steady-state sweep with current and speed, or J known from another run');
        }
        break;
      default:
        break;
    }
    if (summary !== null && summary.identifiable[j] === false) {
      return no(`the covariance is rank-deficient along a direction that involves ${name} (condition number ${fmt(summary.conditionNumber)})`,
        'a recording with richer excitation (PRBS or multisine) or a constraint on the correlated parameters');
    }
    return { name, identifiable: true, reason: '', wouldInform: '' };
  });
}
