import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { createIngestor, ingestText, readRecording } from '../index.js';

// All recordings in this file are invented for the tests.

const expected = {
  time: [0, 0.001, 0.002],
  voltage: [0, 12, 12],
  current: [0, 1.5, 1.25],
};

function expectBasic(result: ReturnType<typeof ingestText>): void {
  const { recording } = result;
  expect(Array.from(recording.time)).toEqual(expected.time);
  expect(Array.from(recording.channels.voltage!)).toEqual(expected.voltage);
  expect(Array.from(recording.channels.current!)).toEqual(expected.current);
  expect(recording.meta.rowsKept).toBe(3);
  expect(recording.meta.rowsDroppedCount).toBe(0);
}

describe('ingest reads every supported dialect to the same numbers', () => {
  it('reads a comma-separated file with LF line ends', () => {
    const r = ingestText('time [ms],voltage [V],current [A]\n0,0,0\n1,12,1.5\n2,12,1.25\n');
    expectBasic(r);
    expect(r.recording.meta.dialect).toMatchObject({ delimiter: ',', decimalSeparator: '.', lineEnding: 'LF', bom: false, quoted: false, bodyParser: 'fast' });
  });

  it('reads semicolons with decimal commas (1,5;2,25)', () => {
    const r = ingestText('time [ms];voltage [V];current [A]\n0;0;0\n1;12;1,5\n2;12;1,25\n');
    expectBasic(r);
    expect(r.recording.meta.dialect).toMatchObject({ delimiter: ';', decimalSeparator: ',' });
  });

  it('reads semicolons with decimal points', () => {
    const r = ingestText('time [ms];voltage [V];current [A]\n0;0;0\n1;12;1.5\n2;12;1.25\n');
    expectBasic(r);
    expect(r.recording.meta.dialect).toMatchObject({ delimiter: ';', decimalSeparator: '.' });
  });

  it('reads tab-separated files, with decimal commas too', () => {
    expectBasic(ingestText('time [ms]\tvoltage [V]\tcurrent [A]\n0\t0\t0\n1\t12\t1.5\n2\t12\t1.25\n'));
    const r = ingestText('time [ms]\tvoltage [V]\tcurrent [A]\n0\t0\t0\n1\t12\t1,5\n2\t12\t1,25\n');
    expectBasic(r);
    expect(r.recording.meta.dialect).toMatchObject({ delimiter: '\t', decimalSeparator: ',' });
  });

  it('skips # and // comment lines before the header and keeps their text', () => {
    const r = ingestText('# rig 2, motor A\n// logged by hand\n\ntime [ms],voltage [V],current [A]\n0,0,0\n1,12,1.5\n2,12,1.25\n');
    expectBasic(r);
    expect(r.recording.meta.dialect).toMatchObject({ commentLines: 2, headerLine: 4, comments: ['# rig 2, motor A', '// logged by hand'] });
  });

  it('skips comment lines inside the data and says so', () => {
    const r = ingestText('time [ms],voltage [V],current [A]\n0,0,0\n# relay closed\n1,12,1.5\n2,12,1.25\n');
    expectBasic(r);
    expect(r.issues.find((i) => i.code === 'comment-in-body')).toMatchObject({ line: 3 });
  });

  it('strips a UTF-8 byte-order mark and records it', () => {
    const r = ingestText('\uFEFFtime [ms],voltage [V],current [A]\n0,0,0\n1,12,1.5\n2,12,1.25\n');
    expectBasic(r);
    expect(r.recording.meta.dialect.bom).toBe(true);
    expect(r.recording.meta.columns[0]!.header).toBe('time [ms]');
  });

  it('reads CRLF line ends', () => {
    const r = ingestText('time [ms],voltage [V],current [A]\r\n0,0,0\r\n1,12,1.5\r\n2,12,1.25\r\n');
    expectBasic(r);
    expect(r.recording.meta.dialect.lineEnding).toBe('CRLF');
    expect(r.recording.meta.columns[2]!.header).toBe('current [A]');
  });

  it('reads old Mac CR-only line ends', () => {
    const r = ingestText('time [ms],voltage [V],current [A]\r0,0,0\r1,12,1.5\r2,12,1.25\r');
    expectBasic(r);
    expect(r.recording.meta.dialect.lineEnding).toBe('CR');
  });

  it('reads quoted header and quoted cells through papaparse', () => {
    const r = ingestText('"time [ms]","voltage [V]","current [A]"\n"0","0","0"\n"1","12","1.5"\n"2","12","1.25"\n');
    expectBasic(r);
    expect(r.recording.meta.dialect).toMatchObject({ quoted: true, bodyParser: 'papaparse' });
  });

  it('reads quoted cells with decimal commas inside a comma-separated file', () => {
    const r = ingestText('time [ms],voltage [V],current [A]\n0,0,0\n1,12,"1.5"\n2,12,"1.25"\n', { decimalSeparator: '.' });
    expectBasic(r);
    expect(r.recording.meta.dialect.bodyParser).toBe('papaparse');
  });

  it('ignores blank trailing lines silently and reports blank lines inside the data', () => {
    const r = ingestText('time [ms],voltage [V],current [A]\n0,0,0\n\n1,12,1.5\n2,12,1.25\n\n\n  \n');
    expectBasic(r);
    const blank = r.issues.filter((i) => i.code === 'blank-line');
    expect(blank).toHaveLength(1);
    expect(blank[0]!.line).toBe(3);
  });

  it('reads a file without a final line break', () => {
    expectBasic(ingestText('time [ms],voltage [V],current [A]\n0,0,0\n1,12,1.5\n2,12,1.25'));
  });

  it('honours an Excel sep= line', () => {
    const r = ingestText('sep=;\ntime [ms];voltage [V];current [A]\n0;0;0\n1;12;1,5\n2;12;1,25\n');
    expectBasic(r);
    expect(r.recording.meta.dialect).toMatchObject({ sepLine: true, delimiter: ';', headerLine: 2 });
  });

  it('accepts an explicit delimiter and decimal separator', () => {
    expectBasic(ingestText('time [ms];voltage [V];current [A]\n0;0;0\n1;12;1,5\n2;12;1,25\n', { delimiter: ';', decimalSeparator: ',' }));
  });

  it('accepts trailing delimiters on every line', () => {
    const r = ingestText('time [ms],voltage [V],current [A],\n0,0,0,\n1,12,1.5,\n2,12,1.25,\n');
    expectBasic(r);
    expect(r.issues.some((i) => i.code === 'empty-column')).toBe(true);
    expect(r.recording.extra).toHaveLength(0);
  });

  it('gives the same result whatever the chunking of the bytes, even inside a multi-byte character', () => {
    const text = '# Prüfstand 2\r\ntime [ms];voltage [V];current [A];temp [°C]\r\n0;0;0;25,5\r\n1;12;1,5;25,5\r\n2;12;1,25;25,6\r\n';
    const bytes = new TextEncoder().encode(text);
    const whole = ingestText(text);
    for (const size of [1, 2, 3, 7, 64]) {
      const ing = createIngestor();
      for (let at = 0; at < bytes.length; at += size) ing.push(bytes.subarray(at, at + size));
      const r = ing.finish();
      expect(Array.from(r.recording.time)).toEqual(Array.from(whole.recording.time));
      expect(Array.from(r.recording.channels.temperature!)).toEqual([25.5, 25.5, 25.6]);
      expect(r.recording.meta.source.sha256).toBe(whole.recording.meta.source.sha256);
      expect(r.recording.meta.dialect.encoding).toBe('utf-8');
    }
  });

  it('reads Windows-1252 bytes (a Latin-1 °C) when the file is not UTF-8', () => {
    // "temp [°C]" with ° as the single byte 0xB0, as Windows tools write it.
    const head = new TextEncoder().encode('time [s],temp [');
    const tail = new TextEncoder().encode('C]\n0,20\n1,21\n2,22\n');
    const bytes = new Uint8Array([...head, 0xb0, ...tail]);
    const ing = createIngestor();
    ing.push(bytes);
    const r = ing.finish();
    expect(r.recording.meta.dialect.encoding).toBe('windows-1252');
    expect(r.recording.meta.columns[1]!.header).toBe('temp [°C]');
    expect(Array.from(r.recording.channels.temperature!)).toEqual([20, 21, 22]);
    expect(r.issues.some((i) => i.code === 'encoding-fallback')).toBe(true);
  });

  it('hashes the file bytes with SHA-256', () => {
    const r = ingestText('time [s],voltage [V]\n0,1\n1,2\n2,3\n', { fileName: 'x.csv' });
    // Computed here: printf 'time [s],voltage [V]\n0,1\n1,2\n2,3\n' | sha256sum (33 bytes).
    expect(r.recording.meta.source).toEqual({
      file: 'x.csv',
      bytes: 33,
      sha256: '792bd16490e1d28bbca6f113132428c94d48cfadd9c3786198d1a8a33bd5548b',
    });
  });
});

describe('readRecording streams a file from disk', () => {
  const dir = mkdtempSync(join(tmpdir(), 'motorprint-ingest-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('reads a file, names it as given and hashes its bytes', async () => {
    const path = join(dir, 'run.csv');
    writeFileSync(path, 'time [ms],voltage [V],current [A]\r\n0,0,0\r\n1,12,1.5\r\n2,12,1.25\r\n');
    const r = await readRecording(path);
    expectBasic(r);
    expect(r.recording.meta.source.file).toBe(path);
    expect(r.recording.meta.source.sha256).toBe(ingestText('time [ms],voltage [V],current [A]\r\n0,0,0\r\n1,12,1.5\r\n2,12,1.25\r\n').recording.meta.source.sha256);
  });

  it('reads a file larger than one chunk, with lines split across chunks', async () => {
    const path = join(dir, 'big.csv');
    const lines = ['time [s];voltage [V];speed [rpm]'];
    for (let k = 0; k < 120000; k++) lines.push(`${(k * 1e-4).toFixed(4).replace('.', ',')};${(k % 7) + 0.25};${k % 1000}`);
    writeFileSync(path, lines.join('\r\n') + '\r\n');
    const r = await readRecording(path, { fileName: 'big.csv' });
    expect(r.recording.meta.rowsKept).toBe(120000);
    expect(r.recording.time[119999]).toBe(Number('11.9999'));
    expect(r.recording.channels.voltage![119999]).toBe((119999 % 7) + 0.25);
    expect(r.recording.meta.source.file).toBe('big.csv');
  });

  it('throws IngestError file-unreadable for a missing file', async () => {
    await expect(readRecording(join(dir, 'nope.csv'))).rejects.toMatchObject({ name: 'IngestError', code: 'file-unreadable' });
  });
});
