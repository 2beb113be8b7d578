import type { PreparedRecording } from './prepareRecording.js';

/**
 * The first `len` samples of a recording from just before its first command switch (the rotor is
 * at rest there), for the windowed starts; coast-downs and short recordings are kept whole.
 */
export function windowOf(r: PreparedRecording, len: number): PreparedRecording {
  const n = r.time.length;
  if (n <= len || r.kind === 'coast-down') return r;
  let k0 = 0;
  if (r.handling.stepTime !== null) {
    while (k0 < n && r.time[k0]! < r.handling.stepTime) k0++;
    k0 = Math.min(Math.max(k0 - 8, 0), n - len);
  }
  const cut = (x: Float64Array | null): Float64Array | null => (x === null ? null : x.subarray(k0, k0 + len));
  return {
    ...r, time: r.time.subarray(k0, k0 + len), timeBase: typeof r.timeBase === 'number' ? r.timeBase : r.time.subarray(k0, k0 + len),
    input: r.input.subarray(k0, k0 + len), current: cut(r.current), speed: cut(r.speed),
    levels: r.levels === null ? null : { ...r.levels, classOf: r.levels.classOf.subarray(k0, k0 + len) },
  };
}
