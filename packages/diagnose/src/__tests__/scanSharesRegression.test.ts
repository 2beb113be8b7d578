import { describe, expect, it } from 'vitest';
import { detectFriction } from '../detectFriction.js';
import { detectStiction } from '../detectStiction.js';
import { diagnoseFit } from '../diagnoseFit.js';
import { identifyMotor } from '../identifyMotor.js';
import { scanRecording, shareScans } from '../scanRecording.js';
import type { Finding, RecordingKind, RecordingLike } from '../types.js';
import { MOTOR, invented, inventedRamp } from './inventedRecordings.js';

/**
 * scanRecording runs the friction and stiction detectors on one shared mechanical regression;
 * what they find must be what each finds on its own.
 */
function alone(rec: RecordingLike, kind: RecordingKind, alpha?: number): { friction: Finding[]; stiction: Finding | null; comparisons: unknown[] } {
  const f = detectFriction(rec, { kind, ...(alpha !== undefined ? { alpha } : {}) });
  return { friction: f.findings, stiction: kind !== 'coast-down' && kind !== 'locked-rotor' ? detectStiction(rec) : null, comparisons: f.comparisons };
}

describe('scanRecording with one mechanical regression for friction and stiction', () => {
  const cases: [string, RecordingLike, RecordingKind][] = [
    ['a slow ramp with stiction and Coulomb friction', inventedRamp({ ...MOTOR, Tc: 2e-3, Ts: 5e-3 }, 3), 'unknown'],
    ['a slow ramp with Coulomb friction only', inventedRamp({ ...MOTOR, Tc: 2e-3 }, 4), 'unknown'],
    ['a PRBS with Coulomb friction', invented({ ...MOTOR, Tc: 2e-3 }, 'prbs', 5), 'prbs'],
    ['a step without friction beyond viscous', invented(MOTOR, 'step', 6), 'step'],
  ];
  for (const [what, rec, kind] of cases) {
    for (const alpha of [undefined, 0.2]) {
      it(`finds on ${what} (alpha ${alpha ?? 'default'}) what the two detectors find alone`, () => {
        const scan = scanRecording(rec, { kind, ...(alpha !== undefined ? { alpha } : {}) });
        const own = alone(rec, kind, alpha);
        const fromScan = scan.findings.filter((f) => f.code === 'coulomb-friction' || f.code === 'speed-squared-drag' || f.code === 'stiction');
        expect(fromScan).toEqual([...own.friction, ...(own.stiction ? [own.stiction] : [])]);
        expect(scan.comparisons).toEqual(own.comparisons);
      });
    }
  }

  it('the cases are not all silent: stiction and Coulomb friction are among what they find', () => {
    const codes = cases.flatMap(([, rec, kind]) => scanRecording(rec, { kind }).findings.map((f) => f.code));
    expect(codes).toContain('stiction');
    expect(codes).toContain('coulomb-friction');
  });
});

describe('shareScans: one scan per recording and options inside identifyMotor', () => {
  const rec = invented({ ...MOTOR, Tc: 2e-3 }, 'prbs', 5);

  it('inside the scope the same recording and options give the very same scan; other options or arrays a scan of their own', () => {
    shareScans(() => {
      const a = scanRecording(rec, { kind: 'prbs' });
      expect(scanRecording(rec, { kind: 'prbs' })).toBe(a);
      const other = scanRecording(rec, { kind: 'prbs', alpha: 0.2 });
      expect(other).not.toBe(a);
      // The same numbers in new arrays are another recording to the memo (arrays by identity).
      const copy = { ...rec, channels: { ...rec.channels, speed: Float64Array.from(rec.channels.speed!) } };
      const c = scanRecording(copy, { kind: 'prbs' });
      expect(c).not.toBe(a);
      expect(c).toEqual(a);
    });
  });

  it('inside the scope a malformed recording still gets the messages of the scan itself', () => {
    shareScans(() => {
      expect(() => scanRecording(null as unknown as RecordingLike)).toThrow(/^scanRecording: recording\.time must be a Float64Array/);
      expect(() => scanRecording({ time: rec.time, channels: null } as unknown as RecordingLike)).toThrow(/^scanRecording: recording\.channels must be an object/);
    });
  });

  it('outside the scope each call scans afresh, with the same result', () => {
    const a = scanRecording(rec, { kind: 'prbs' });
    const b = scanRecording(rec, { kind: 'prbs' });
    expect(b).not.toBe(a);
    expect(b).toEqual(a);
  });

  it('identifyMotor on a recording whose model grows (one diagnosis per model) ends with what a fresh diagnosis of its fit finds', () => {
    const id = identifyMotor([{ recording: rec, name: 'prbs' }]);
    expect(id.model.extensions).toContain('coulomb');
    const fresh = diagnoseFit(id.fit, [{ recording: rec, name: 'prbs' }]);
    expect(id.diagnosis.comparisons).toEqual(fresh.comparisons);
    expect(id.diagnosis.comparisons.length).toBeGreaterThan(0);
  });
});
