import { beforeAll, describe, expect, it } from 'vitest';
import { buildParameterSet } from '../buildParameterSet.js';
import { formatInterval, intervalDigits } from '../formatInterval.js';
import { formatParameterSetCsv } from '../formatParameterSetCsv.js';
import { formatParameterSetMarkdown } from '../formatParameterSetMarkdown.js';
import { renderHtmlReport } from '../renderHtmlReport.js';
import type { ParameterSet } from '../types.js';
import { INVENTED_PROVENANCE, inventedFit, inventedInputs } from './inventedFit.js';

describe('formatInterval', () => {
  it('adds significant digits until the two ends differ', () => {
    // Derived here: at 4 digits both ends of [0.0519964, 0.0520008] read 0.052; at 5 they differ.
    expect(formatInterval([0.0519964, 0.0520008])).toBe('0.051996 … 0.052001');
    expect(intervalDigits([0.0519964, 0.0520008])).toBe(5);
    expect(formatInterval([1.8994, 1.9014])).toBe('1.899 … 1.901');
    // Relative width 2e-9: 0.05200000 vs 0.0520000001 part at the 10th digit.
    expect(formatInterval([0.052, 0.0520000001])).toBe('0.052 … 0.0520000001');
    expect(formatInterval([-3.20001, -3.2])).toBe('−3.20001 … −3.2');
    // Ends written differently but equal as numbers: at 3 digits 9.9969e-4 reads 1e−3 and
    // 1.0003e-3 reads 0.001 (the same number); at 4 they part (derived here).
    expect(formatInterval([9.9969e-4, 1.0003e-3], { digits: 3 })).toBe('9.997e−4 … 0.001');
  });
  it('keeps the minimum digits for a wide, a degenerate or a missing interval', () => {
    expect(formatInterval([1, 2], { digits: 5 })).toBe('1 … 2');
    expect(formatInterval([0.25, 0.25])).toBe('0.25 … 0.25');
    expect(formatInterval(null)).toBe('–');
    expect(formatInterval(null, { missing: 'no interval' })).toBe('no interval');
  });
  it('takes the caller\'s number writer', () => {
    const plain = (x: number, d: number) => x.toPrecision(d);
    expect(formatInterval([1.00001, 1.00002], { format: plain })).toBe('1.00001 … 1.00002');
  });
});

/** Every "a … b" written in `text`. */
function intervalsIn(text: string): [string, string][] {
  return [...text.matchAll(/([−\-]?[\d.]+(?:e[−\-]?\d+)?) … ([−\-]?[\d.]+(?:e[−\-]?\d+)?)/g)].map((m) => [m[1]!, m[2]!]);
}

describe('interval digits in every format', () => {
  let set: ParameterSet;
  beforeAll(() => {
    const inputs = inventedInputs();
    set = buildParameterSet(inventedFit(inputs), { recordings: inputs.map((i) => i.recording), provenance: INVENTED_PROVENANCE });
    // Narrow every interval to ±1e-5 relative (a long, clean record), as the demo's Kt is.
    for (const e of [...Object.values(set.parameters), ...Object.values(set.derived)]) {
      if (e?.value !== null && e?.value !== undefined && e.ci95 !== null) e.ci95 = [e.value * (1 - 1e-5), e.value * (1 + 1e-5)].sort((a, b) => a - b) as [number, number];
    }
  });
  it('writes ends that differ in Markdown and HTML, and the value to the same digits', () => {
    const md = formatParameterSetMarkdown(set);
    const html = renderHtmlReport({ parameterSet: set, fit: { recordings: [] } as unknown as Parameters<typeof renderHtmlReport>[0]['fit'] });
    for (const [name, text] of [['Markdown', md], ['HTML', html]] as const) {
      const found = intervalsIn(text);
      expect(found.length, name).toBeGreaterThan(10);
      for (const [a, b] of found) expect(a, `${name}: ${a} … ${b}`).not.toBe(b);
    }
    const kt = md.split('\n').find((l) => l.startsWith('| Kt |'))!;
    const [, value, , interval] = kt.split(' | ');
    const [low, high] = interval!.split(' … ');
    expect(value!.length).toBe(low!.length);
    expect(Number(low) <= Number(value) && Number(value) <= Number(high) && Number(low) < Number(high), kt).toBe(true);
  });
  it('keeps full precision in CSV, where the ends differ too', () => {
    const rows = formatParameterSetCsv(set).trimEnd().split('\n').slice(1).map((r) => r.split(','));
    for (const r of rows.filter((x) => x[3] !== '')) expect(r[3], r[0]).not.toBe(r[4]);
  });
});
