import { describe, expect, it } from 'vitest';
import { detectRole, ingestText, splitHeader } from '../index.js';
import type { ChannelRole } from '../index.js';

// All recordings in this file are invented for the tests.

describe('headers are split into name and unit', () => {
  it.each([
    ['time [ms]', 'time', 'ms', 'brackets'],
    ['t(s)', 't', 's', 'parens'],
    ['Voltage (mV)', 'Voltage', 'mV', 'parens'],
    ['I [A]', 'I', 'A', 'brackets'],
    ['U / V', 'U', 'V', 'slash'],
    ['omega (rad/s)', 'omega', 'rad/s', 'parens'],
    ['current_mA', 'current', 'mA', 'suffix'],
    ['speed_rpm', 'speed', 'rpm', 'suffix'],
    ['time_s', 'time', 's', 'suffix'],
    ['V_in', 'V_in', null, null],
    ['notes', 'notes', null, null],
  ])('%s → name %s, unit %s', (header, name, unit, syntax) => {
    expect(splitHeader(header)).toEqual({ name, unit, syntax });
  });
});

describe('column roles come from header names', () => {
  it.each<[string, ChannelRole | null]>([
    ['time', 'time'], ['t', 'time'], ['Timestamp', 'time'],
    ['Voltage', 'voltage'], ['V', 'voltage'], ['U', 'voltage'], ['Vin', 'voltage'], ['U_arm', 'voltage'], ['motor voltage', 'voltage'],
    ['I', 'current'], ['Ia', 'current'], ['I_arm', 'current'], ['armature current', 'current'], ['current', 'current'],
    ['speed', 'speed'], ['omega', 'speed'], ['ω', 'speed'], ['w', 'speed'], ['rpm', 'speed'], ['n_tach', 'speed'], ['shaft velocity', 'speed'],
    ['position', 'position'], ['pos', 'position'], ['enc', 'position'], ['encoder', 'position'], ['θ', 'position'], ['angle', 'position'],
    ['torque', 'torque'], ['τ', 'torque'], ['load torque', 'torque'],
    ['temp', 'temperature'], ['Temperature', 'temperature'], ['winding temp', 'temperature'],
    ['speed_ref', null], ['speed setpoint', null], ['I_cmd', null], ['reference position', null], ['w_est', null], ['speed error', null],
    ['T', null], ['notes', null], ['', null], ['voltage current', null],
  ])('%j → %s', (name, role) => {
    expect(detectRole(name).role).toBe(role);
  });

  it('reads the example headers of the brief with their units', () => {
    const csv = 'time [ms],Voltage (mV),I [A],speed [rpm],position [counts],torque [oz-in],temp [°C]\n0,0,0,0,0,0,20\n1,1000,1,60,1024,1,20\n2,2000,2,120,2048,2,21\n';
    const r = ingestText(csv, { countsPerRevolution: 4096 });
    const cols = r.recording.meta.columns.map((c) => [c.header, c.role, c.canonicalUnit, c.unitSource]);
    expect(cols).toEqual([
      ['time [ms]', 'time', 'ms', 'header-brackets'],
      ['Voltage (mV)', 'voltage', 'mV', 'header-parens'],
      ['I [A]', 'current', 'A', 'header-brackets'],
      ['speed [rpm]', 'speed', 'rpm', 'header-brackets'],
      ['position [counts]', 'position', 'counts', 'header-brackets'],
      ['torque [oz-in]', 'torque', 'ozf·in', 'header-brackets'],
      ['temp [°C]', 'temperature', '°C', 'header-brackets'],
    ]);
    expect(r.recording.channels.voltage![2]).toBe(2);
    expect(r.recording.channels.speed![1]).toBe(2 * Math.PI);
    expect(r.recording.channels.position![2]).toBe(Math.PI);
    // Speed was logged, so it is not derived from position.
    expect(r.recording.meta.derived).toEqual([]);
  });

  it('reads t(s), omega (rad/s), current_mA and enc (counts implied by the name)', () => {
    const r = ingestText('t(s),omega (rad/s),current_mA,enc\n0,1,100,0\n0.5,2,200,10\n1,3,300,20\n', { countsPerRevolution: 40 });
    expect(Array.from(r.recording.channels.current!)).toEqual([0.1, 0.2, 0.3]);
    expect(r.recording.channels.speed![2]).toBe(3);
    const enc = r.recording.meta.columns[3]!;
    expect(enc).toMatchObject({ role: 'position', canonicalUnit: 'counts', unitSource: 'name', unitAssumed: false });
    expect(r.recording.channels.position![2]).toBe(Math.PI);
  });

  it('settles the bare symbol T by its unit', () => {
    expect(ingestText('T [s],T [°C]\n0,20\n1,21\n2,22\n').recording.meta.columns.map((c) => c.role)).toEqual(['time', 'temperature']);
    const r = ingestText('time [s],T [N·m]\n0,0\n1,0.1\n2,0.2\n');
    expect(r.recording.channels.torque![2]).toBe(0.2);
    const u = ingestText('time [s],T\n0,0\n1,0.1\n2,0.2\n');
    expect(u.recording.extra[0]!.name).toBe('T');
    expect(u.issues.find((i) => i.code === 'unrecognised-column')!.message).toContain('"T" may be time, temperature or torque');
  });

  it('an explicit map overrides detection, by header text, name or index', () => {
    const csv = 'stamp,Ia (A),speed [rpm],w_est [rad/s]\n0,1,0,0\n1,2,60,6\n2,3,120,12\n';
    const r = ingestText(csv, { map: { time: 'stamp', current: 'Ia (A)', speed: 3 } });
    expect(r.recording.meta.columns.map((c) => [c.role, c.roleSource])).toEqual([
      ['time', 'map'], ['current', 'map'], ['extra', 'none'], ['speed', 'map'],
    ]);
    expect(r.recording.channels.speed![2]).toBe(12);
    expect(r.issues.find((i) => i.code === 'duplicate-role')).toMatchObject({ column: 'speed [rpm]' });
    expect(r.recording.extra.map((e) => e.name)).toEqual(['speed [rpm]']);
    expect(ingestText(csv, { map: { time: 'STAMP', current: 'Ia' } }).recording.meta.columns[1]!.role).toBe('current');
  });

  it('rejects a map entry that names no column, listing the header', () => {
    expect(() => ingestText('time,v\n0,0\n1,1\n2,2\n', { map: { current: 'Ia' } })).toThrowError(/the map gives current the column "Ia", but the header \(line 1\) has "time", "v"/);
  });

  it('takes a unit per column from options.units (by header, name or role) and says when it overrides the header', () => {
    const r = ingestText('time,Ia,speed [rpm]\n0,100,0\n1,200,60\n2,300,120\n', { units: { Ia: 'mA', time: 'ms', 'speed [rpm]': 'rad/s' } });
    expect(Array.from(r.recording.time)).toEqual([0, 0.001, 0.002]);
    expect(Array.from(r.recording.channels.current!)).toEqual([0.1, 0.2, 0.3]);
    expect(r.recording.channels.speed![2]).toBe(120);
    expect(r.recording.meta.columns[1]).toMatchObject({ unit: 'mA', unitSource: 'option', unitAssumed: false });
    expect(r.issues.find((i) => i.code === 'unit-overridden')).toMatchObject({ column: 'speed [rpm]' });
  });

  it('assumes default units where none is written, and says so', () => {
    const r = ingestText('time,voltage,current,speed\n0,0,0,0\n1,1,1,1\n2,2,2,2\n');
    const assumed = r.issues.filter((i) => i.code === 'assumed-unit');
    expect(assumed.map((i) => [i.column, i.severity])).toEqual([
      ['time', 'info'], ['voltage', 'info'], ['current', 'info'], ['speed', 'warning'],
    ]);
    expect(r.recording.meta.columns[0]).toMatchObject({ unit: null, canonicalUnit: 's', unitAssumed: true, unitSource: 'default' });
    expect(r.recording.meta.columns[0]!.unitAssumedReason).toContain('assumed in s');
  });

  it('keeps unrecognised numeric columns in extra and reports each one', () => {
    const r = ingestText('time [s],voltage [V],speed setpoint [rpm],ch7 [V]\n0,0,0.1,5\n1,1,0.2,5\n2,2,0.3,5\n');
    expect(r.recording.extra.map((e) => [e.name, Array.from(e.values), e.reason])).toEqual([
      ['speed setpoint [rpm]', [0.1, 0.2, 0.3], 'the name marks a speed set-point (command), not a measurement'],
      ['ch7 [V]', [5, 5, 5], 'the name matches no known quantity'],
    ]);
    expect(r.issues.find((i) => i.code === 'set-point-column')).toMatchObject({ column: 'speed setpoint [rpm]', severity: 'info' });
    const issues = r.issues.filter((i) => i.code === 'unrecognised-column');
    expect(issues.map((i) => i.column)).toEqual(['ch7 [V]']);
    expect(issues[0]!.message).toContain('unit suggests voltage');
    expect(issues[0]!.fix).toEqual([{ option: 'map', entries: [['voltage', 'ch7 [V]']] }]);
  });

  it('treats __proto__, constructor and toString as ordinary header names', () => {
    const r = ingestText('time [s],__proto__,constructor,toString,hasOwnProperty\n0,1,2,3,4\n1,1,2,3,4\n2,1,2,3,4\n', {
      units: {},
    });
    expect(r.recording.extra.map((e) => e.name)).toEqual(['__proto__', 'constructor', 'toString', 'hasOwnProperty']);
    expect(Array.from(r.recording.extra[0]!.values)).toEqual([1, 1, 1]);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(Object.getPrototypeOf({})).toBe(Object.prototype);
    // A units option keyed by such names is read as own data only.
    const u = ingestText('time,constructor\n0,1\n1,2\n2,3\n', { map: { voltage: 'constructor' }, units: JSON.parse('{"__proto__": "mV", "constructor": "mV"}') as Record<string, string> });
    expect(Array.from(u.recording.channels.voltage!)).toEqual([0.001, 0.002, 0.003]);
  });

  it('refuses two columns with the same name, naming both and their positions', () => {
    expect(() => ingestText('time [s],x,x\n0,1,2\n1,1,2\n2,1,2\n')).toThrowError(/columns 2 \("x"\) and 3 \("x"\) of the header on line 1 have the same name/);
  });
});
