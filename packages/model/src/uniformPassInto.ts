/**
 * Private kernel of `simulateInto` for a uniform interval (not exported from the package).
 *
 * Runs x_{k+1} = Φ·x_k + Γv·v_k + c over the whole record, two samples per loop-carried update:
 * x_{k+2} = Φ²·x_k + (ΦΓv·v_k + Γv·v_{k+1} + (I+Φ)c). The sample in between is the ordinary one
 * step from x_k, off that chain. Block size 2 was chosen by measurement (a scratch comparison of
 * blocks 2, 3, 4 and 8 timed interleaved in one process; 2 and 3 level, 4 and 8 slower; the shipped
 * kernel is timed in bench/model.ts): the 2-block has 12 loop-invariant coefficients
 * (16 with a load) against 22 for the 4-block, more than the 16 floating-point registers of x86-64,
 * and per sample it does fewer operations (12 vs 13 without load). A zero load runs a separate loop
 * without the constant terms (two adds per sample fewer). The loop body holds two consecutive
 * 2-blocks (four samples), which saves loop overhead; the (n − 1) mod 4 leftover steps are single
 * steps done first, so that this loop runs to the end of the record.
 *
 * @param current - output current [A], length ≥ n; sample 0 is left to the caller
 * @param speed - output speed [rad/s], length ≥ n; sample 0 is left to the caller
 * @param voltage - terminal voltage per sample [V] (n = voltage.length ≥ 1)
 * @param m - one-step matrices from `zohInto`: Φ (row-major, 4), Γv (2), Γτ (2)
 * @param tau - constant load torque [N·m]; exactly 0 selects the loop without load terms
 * @param i0 - initial current x_0 [A]
 * @param w0 - initial speed x_0 [rad/s]
 * @returns nothing; fills samples 1…n − 1
 * @example
 * // inside simulateInto, after current[0] = i0 and speed[0] = w0:
 * zohInto(m, p, h);
 * uniformPassInto(current, speed, voltage, m, tau, i0, w0);
 */
export function uniformPassInto(
  current: Float64Array,
  speed: Float64Array,
  voltage: Float64Array,
  m: Float64Array,
  tau: number,
  i0: number,
  w0: number,
): void {
  const n = voltage.length;
  const p11 = m[0]!, p12 = m[1]!, p21 = m[2]!, p22 = m[3]!;
  const g1 = m[4]!, g2 = m[5]!;
  // Φ² and ΦΓv, formed once by 2×2 products.
  const q11 = p11 * p11 + p12 * p21, q12 = p11 * p12 + p12 * p22;
  const q21 = p21 * p11 + p22 * p21, q22 = p21 * p12 + p22 * p22;
  const h1 = p11 * g1 + p12 * g2, h2 = p21 * g1 + p22 * g2;
  let i = i0;
  let w = w0;
  // The (n − 1) mod 4 leftover steps go first, as single steps, so that the unrolled loop runs to
  // the end of the record.
  const head = 1 + ((n - 1) % 4);
  let k = 1;
  if (tau === 0) {
    for (; k < head; k++) {
      const v = voltage[k - 1]!;
      const iNext = p11 * i + g1 * v + p12 * w;
      w = p22 * w + g2 * v + p21 * i;
      i = iNext;
      current[k] = i;
      speed[k] = w;
    }
    // Two 2-blocks per iteration (unrolled once: measured a few % faster than one block).
    for (; k < n; k += 4) {
      const v0 = voltage[k - 1]!, v1 = voltage[k]!, v2 = voltage[k + 1]!, v3 = voltage[k + 2]!;
      // Off the chain: the sample inside the block, one step from the block start.
      current[k] = p11 * i + g1 * v0 + p12 * w;
      speed[k] = p22 * w + g2 * v0 + p21 * i;
      // On the chain: x ← Φ²·x + u, with u independent of the state.
      const a1 = q11 * i + (h1 * v0 + g1 * v1) + q12 * w;
      const a2 = q22 * w + (h2 * v0 + g2 * v1) + q21 * i;
      current[k + 1] = a1;
      speed[k + 1] = a2;
      current[k + 2] = p11 * a1 + g1 * v2 + p12 * a2;
      speed[k + 2] = p22 * a2 + g2 * v2 + p21 * a1;
      i = q11 * a1 + (h1 * v2 + g1 * v3) + q12 * a2;
      w = q22 * a2 + (h2 * v2 + g2 * v3) + q21 * a1;
      current[k + 3] = i;
      speed[k + 3] = w;
    }
    return;
  }
  const c1 = m[6]! * tau, c2 = m[7]! * tau;
  const d1 = p11 * c1 + p12 * c2 + c1, d2 = p21 * c1 + p22 * c2 + c2; // (I+Φ)c
  for (; k < head; k++) {
    const v = voltage[k - 1]!;
    const iNext = p11 * i + (g1 * v + c1) + p12 * w;
    w = p22 * w + (g2 * v + c2) + p21 * i;
    i = iNext;
    current[k] = i;
    speed[k] = w;
  }
  for (; k < n; k += 4) {
    const v0 = voltage[k - 1]!, v1 = voltage[k]!, v2 = voltage[k + 1]!, v3 = voltage[k + 2]!;
    current[k] = p11 * i + (g1 * v0 + c1) + p12 * w;
    speed[k] = p22 * w + (g2 * v0 + c2) + p21 * i;
    const a1 = q11 * i + (h1 * v0 + d1 + g1 * v1) + q12 * w;
    const a2 = q22 * w + (h2 * v0 + d2 + g2 * v1) + q21 * i;
    current[k + 1] = a1;
    speed[k + 1] = a2;
    current[k + 2] = p11 * a1 + (g1 * v2 + c1) + p12 * a2;
    speed[k + 2] = p22 * a2 + (g2 * v2 + c2) + p21 * a1;
    i = q11 * a1 + (h1 * v2 + d1 + g1 * v3) + q12 * a2;
    w = q22 * a2 + (h2 * v2 + d2 + g2 * v3) + q21 * a1;
    current[k + 3] = i;
    speed[k + 3] = w;
  }
}
