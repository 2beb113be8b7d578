import { advance, HELD, OPEN, RUN, STUCK, hybridConstants, steadyState, resistanceAt } from './hybridKernel.js';
import type { HybridState, PieceScratch } from './hybridKernel.js';
import type { DetailedParams, HybridPlan, HybridTrace } from './types.js';

const SS = new Float64Array(3);

/**
 * Simulates the detailed motor model piece by piece in closed form and writes the state at each
 * sample instant into `out` (caller-allocated, length n). The kernel behind `simulateHybrid`:
 * validates nothing, allocates only its scratch, and never throws (bad constants give NaN).
 *
 * ## Method
 * Between events every mode of the model is linear with constant coefficients — free running
 * (2×2, exact matrix exponential in Cayley–Hamilton form), stuck or clamped rotor, running at the
 * current limit, or coasting with the circuit open (scalar exponentials) — so each piece is solved
 * exactly; the rotor angle is the exact integral of the speed. Coulomb friction has the sign of the
 * running direction; ω = 0 while running is located (Illinois regula falsi on the closed form),
 * then the rotor sticks when |Kt·i − τ_load| ≤ Ts or reverses; breakaway from rest, entry into and
 * exit from the current limit are located in closed form. Drag cd·ω|ω| is linearised about the
 * midpoint speed of each piece (predictor–corrector, second order in the piece length); the
 * winding temperature follows Cth·T' = R(T)·i² − (T − T_amb)/Rth with R(T) by the copper law,
 * updated per piece with the piece's mean i² (first order in the piece length, which is the
 * sample interval: thermal time constants are seconds to minutes). Without drag and heating the
 * result is the exact zero-order-hold solution of the lumped model.
 *
 * @param out - buffers of length n (current, speed, position, terminalVoltage, temperature)
 * @param params - constants and effect terms (see `DetailedParams`)
 * @param plan - sample instants, held input, start and circuit (see `HybridPlan`)
 * @returns `out`, with `events` set
 * @example
 * simulateHybridInto(trace, { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }, { time, input });
 */
export function simulateHybridInto(out: HybridTrace, params: DetailedParams, plan: HybridPlan): HybridTrace {
  const c = hybridConstants(params);
  const time = plan.time;
  const n = time.length;
  const input = plan.input;
  const inputTime = plan.inputTime;
  const openFrom = plan.openFrom ?? Infinity;
  const held = plan.rotor === 'held';
  const friction = c.Tc > 0 || c.Ts > 0;
  const sc: PieceScratch = { E: new Float64Array(4), Q: new Float64Array(4) };
  const T0 = plan.initialTemperature ?? c.ambient;
  const st: HybridState = { i: 0, w: 0, th: 0, T: T0, mode: RUN, dir: 1, lim: 1 };
  // Input pointer: the value active at time t is input[j] with inputTime[j] ≤ t < inputTime[j+1].
  let j = 0;
  const valueAt = (t: number): number => {
    if (inputTime === undefined) return NaN;
    while (j + 1 < inputTime.length && inputTime[j + 1]! <= t) j++;
    return input[j]!;
  };
  const u0 = inputTime === undefined ? input[0]! : valueAt(time[0]!);
  const init = plan.initial ?? 'rest';
  if (held) st.mode = HELD;
  if (init === 'steady') {
    if (held) { st.i = Math.max(-c.Imax, Math.min(c.Imax, u0 / (resistanceAt(c, T0) + c.Rs))); }
    else { steadyState(c, u0, T0, SS); st.i = SS[0]!; st.w = SS[1]!; st.mode = SS[2]!; st.lim = st.i >= 0 ? 1 : -1; }
  } else if (typeof init === 'object') {
    st.i = init.current;
    st.w = held ? 0 : init.speed;
  }
  if (!held && st.w === 0 && friction && st.mode === RUN) st.mode = STUCK;
  if (st.w !== 0) st.dir = st.w > 0 ? 1 : -1;
  if (time[0]! >= openFrom && !held) { st.mode = OPEN; st.i = 0; }
  let events = 0;
  const record = (k: number, u: number): void => {
    out.current[k] = st.i;
    out.speed[k] = st.w;
    out.position[k] = st.th;
    out.temperature[k] = st.T;
    const uEff = u > c.Vmax ? c.Vmax : u < -c.Vmax ? -c.Vmax : u;
    out.terminalVoltage[k] = st.mode === OPEN ? c.Ke * st.w
      : st.mode === 2 /* LIMIT */ ? resistanceAt(c, st.T) * st.i + c.Ke * st.w
      : uEff - c.Rs * st.i;
  };
  for (let k = 0; k < n; k++) {
    const t = time[k]!;
    const uHere = inputTime === undefined ? input[Math.min(k, input.length - 1)]! : valueAt(t);
    record(k, uHere);
    if (k + 1 === n) break;
    const t1 = time[k + 1]!;
    // Pieces: split at input changes (own grid) and at the opening of the circuit.
    let a = t;
    while (a < t1) {
      let b = t1;
      let u: number;
      if (inputTime === undefined) u = input[k]!;
      else {
        u = valueAt(a);
        if (j + 1 < inputTime.length && inputTime[j + 1]! < b) b = inputTime[j + 1]!;
      }
      if (openFrom > a && openFrom < b) b = openFrom;
      if (a >= openFrom && st.mode !== OPEN && !held) { st.i = 0; st.mode = OPEN; }
      events += advance(c, st, u, b - a, sc);
      a = b;
    }
    if (t1 >= openFrom && st.mode !== OPEN && !held) { st.i = 0; st.mode = OPEN; }
  }
  out.events = events;
  return out;
}

