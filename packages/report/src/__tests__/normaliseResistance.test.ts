import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { normaliseResistance } from '../normaliseResistance.js';

describe('normaliseResistance', () => {
  it('carries 2.0 Ω at 20 °C to 75 °C by the copper law in both published forms (FACTS.md §3)', () => {
    const ieee = normaliseResistance(2.0, [1.9, 2.1], 20, 75);
    // FACTS.md §3 worked correction: 2.0 × 309.5/254.5 = 2.432220039 Ω (k = 234.5, printed to 10 digits).
    expectClose(ieee.value!, 2.432220039, { rel: 5e-10, abs: 0 }, 'k = 234.5 (FACTS.md §3)');
    expect(ieee.form).toBe('IEEE Std 113 form');
    // Interval carried by the same factor 309.5/254.5 (derived here).
    expectClose(ieee.ci95![0], 1.9 * (309.5 / 254.5), { rel: 1e-15, abs: 0 }, 'low');
    const iec = normaliseResistance(2.0, null, 20, 75, 235);
    // FACTS.md §3: 2.0 × 310/255 = 2.431372549 Ω (k = 235).
    expectClose(iec.value!, 2.431372549, { rel: 5e-10, abs: 0 }, 'k = 235 (FACTS.md §3)');
    expect(iec.form).toBe('IEC 60034-1 form');
    expect(iec.note).toContain('k = 235');
  });

  it('states that R is not normalised when the winding temperature is unknown', () => {
    const r = normaliseResistance(2.0, null, null);
    expect(r.value).toBeNull();
    expect(r.windingTemperatureSource).toBe('unknown');
    expect(r.referenceTemperature).toBe(25);
    expect(r.note).toContain('not normalised');
    // Says it was not computed and why, in words a library user and a command-line user both read.
    expect(r.note).toMatch(/^not computed: the winding temperature is unknown/);
    expect(r.note).not.toMatch(/option|--/);
  });

  it('rejects a temperature at or below −k and an unknown copper constant', () => {
    expect(() => normaliseResistance(2, null, -234.5)).toThrow('normaliseResistance: windingTemperature must be finite and above −234.5 °C (got -234.5)');
    expect(() => normaliseResistance(2, null, 20, 25, 230 as 235)).toThrow('copperConstant must be 234.5 or 235 (got 230)');
    expect(() => normaliseResistance(0, null, 20)).toThrow(RangeError);
  });
});
