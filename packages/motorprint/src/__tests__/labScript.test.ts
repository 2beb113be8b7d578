import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { buildParameterSet, diagnoseFit, fitMotor, readParameterSet, readRecording, releaseKernelMemory, renderHtmlReport, formatParameterSetJson } from 'motorprint';

const demo = resolve(dirname(fileURLToPath(import.meta.url)), '../../../../fixtures/demo');

describe('the one import for lab scripts (README "From a lab script")', () => {
  it('reads, fits, diagnoses, writes a parameter set and a report from the invented demo runs', async () => {
    const files = ['tern24-locked-rotor.csv', 'tern24-step.csv'];
    const runs = await Promise.all(files.map(async (f) => ({ recording: (await readRecording(resolve(demo, f))).recording, name: f })));
    const fit = fitMotor(runs);
    expect(fit.converged).toBe(true);
    const report = diagnoseFit(fit, runs);
    // True constants of the invented motor, from fixtures/demo/tern24-step.truth.json (written by
    // `motorprint simulate` from fixtures/tern24.params.json).
    const truth = JSON.parse(readFileSync(resolve(demo, 'tern24-step.truth.json'), 'utf8')).params as Record<string, number>;
    for (const name of ['R', 'L', 'Kt', 'J', 'b']) {
      const p = report.parameters[name];
      expect(p?.identifiable, name).toBe(true);
      const [low, high] = p?.interval95 ?? [Number.NaN, Number.NaN];
      const half = (high - low) / 2;
      // Within 1.5 interval half-widths (≈ 3 standard errors) of the truth.
      expect(Math.abs((p?.value as number) - (truth[name] as number)), name).toBeLessThan(1.5 * half);
    }
    const set = buildParameterSet(fit, {
      recordings: runs.map((r) => r.recording),
      diagnosis: report,
      provenance: { tool: { name: 'lab-script-test', version: '1' }, date: '2026-12-01T00:00:00Z', inputs: [], options: {} },
    });
    expect(readParameterSet(formatParameterSetJson(set)).parameters.R.value).toBe(set.parameters.R.value);
    const html = renderHtmlReport({ parameterSet: set, fit, recordings: runs.map((r) => r.recording), diagnosis: report });
    expect(html.startsWith('<!DOCTYPE html>') || html.startsWith('<!doctype html>')).toBe(true);
    expect(html).toMatch(/Locked-rotor/i);
    // A long script gives the kernels' memory back between jobs; the next fit is the same to the bit.
    releaseKernelMemory();
    const again = diagnoseFit(fitMotor(runs), runs);
    for (const name of ['R', 'L', 'Kt', 'J', 'b']) {
      expect(Object.is(again.parameters[name]?.value, report.parameters[name]?.value), name).toBe(true);
      expect(Object.is(again.parameters[name]?.standardError, report.parameters[name]?.standardError), name).toBe(true);
    }
  });
});
