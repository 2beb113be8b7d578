/**
 * A maximal-length pseudo-random binary sequence from a 9-bit Fibonacci LFSR (x⁹ + x⁵ + 1,
 * period 511).
 *
 * ## References
 * S. W. Golomb, *Shift Register Sequences*, Holden-Day, 1967 (maximal-length sequences).
 *
 * @param count - number of bits wanted, ≥ 0
 * @param seed - non-zero 9-bit start state @default 0x1ff
 * @returns Uint8Array of 0/1 bits
 * @throws RangeError for a negative count or a zero state
 * @example
 * prbsBits(8); // => Uint8Array [1, 1, 1, 1, 1, 1, 1, 1] (start state all ones)
 */
export function prbsBits(count: number, seed = 0x1ff): Uint8Array {
  if (!(count >= 0) || !Number.isInteger(count)) throw new RangeError(`prbsBits: count must be an integer >= 0 (got ${count})`);
  let state = seed & 0x1ff;
  if (state === 0) throw new RangeError(`prbsBits: seed must have a non-zero low 9 bits (got ${seed})`);
  const out = new Uint8Array(count);
  for (let k = 0; k < count; k++) {
    out[k] = state & 1;
    const fb = ((state >> 0) ^ (state >> 4)) & 1; // taps 9 and 5
    state = (state >> 1) | (fb << 8);
  }
  return out;
}
