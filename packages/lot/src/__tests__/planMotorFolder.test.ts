import { describe, expect, it } from 'vitest';
import { planMotorFolder } from '../planMotorFolder.js';

const files = (...names: string[]) => names.map((name) => ({ name, isFile: !name.endsWith('/') })).map((e) => ({ ...e, name: e.name.replace(/\/$/, '') }));

describe('planMotorFolder', () => {
  it('takes every .csv file as a recording with its kind to be guessed, and lists the other entries with the reason', () => {
    const plan = planMotorFolder('T24-0001', 'lot/T24-0001', files('step.csv', 'locked-rotor.CSV', 'step.truth.json', 'photos/'), null);
    expect(plan.problem).toBeNull();
    expect(plan.runs).toEqual([
      { path: 'lot/T24-0001/locked-rotor.CSV', file: 'T24-0001/locked-rotor.CSV', kind: null },
      { path: 'lot/T24-0001/step.csv', file: 'T24-0001/step.csv', kind: null },
    ]);
    expect(plan.ignored).toEqual([
      { file: 'T24-0001/photos', reason: 'a folder (recordings sit directly in the motor folder)' },
      { file: 'T24-0001/step.truth.json', reason: 'not a .csv file' },
    ]);
  });

  it('reads the recordings and kinds a runs.csv declares, in its order, and names the CSV files it leaves out', () => {
    const table = '# declared by the bench operator\nKIND , file\nstep,"step run.csv"\n\n,locked.csv\n';
    const plan = planMotorFolder('A7', 'lot/A7/', files('locked.csv', 'step run.csv', 'extra.csv', 'runs.csv'), table);
    expect(plan.problem).toBeNull();
    expect(plan.runs).toEqual([
      { path: 'lot/A7/step run.csv', file: 'A7/step run.csv', kind: 'step' },
      { path: 'lot/A7/locked.csv', file: 'A7/locked.csv', kind: null },
    ]);
    expect(plan.ignored).toEqual([{ file: 'A7/extra.csv', reason: 'not listed in runs.csv' }]);
  });

  it.each([
    ['file;kind\nstep.csv;step\n', 'A7/runs.csv (line 1): the header must be "file,kind"'],
    ['file,kind\nstep.csv,ramp\n', 'A7/runs.csv (line 2): "ramp" is not a kind'],
    ['file,kind\nmissing.csv,step\n', 'A7/runs.csv (line 2): "missing.csv" is not in the motor folder'],
    ['file,kind\nstep.csv,step\nstep.csv,step\n', 'A7/runs.csv (line 3): "step.csv" is listed twice'],
    ['file,kind\nstep.csv\n', 'A7/runs.csv (line 2): expected 2 cells (file,kind), got 1'],
    ['file,kind\n"step.csv,step\n', 'A7/runs.csv (line 2): a quoted cell is not closed'],
    ['file,kind\n../x.csv,step\n', 'A7/runs.csv (line 2): "../x.csv": name a file in the motor folder itself'],
    ['file,kind\n', 'A7/runs.csv: the table lists no recordings'],
    ['# nothing\n', 'A7/runs.csv: the table is empty'],
  ])('turns a bad runs.csv into the motor\'s problem: %j', (table, message) => {
    const plan = planMotorFolder('A7', 'lot/A7', files('step.csv', 'runs.csv'), table);
    expect(plan.runs).toEqual([]);
    expect(plan.problem).toContain(message);
  });

  it('says so when a motor folder has no recordings', () => {
    expect(planMotorFolder('B2', 'lot/B2', files('notes.txt'), null).problem).toBe('B2: no recordings (.csv files) in the motor folder');
  });
});
