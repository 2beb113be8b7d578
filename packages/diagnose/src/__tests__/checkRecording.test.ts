import { describe, expect, it } from 'vitest';
import { checkRecording } from '../internal.js';

describe('checkRecording remembers a checked recording object, and checks again when its arrays change', () => {
  it('a replaced time array or channel, or an added channel, is checked again', () => {
    const time = Float64Array.from({ length: 20 }, (_, k) => k * 1e-3);
    const rec: { time: Float64Array; channels: Record<string, Float64Array> } = { time, channels: { current: new Float64Array(20).fill(0.5) } };
    expect(checkRecording('t', rec)).toEqual({ n: 20, dt: 1e-3 });
    // The same arrays: the answer again (the sample interval of the first check).
    expect(checkRecording('t', rec).dt).toBe(1e-3);
    // A new time array of the same length with another interval: checked again.
    rec.time = Float64Array.from({ length: 20 }, (_, k) => k * 2e-3);
    expect(checkRecording('t', rec).dt).toBe(2e-3);
    // A replaced channel holding a NaN: refused, naming it.
    const bad = new Float64Array(20).fill(1);
    bad[7] = Number.NaN;
    rec.channels.current = bad;
    expect(() => checkRecording('t', rec)).toThrow('t: recording.channels.current[7] must be finite (got NaN)');
    // An added channel of the wrong length: refused.
    rec.channels.current = new Float64Array(20);
    rec.channels.speed = new Float64Array(19);
    expect(() => checkRecording('t', rec)).toThrow('t: recording.channels.speed has 19 samples, time has 20');
  });
});
