/**
 * Clean invented recordings (motorprint's generator, lumped model) with what a logger adds — a
 * bipolar 12-bit ADC on voltage and current, or a 1000-count encoder for the speed — draw no
 * effect finding and no extension of the model. A few seeds here; `pnpm bench findings` runs 20
 * per kind and artefact and prints the rates (with jitter too). A multisine with a coarse
 * encoder speed was once taken for a coast-down (its current swings about a small mean).
 */
import { describe, expect, it } from 'vitest';
import { falseAlarmRates } from '../../../../bench/lib/findingRates.js';

describe('no false effect calls on clean recordings with logger artefacts', () => {
  it('step, prbs, steady-state, multisine, locked-rotor and coast-down × (12-bit ADC; ADC + encoder), 3 seeds each: at most one call in all', () => {
    const rows = falseAlarmRates(['step', 'prbs', 'steady-state', 'multisine', 'locked-rotor', 'coast-down'], [1, 2, 3], ['adc12', 'adc12+encoder']);
    const total = rows.reduce((a, r) => a + r.alarms, 0);
    const tried = rows.reduce((a, r) => a + r.tried, 0);
    const calls = rows.filter((r) => r.alarms > 0).map((r) => `${r.kind}/${r.artefacts}: ${JSON.stringify(r.codes)}`);
    expect(tried).toBe(33);
    expect(total, calls.join('; ')).toBeLessThanOrEqual(1);
  }, 600_000);
});
