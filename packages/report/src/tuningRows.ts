import type { TuningSection } from './types.js';

/**
 * The tuning section as rows for the text formats (Markdown, CSV, HTML, the command's text):
 * one per gain, with its key, label, value, unit, interval and formula, plus a line on the settings.
 *
 * @param t - the tuning section of a parameter set
 * @returns `{ settings, rows }`: the settings in one line, and the gains
 * @example
 * tuningRows(set.tuning).rows[0].key; // => 'currentLoop.Kp'
 */
export function tuningRows(t: TuningSection): {
  settings: string;
  rows: { key: string; label: string; value: number | null; unit: string; ci95: [number, number] | null; formula: string }[];
} {
  const s = t.settings;
  const src = (x: { source: string }): string => (x.source === 'default' ? ' (default)' : '');
  const settings = `current-loop bandwidth ${s.currentBandwidthHz.value} Hz${src(s.currentBandwidthHz)}, ` +
    `speed-loop bandwidth ${s.speedBandwidthHz.value} Hz${src(s.speedBandwidthHz)}, phase margin ${s.phaseMarginDeg.value}°${src(s.phaseMarginDeg)}, ` +
    (s.controllerRateHz.value === null ? 'no controller rate given (bandwidths not checked against it)' : `controller rate ${s.controllerRateHz.value} Hz`);
  const rows = [
    { key: 'currentLoop.Kp', label: 'current loop Kp', g: t.currentLoop.Kp },
    { key: 'currentLoop.Ki', label: 'current loop Ki', g: t.currentLoop.Ki },
    { key: 'speedLoop.Kp', label: 'speed loop Kp', g: t.speedLoop.Kp },
    { key: 'speedLoop.Ki', label: 'speed loop Ki', g: t.speedLoop.Ki },
  ].map(({ key, label, g }) => ({ key, label, value: g.value, unit: g.unit, ci95: g.ci95, formula: g.formula }));
  return { settings, rows };
}
