import { hybridConstants, steadyState } from './hybridKernel.js';
import type { DetailedParams } from './types.js';

/**
 * The running steady state of the detailed model under a held drive voltage u [V], written into
 * `out` as [current A, speed rad/s, mode] (mode 0 running, 1 stuck at rest, 2 at the current
 * limit): Kt·(u − Ke·ω)/R′ = b·ω + Tc·sgn ω + cd·ω|ω| + τ_load with R′ = R(T) + Rs at the initial
 * temperature, the stuck rotor when the stall torque does not exceed Ts, and the current limit.
 * Kernel: validates nothing, never throws.
 *
 * @param out - receives [i, ω, mode] (length ≥ 3)
 * @param params - constants and effect terms
 * @param u - held drive voltage [V]
 * @returns `out`
 * @example
 * steadyStateInto(new Float64Array(3), { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }, 12)[1]; // ≈ 238.1 (rad/s)
 */
export function steadyStateInto(out: Float64Array, params: DetailedParams, u: number): Float64Array {
  const c = hybridConstants(params);
  steadyState(c, u, params.initialTemperature ?? c.ambient, out);
  return out;
}
