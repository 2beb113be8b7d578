import type { ChannelFit, RecordingData } from './types.js';

/**
 * The measured series a fitted channel is compared with: the logged current or speed; for
 * `angle` (an encoder speed fitted as its angle) the running integral Σ ω_k·(t_k − t_{k−1}) of the
 * logged speed; for `voltage` the logged terminal voltage. Undefined when the recording lacks it.
 *
 * @param recording - the recording the fit was made on
 * @param channel - the fitted channel's name
 * @returns the series [SI], or undefined
 * @example
 * measuredChannel(run, 'angle'); // => Float64Array of angles [rad] from the first sample
 */
export function measuredChannel(recording: RecordingData, channel: ChannelFit['channel']): Float64Array | undefined {
  if (channel === 'angle') {
    const w = recording.channels.speed;
    if (w === undefined) return undefined;
    const t = recording.time;
    const a = new Float64Array(w.length);
    for (let k = 1; k < a.length; k++) a[k] = a[k - 1]! + w[k]! * (t[k]! - t[k - 1]!);
    return a;
  }
  return recording.channels[channel];
}
