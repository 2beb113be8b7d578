import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { expectClose } from '@motorprint/testkit';
import { describe, expect, it } from 'vitest';
import { describeRecording, detectRole, ingestText, IngestError, readRecording, splitHeader } from '../index.js';
import type { ChannelRole, DerivedCommandVoltage, IngestErrorCode, IngestOptions } from '../index.js';

// Every recording here is invented: the files in packages/ingest/fixtures/ (see the README there)
// and the short CSV strings below were written by hand for these tests.

const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), '../../fixtures');
const read = (name: string, options: IngestOptions = {}) => readRecording(join(FIXTURES, name), options);
const RPM = (2 * Math.PI) / 60; // rad/s per r/min (definition of the revolution, 2π rad)
const DEG = Math.PI / 180; // rad per degree (definition)

function failure(run: () => unknown): IngestError {
  try {
    run();
  } catch (e) {
    expect(e).toBeInstanceOf(IngestError);
    return e as IngestError;
  }
  throw new Error('expected an IngestError');
}

async function asyncFailure(run: () => Promise<unknown>): Promise<IngestError> {
  try {
    await run();
  } catch (e) {
    expect(e).toBeInstanceOf(IngestError);
    return e as IngestError;
  }
  throw new Error('expected an IngestError');
}

describe('units written as a suffix are read, not assumed', () => {
  it.each([
    ['time_ms', 'time', 'ms'],
    ['current_mA', 'current', 'mA'],
    ['speed_rad_s', 'speed', 'rad/s'],
    ['motor_speed_deg_s', 'motor_speed', 'deg/s'],
    ['n_rpm', 'n', 'rpm'],
    ['torque_mNm', 'torque', 'mNm'],
    ['u_V', 'u', 'V'],
    ['u_cmd_V', 'u_cmd', 'V'],
    ['supply_voltage_V', 'supply_voltage', 'V'],
    ['speed_rad_per_s', 'speed', 'rad/s'],
    ['torque_N_m', 'torque', 'N·m'],
    ['temp_deg_C', 'temp', 'deg·C'],
    ['Motor current mA', 'Motor current', 'mA'],
    ['Time ms', 'Time', 'ms'],
  ])('%s → name %s, unit %s', (header, name, unit) => {
    expect(splitHeader(header)).toEqual({ name, unit, syntax: 'suffix' });
  });

  it.each(['V_in', 'V_m', 'I_arm', 'U_arm', 'n_tach', 'w_shaft', 'speed_ref', '1st motor velocity', 'speed_sd'])('%s keeps its whole name', (header) => {
    expect(splitHeader(header)).toEqual({ name: header, unit: null, syntax: null });
  });

  it('drops a suffix that repeats the bracketed unit, and refuses one that contradicts it', () => {
    expect(splitHeader('speed_rad_s (rad/s)')).toEqual({ name: 'speed', unit: 'rad/s', syntax: 'parens' });
    const e = failure(() => ingestText('time [s],speed_rpm [rad/s]\n0,0\n1,1\n2,2\n', { fileName: 'x.csv' }));
    expect(e).toMatchObject({ code: 'conflicting-units', line: 1, column: 'speed_rpm [rad/s]' });
    expect(e.message).toContain('"rpm" in its name and "rad/s" in brackets');
  });

  it('reads the suffix fixture in SI: ms, mA with its rest offset, deg/s (not rad/s), mN·m', async () => {
    const { recording, issues } = await read('suffix-units.csv');
    expect(issues.filter((i) => i.code === 'assumed-unit')).toEqual([]);
    expect(recording.meta.columns.map((c) => [c.header, c.role, c.canonicalUnit, c.unitSource])).toEqual([
      ['time_ms', 'time', 'ms', 'header-suffix'],
      ['u_cmd_V', 'commandVoltage', 'V', 'header-suffix'],
      ['current_mA', 'current', 'mA', 'header-suffix'],
      ['motor_speed_deg_s', 'speed', 'deg/s', 'header-suffix'],
      ['torque_mNm', 'torque', 'mN·m', 'header-suffix'],
    ]);
    expectClose(recording.time[4]!, 0.004, { rel: 1e-15 }, '4 ms in s');
    // 4.8828125 mA is 10 steps of a 12-bit ±1 A converter: the logged rest offset, kept as read.
    expectClose(recording.channels.current![0]!, 0.0048828125, { rel: 1e-15 }, 'current offset [A]');
    // 1719 deg/s (derived here: 1719 · π/180 = 30.002 rad/s); read as rad/s it would be 57× too large.
    expectClose(recording.channels.speed![4]!, 1719 * DEG, { rel: 1e-15 }, 'speed [rad/s]');
    expectClose(recording.channels.torque![1]!, 0.0125, { rel: 1e-15 }, '12.5 mN·m in N·m');
    expect(recording.channels.voltage).toBeUndefined();
    expect(recording.channels.commandVoltage![1]).toBe(12);
  });

  it('reads units written after a space, in a tab-separated file', async () => {
    const { recording } = await read('space-suffix-units.csv');
    expect(recording.meta.columns.map((c) => [c.role, c.canonicalUnit, c.unitSource])).toEqual([
      ['time', 'ms', 'header-suffix'],
      ['current', 'mA', 'header-suffix'],
      ['speed', 'rpm', 'header-suffix'],
      ['voltage', 'V', 'header-suffix'],
    ]);
    expectClose(recording.channels.speed![3]!, 360 * RPM, { rel: 1e-15 }, '360 r/min');
    expectClose(recording.channels.current![0]!, -0.00244140625, { rel: 1e-15 }, 'negative rest offset [A]');
  });
});

describe('a units row under the names row is read', () => {
  it('with a short-name row under it, in a semicolon file with decimal commas', async () => {
    const { recording, issues } = await read('units-row.csv');
    expect(recording.meta.dialect).toMatchObject({ headerLine: 2, unitsLine: 3, shortNamesLine: 4, decimalSeparator: ',' });
    expect(recording.meta.rowsRead).toBe(4);
    expect(issues.filter((i) => i.code === 'assumed-unit' || i.code === 'rows-dropped')).toEqual([]);
    expect(recording.meta.columns.map((c) => [c.header, c.shortName, c.role, c.canonicalUnit, c.unitSource])).toEqual([
      ['Time', 't', 'time', 'ms', 'units-row'],
      ['Motor speed', 'w', 'speed', 'rad/s', 'units-row'],
      ['Armature current', 'ia', 'current', 'mA', 'units-row'],
      ['Terminal voltage', 'ua', 'voltage', 'V', 'units-row'],
      ['Bus voltage', 'vb', 'supplyVoltage', 'V', 'units-row'],
    ]);
    expectClose(recording.time[3]!, 0.0015, { rel: 1e-15 }, '1,5 ms');
    expectClose(recording.channels.current![1]!, 1.001953125, { rel: 1e-15 }, '1001,953125 mA');
    expect(recording.channels.supplyVoltage![0]).toBe(24.0234375);
  });

  it('without a short-name row (German names)', async () => {
    const { recording } = await read('units-row-no-short-names.csv');
    expect(recording.meta.dialect).toMatchObject({ unitsLine: 3, shortNamesLine: null });
    expect(recording.meta.columns.map((c) => [c.role, c.canonicalUnit])).toEqual([
      ['time', 's'], ['speed', 'rpm'], ['current', 'A'], ['voltage', 'V'],
    ]);
    expectClose(recording.channels.speed![3]!, 190 * RPM, { rel: 1e-15 }, '190 r/min');
  });

  it('takes the role from the short name when the long name says nothing', () => {
    const r = ingestText('Kanal 1,Kanal 2,Kanal 3\nms,V,A\nt,u,i\n0,0,0\n1,12,2\n2,12,1.9\n');
    expect(r.recording.meta.columns.map((c) => [c.role, c.roleSource])).toEqual([
      ['time', 'short-name'], ['voltage', 'short-name'], ['current', 'short-name'],
    ]);
  });

  it('refuses a units row that contradicts the header, naming both lines', () => {
    const e = failure(() => ingestText('time [s],speed [rpm]\ns,rad/s\n0,0\n1,1\n2,2\n', { fileName: 'x.csv' }));
    expect(e).toMatchObject({ code: 'conflicting-units', line: 2, column: 'speed [rpm]' });
    expect(e.message).toContain('"rpm" in its header (line 1) but "rad/s" on the units row (line 2)');
  });

  it('refuses a unit on the units row that is not one of the role, listing the known ones', () => {
    const e = failure(() => ingestText('time,voltage\nms,volts per bar\n0,0\n1,1\n2,2\n', { fileName: 'x.csv' }));
    expect(e).toMatchObject({ code: 'unknown-unit', line: 2, column: 'voltage' });
    expect(e.message).toContain('unit "volts per bar" is not a known voltage unit; known: V, mV, uV, kV');
  });

  it('does not take a first data row of numbers for a units row', () => {
    const r = ingestText('time,current\n0,1\n1,2\n2,3\n');
    expect(r.recording.meta.dialect.unitsLine).toBeNull();
    expect(r.recording.meta.rowsKept).toBe(3);
  });
});

describe('voltage roles: terminal, supply, command, duty', () => {
  it.each<[string, ChannelRole | null]>([
    ['Vbus', 'supplyVoltage'], ['V_bus', 'supplyVoltage'], ['supply voltage', 'supplyVoltage'], ['battery voltage', 'supplyVoltage'],
    ['U_dc', 'supplyVoltage'], ['DC link voltage', 'supplyVoltage'], ['VBat', 'supplyVoltage'],
    ['U_cmd', 'commandVoltage'], ['voltage_cmd', 'commandVoltage'], ['Vref', 'commandVoltage'], ['voltage set-point', 'commandVoltage'],
    ['DAC output', 'commandVoltage'], ['uCmd', 'commandVoltage'], ['reference voltage', 'commandVoltage'],
    ['terminal voltage', 'voltage'], ['motor voltage', 'voltage'], ['U_arm', 'voltage'], ['U', 'voltage'], ['voltage', 'voltage'],
    ['pwm', 'duty'], ['PWM duty', 'duty'], ['duty cycle', 'duty'], ['dutyCycle', 'duty'],
    ['speed_setpoint', null], ['I_ref', null], ['n_soll', null], ['position target', null], ['supply current', null],
  ])('%j → %s', (name, role) => {
    expect(detectRole(name).role).toBe(role);
  });

  it('keeps supply and terminal voltage apart: the terminal one is channels.voltage', async () => {
    const { recording } = await read('supply-and-terminal.csv');
    expect(recording.channels.voltage![1]).toBe(22.9248046875);
    expect(recording.channels.supplyVoltage![1]).toBe(23.5107421875);
    expect(recording.meta.columns.find((c) => c.header === 'Vbus')).toMatchObject({ role: 'supplyVoltage', unitSource: 'default' });
  });

  it('reads a command-only drive log: the command is commandVoltage, set-points stay in extra with a reason', async () => {
    const { recording, issues } = await read('command-only.csv');
    expect(recording.channels.voltage).toBeUndefined();
    expect(recording.channels.commandVoltage![1]).toBe(10);
    expect(recording.extra.map((e) => [e.name, e.reason])).toEqual([
      ['speed_setpoint_rpm', 'the name marks a speed set-point (command), not a measurement'],
      ['I_ref_A', 'the name marks a current set-point (command), not a measurement'],
    ]);
    expect(issues.filter((i) => i.code === 'set-point-column').map((i) => i.column)).toEqual(['speed_setpoint_rpm', 'I_ref_A']);
    expectClose(recording.channels.speed![4]!, 186 * RPM, { rel: 1e-15 }, 'measured speed');
  });

  it('multiplies the command by the drive gain and records the gain', async () => {
    const { recording } = await read('command-only.csv', { driveGain: 2.4 });
    // 10 V command × 2.4 (derived here) = 24 V at the motor.
    expectClose(recording.channels.commandVoltage![1]!, 24, { rel: 1e-15 }, 'command × gain');
    expect(recording.meta.driveGain).toBe(2.4);
    expect(describeRecording({ recording, issues: recording.meta.issues }).columns[1]!.note).toBe('times the drive gain 2.4');
  });

  it('turns a PWM duty in counts into a command voltage with the logged supply, sample by sample', async () => {
    const { recording } = await read('pwm-counts.csv', { pwmMax: 1000 });
    // 750 counts of 1000 = 0.75 (derived here); × 23.9501953125 V logged supply = 17.962646484375 V.
    expect(recording.channels.duty![3]).toBe(0.75);
    expectClose(recording.channels.commandVoltage![3]!, 0.75 * 23.9501953125, { rel: 1e-15 }, 'duty × supply');
    expect(recording.meta.derived[0]).toMatchObject({ role: 'commandVoltage', from: 'duty', supplySource: 'channel', supplyVoltage: null });
    const e = await asyncFailure(() => read('pwm-counts.csv'));
    expect(e).toMatchObject({ code: 'missing-pwm-max', column: 'PWM [counts]', line: 2, fix: [{ option: 'pwmMax' }] });
  });

  it('takes a constant supply when none is logged, and says what is missing when neither is there', () => {
    const csv = '# invented\ntime [ms],duty [%],current [A]\n0,0,0.0048828125\n1,25,0.5\n2,50,0.9\n';
    const r = ingestText(csv, { supplyVoltage: 24 });
    // 50 % of 24 V (derived here) = 12 V.
    expect(Array.from(r.recording.channels.commandVoltage!)).toEqual([0, 6, 12]);
    const d = r.recording.meta.derived[0] as DerivedCommandVoltage;
    expect(d).toMatchObject({ supplySource: 'option', supplyVoltage: 24 });
    const without = ingestText(csv);
    expect(without.recording.channels.commandVoltage).toBeUndefined();
    expect(without.issues.find((i) => i.code === 'duty-needs-supply')).toMatchObject({ severity: 'warning', fix: [{ option: 'supplyVoltage' }] });
  });

  it('assumes a duty scale without a unit only from what the first rows show, and says so', () => {
    const fraction = ingestText('time,duty\n0,0\n1,0.25\n2,0.5\n');
    expect(fraction.recording.meta.columns[1]).toMatchObject({ canonicalUnit: 'fraction', unitAssumed: true });
    const percent = ingestText('time,duty\n0,0\n1,25\n2,50\n');
    expect(percent.recording.channels.duty![2]).toBe(0.5);
    expect(percent.issues.find((i) => i.code === 'assumed-unit' && i.column === 'duty')!.message).toContain('percent is assumed');
    const e = failure(() => ingestText('time,duty\n0,0\n1,250\n2,500\n', { fileName: 'x.csv' }));
    expect(e).toMatchObject({ code: 'unknown-unit', column: 'duty' });
  });
});

describe('several motors in one file', () => {
  it('lists the candidates of each ambiguous role and the map that picks one motor', async () => {
    const e = await asyncFailure(() => read('two-motors.csv', { fileName: 'two-motors.csv' }));
    expect(e.code).toBe('ambiguous-role');
    expect(e.line).toBe(2);
    expect(e.message).toContain('current: "1st motor current [A]" (column 3), "2nd motor current [A]" (column 5)');
    expect(e.message).toContain('speed: "1st motor velocity [rad/s]" (column 2), "2nd motor velocity [rad/s]" (column 4)');
    expect(e.fix).toEqual([{ option: 'map', entries: [['current', '1st motor current [A]'], ['speed', '1st motor velocity [rad/s]']] }]);
  });

  it('reads the motor the map picks and keeps the other in extra', async () => {
    const { recording, issues } = await read('two-motors.csv', { map: { speed: '2nd motor velocity', current: '2nd motor current [A]' } });
    expect(recording.channels.speed![3]).toBe(-2.25);
    expect(recording.channels.current![1]).toBe(0.498046875);
    expect(recording.channels.supplyVoltage![0]).toBe(24.0234375);
    expect(recording.extra.map((e) => e.name)).toEqual(['1st motor velocity [rad/s]', '1st motor current [A]']);
    expect(issues.filter((i) => i.code === 'duplicate-role')).toHaveLength(2);
  });

  it('accepts a map entry for every role', () => {
    const csv = 'a,b,c,d,e,f,g,h,i,j\n0,1,2,0.5,4,5,6,7,8,20\n1,1,2,0.5,4,5,6,7,8,20\n2,1,2,0.5,4,5,6,7,8,20\n';
    const map = { time: 'a', voltage: 'b', supplyVoltage: 'c', duty: 'd', commandVoltage: 'e', current: 'f', speed: 'g', position: 'h', torque: 'i', temperature: 'j' } as const;
    const r = ingestText(csv, { map });
    expect(r.recording.meta.columns.map((c) => [c.header, c.role, c.roleSource])).toEqual(
      Object.entries(map).map(([role, header]) => [header, role, 'map']).sort((x, y) => x[0]!.localeCompare(y[0]!)),
    );
    expect(r.recording.channels.commandVoltage![0]).toBe(4);
  });

  it('prefers a column the name marks as measured at the motor over a plain one', () => {
    const r = ingestText('time [s],voltage [V],terminal voltage [V]\n0,1,2\n1,1,2\n2,1,2\n');
    expect(r.recording.channels.voltage![0]).toBe(2);
    expect(r.issues.find((i) => i.code === 'duplicate-role')).toMatchObject({ column: 'voltage [V]' });
  });
});

describe('steady-state tables without time', () => {
  it('are read as a table: row ordinal, no time base, SD columns in spread (SI)', async () => {
    const { recording, issues } = await read('steady-table.csv');
    expect(recording.layout).toBe('table');
    expect(Array.from(recording.time)).toEqual([0, 1, 2, 3]);
    expect(recording.meta.timeBase).toBeNull();
    expect(issues.find((i) => i.code === 'table-layout')).toMatchObject({ severity: 'info' });
    expectClose(recording.channels.speed![3]!, 1548.5 * RPM, { rel: 1e-15 }, 'speed');
    expectClose(recording.spread.speed![0]!, 2.5 * RPM, { rel: 1e-15 }, 'speed SD');
    expectClose(recording.spread.current![3]!, 0.0011, { rel: 1e-15 }, 'current SD');
    expect(recording.spread.current![2]).toBeNaN();
    expect(recording.meta.columns.filter((c) => c.role === 'spread').map((c) => [c.header, c.spreadOf])).toEqual([
      ['speed_sd_rpm', 'speed'], ['current SD [mA]', 'current'],
    ]);
    const d = describeRecording({ recording, issues });
    expect(d).toMatchObject({ layout: 'table', sampling: null, timeSpan: null });
  });

  it('keep the rows in the order written, even when a column falls', () => {
    const r = ingestText('voltage [V],current [A],speed [rad/s]\n6,0.3,110\n2,0.1,35\n4,0.2,72\n');
    expect(Array.from(r.recording.channels.voltage!)).toEqual([6, 2, 4]);
  });

  it('need two rows; one row is an error naming the table', () => {
    expect(ingestText('voltage [V],current [A]\n1,0.1\n2,0.2\n').recording.meta.rowsKept).toBe(2);
    const e = failure(() => ingestText('voltage [V],current [A]\n1,0.1\n', { fileName: 'x.csv' }));
    expect(e.code).toBe('too-few-rows');
    expect(e.message).toContain('at least 2 needed for a table of operating points');
  });

  it('read the σ spelling of an SD column', () => {
    expect(detectRole('σ speed')).toMatchObject({ role: null, spreadOf: 'speed' });
    expect(detectRole('current standard deviation')).toMatchObject({ role: null, spreadOf: 'current' });
  });
});

describe('bad headers give errors naming file, line and column', () => {
  const cases: [string, string, IngestErrorCode, number, string | undefined, string][] = [
    ['same text', 'time [s],x,x\n0,1,2\n1,1,2\n2,1,2\n', 'duplicate-column', 1, 'x', 'columns 2 ("x") and 3 ("x")'],
    ['same name after normalising', '# c\ntime [s],Speed (rpm),speed_rpm\n0,1,2\n1,1,2\n2,1,2\n', 'duplicate-column', 2, 'speed_rpm', 'columns 2 ("Speed (rpm)") and 3 ("speed_rpm") of the header on line 2'],
    ['unknown unit in brackets', 'time [s],voltage [a.u.]\n0,0\n1,1\n2,2\n', 'unknown-unit', 1, 'voltage [a.u.]', 'known: V, mV, uV, kV'],
    ['no time and one quantity', 'speed [rpm],note\n1,a\n2,b\n', 'no-time-column', 1, undefined, 'fewer than two of voltage, current, speed, torque'],
  ];
  it.each(cases)('%s', (_, csv, code, line, column, fragment) => {
    const e = failure(() => ingestText(csv, { fileName: 'bad.csv' }));
    expect(e).toMatchObject({ code, file: 'bad.csv', line });
    expect(e.column).toBe(column);
    expect(e.message).toContain(fragment);
    expect(e.message.startsWith('bad.csv: ')).toBe(true);
  });

  it('the duplicate fixture names both columns and their positions', async () => {
    const e = await asyncFailure(() => read('duplicate-columns.csv', { fileName: 'duplicate-columns.csv' }));
    expect(e).toMatchObject({ code: 'duplicate-column', line: 2, column: 'Speed (rpm)' });
    expect(e.message).toContain('columns 2 ("speed [rpm]") and 4 ("Speed (rpm)")');
  });

  it('library messages name no option: the fix is data for the caller', () => {
    const e = failure(() => ingestText('time [s],position [counts]\n0,0\n1,1\n2,2\n'));
    expect(e.message).not.toMatch(/options\./);
    expect(e.fix).toEqual([{ option: 'countsPerRevolution' }]);
  });

  it('the fixture files say they are invented', () => {
    for (const name of ['suffix-units.csv', 'units-row.csv', 'steady-table.csv', 'two-motors.csv', 'pwm-counts.csv']) {
      expect(readFileSync(join(FIXTURES, name), 'utf8').split('\n')[0]).toMatch(/invented/);
    }
  });
});
