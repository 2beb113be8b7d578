import { describe, expect, it } from 'vitest';
import { createIngestor, ingestText, IngestError } from '../index.js';
import type { IngestErrorCode, IngestOptions } from '../index.js';

// All recordings in this file are invented for the tests.

/** Runs ingestText and returns the IngestError it must throw. */
function failure(text: string, options?: IngestOptions): IngestError {
  try {
    ingestText(text, { fileName: 'bad.csv', ...options });
  } catch (e) {
    expect(e).toBeInstanceOf(IngestError);
    return e as IngestError;
  }
  throw new Error('expected an IngestError');
}

function expectFailure(text: string, code: IngestErrorCode, where: { line?: number; column?: string }, fragment: string, options?: IngestOptions): void {
  const e = failure(text, options);
  expect(e.code).toBe(code);
  expect(e.file).toBe('bad.csv');
  expect(e.line).toBe(where.line);
  expect(e.column).toBe(where.column);
  expect(e.message).toContain(fragment);
}

describe('fatal input problems are IngestErrors with code, line and column', () => {
  it('time stepping back names the line and the time column', () => {
    expectFailure(
      '# run 4\ntime [s],voltage [V]\n0,1\n0.1,1\n0.2,1\n0.15,1\n0.3,1\n',
      'time-not-increasing',
      { line: 6, column: 'time [s]' },
      'time steps back at line 6: 0.15 s after 0.2 s at line 5',
    );
  });

  it('an empty file', () => {
    expectFailure('', 'empty-file', {}, 'the file is empty');
    const ing = createIngestor({ fileName: 'bad.csv' });
    expect(() => ing.finish()).toThrowError(/the file is empty/);
  });

  it('a file of blank lines', () => {
    expectFailure('\n\n  \r\n', 'empty-file', {}, 'only blank lines');
  });

  it('only comments', () => {
    expectFailure('# nothing here\n# still nothing\n', 'no-header', {}, 'no header row');
  });

  it('a header only', () => {
    expectFailure('time [s],voltage [V]\n', 'no-data-rows', { line: 1 }, 'no data rows');
    expectFailure('# c\ntime [s],voltage [V]', 'no-data-rows', { line: 2 }, 'no data rows');
  });

  it('a first row that is data, not a header', () => {
    expectFailure('0,1\n1,2\n2,3\n', 'no-header', { line: 1 }, 'looks like data');
  });

  it('no time column', () => {
    expectFailure('voltage [V],note\n1,2\n1,2\n1,2\n', 'no-time-column', { line: 1 }, 'no time column among "voltage [V]", "note", and fewer than two of voltage, current, speed, torque');
  });

  it('fewer than 3 usable rows, with the reasons', () => {
    expectFailure('time [s],voltage [V]\n0,1\n1,x\n2,\n3,1\n', 'too-few-rows', { line: 3, column: 'voltage [V]' }, 'only 2 of 4 data rows are usable');
  });

  it('binary junk', () => {
    const junk = new Uint8Array(4096);
    for (let i = 0; i < junk.length; i++) junk[i] = (i * 7919 + 13) % 256;
    const ing = createIngestor({ fileName: 'bad.csv' });
    ing.push(junk);
    expect(() => ing.finish()).toThrowError(IngestError);
    try {
      const again = createIngestor({ fileName: 'bad.csv' });
      again.push(junk);
      again.finish();
    } catch (e) {
      expect((e as IngestError).code).toBe('not-text');
      expect((e as Error).message).toContain('NUL');
    }
  });

  it('UTF-16 text', () => {
    const ing = createIngestor({ fileName: 'bad.csv' });
    ing.push(new Uint8Array([0xff, 0xfe, 0x74, 0x00, 0x0a, 0x00]));
    expect(() => ing.finish()).toThrowError(/UTF-16/);
  });

  it('a line longer than maxLineLength', () => {
    expectFailure(`time [s],note\n0,${'x'.repeat(5000)}`, 'line-too-long', { line: 2 }, 'longer than 1000 characters', { maxLineLength: 1000 });
    expectFailure(`time [s],note\n0,"${'x'.repeat(5000)}`, 'line-too-long', { line: 2 }, 'is a quote left open?', { maxLineLength: 1000 });
  });

  it('bad options', () => {
    expectFailure('time,v\n0,0\n1,1\n2,2\n', 'bad-option', {}, 'countsPerRevolution must be > 0', { countsPerRevolution: -1 });
    expectFailure('time,v\n0,0\n1,1\n2,2\n', 'bad-option', {}, "decimalSeparator ',' needs a ';' or tab delimiter", { delimiter: ',', decimalSeparator: ',' });
    expectFailure('time,v\n0,0\n1,1\n2,2\n', 'bad-option', {}, 'minRows must be an integer ≥ 2', { minRows: 1 });
  });

  it('using an ingestor after finish or after an error', () => {
    const ing = createIngestor();
    ing.push('time,v\n0,0\n1,1\n2,2\n');
    ing.finish();
    expect(() => ing.push('3,3\n')).toThrowError(/already finished/);
    const bad = createIngestor();
    bad.push('time,v\n0,0\n2,1\n1,2\n');
    expect(() => bad.finish()).toThrowError(/steps back/);
    expect(() => bad.finish()).toThrowError(/stopped at an earlier error/);
  });
});

describe('bad rows are dropped and listed with line, column and reason', () => {
  const csv = [
    'time [s],voltage [V],current [A],note', // line 1
    '0,1,0.5,a', // 2 kept
    '0.1,1,abc,b', // 3 non-numeric current
    '0.2,,0.5,c', // 4 blank voltage
    '0.3,1,0.5', // 5 too few cells
    '0.4,1,0.5,d,e', // 6 too many cells
    '0.5,NaN,0.5,f', // 7 non-finite
    '0.6,Infinity,0.5,g', // 8 non-finite
    '0.7,1e999,0.5,h', // 9 overflows to Infinity
    '0.8,2e6,0.5,i', // 10 beyond the 1e5 V limit
    '0.9,1,0.5,j', // 11 kept
    '0.9,1,0.5,k', // 12 duplicate time
    '1.0,1,0.5,', // 13 kept (blank cell in an unrecognised column does not drop the row)
    '1.1,1,0.5,m,', // 14 kept (a trailing blank cell)
  ].join('\n');

  it('lists every dropped row', () => {
    const r = ingestText(csv);
    expect(r.recording.meta.rowsRead).toBe(13);
    expect(r.recording.meta.rowsKept).toBe(4);
    expect(r.recording.meta.rowsDropped.map((d) => [d.line, d.reason, d.column ?? null])).toEqual([
      [3, 'non-numeric', 'current [A]'],
      [4, 'blank-cell', 'voltage [V]'],
      [5, 'column-count', null],
      [6, 'column-count', null],
      [7, 'non-finite', 'voltage [V]'],
      [8, 'non-finite', 'voltage [V]'],
      [9, 'non-finite', 'voltage [V]'],
      [10, 'out-of-range', 'voltage [V]'],
      [12, 'duplicate-time', 'time [s]'],
    ]);
    expect(r.recording.meta.rowsDropped[0]!.detail).toBe('cell "abc"');
    expect(r.recording.meta.rowsDropped[2]!.detail).toBe('expected 4 cells, found 3');
    expect(r.recording.meta.rowsDropped[7]!.detail).toContain('2000000 V is outside [-100000, 100000]');
    expect(r.recording.meta.rowsDropped[8]!.detail).toBe('time 0.9 s repeats line 11');
    expect(r.recording.meta.droppedByReason).toEqual({ 'non-numeric': 1, 'blank-cell': 1, 'column-count': 2, 'non-finite': 3, 'out-of-range': 1, 'duplicate-time': 1 });
    expect(Array.from(r.recording.time)).toEqual([0, 0.9, 1.0, 1.1]);
  });

  it('reports the drops, the duplicate stamps and the blank extra cells as issues', () => {
    const r = ingestText(csv);
    expect(r.issues.find((i) => i.code === 'rows-dropped')!.message).toContain('9 of 13 data rows were dropped');
    expect(r.issues.find((i) => i.code === 'duplicate-time')).toMatchObject({ line: 12 });
    expect(r.issues.find((i) => i.code === 'duplicate-time')!.message).toContain('1 row repeats the time stamp of the row before and was dropped (the first row with a given time is kept): line 12.');
    expect(r.issues.find((i) => i.code === 'surplus-blank-cells')).toBeDefined();
    // 'note' holds no numbers at all, so it is reported and not kept.
    expect(r.issues.find((i) => i.code === 'non-numeric-column')).toMatchObject({ column: 'note' });
  });

  it('stores blank or text cells of a numeric extra column as NaN and reports them', () => {
    const r = ingestText('time [s],aux\n0,1\n1,\n2,x\n3,4\n');
    expect(Array.from(r.recording.extra[0]!.values)).toEqual([1, Number.NaN, Number.NaN, 4]);
    expect(r.issues.find((i) => i.code === 'extra-non-numeric')).toMatchObject({ line: 3, column: 'aux' });
  });

  it('caps the list of dropped rows but counts them all', () => {
    const lines = ['time [s],voltage [V]'];
    for (let k = 0; k < 50; k++) lines.push(`${k},${k % 2 ? 'x' : '1'}`);
    const r = ingestText(lines.join('\n'), { maxDroppedListed: 10 });
    expect(r.recording.meta.rowsDropped).toHaveLength(10);
    expect(r.recording.meta.rowsDroppedCount).toBe(25);
    expect(r.issues.find((i) => i.code === 'dropped-list-truncated')).toBeDefined();
  });

  it('rejects temperatures below absolute zero', () => {
    const r = ingestText('time [s],temp [K]\n0,-1\n1,300\n2,300\n3,300\n');
    expect(r.recording.meta.rowsDropped[0]).toMatchObject({ line: 2, reason: 'out-of-range', column: 'temp [K]' });
  });
});
