import { choleskyFactor } from '../solver/choleskyFactor.js';
import { classifyWithEncoder } from './classifyRecording.js';
import { detectEncoderSpeed } from './detectEncoderSpeed.js';
import { nominalTimeGrid } from './nominalTimeGrid.js';
import type { NominalGrid } from './nominalTimeGrid.js';
import { detectVoltageSegments } from './detectVoltageSegments.js';
import { estimateNoiseLevel, keepsUnchanged, shareUnchangedNoise } from './estimateNoiseLevel.js';
import { rebuildCommand } from './rebuildCommand.js';
import { channelStatsKernel, KERNEL_MIN_LENGTH, timeStatsKernel } from './sampleKernels.js';
import type { SineBasis } from './rebuildCommand.js';
import type { InputHandling, MotorExperimentKind, MotorRecordingInput, NoiseLevel, VoltageSegment } from './types.js';

/** A recording made ready for the joint fit (internal shape of the estimator). */
export interface PreparedRecording {
  name: string;
  kind: MotorExperimentKind;
  kindSource: 'declared' | 'guessed';
  kindReason: string;
  time: Float64Array;
  /** Uniform sample interval [s], or the time array when the spacing varies by more than 1e-6 relative. */
  timeBase: number | Float64Array;
  /** Median sample interval [s]. */
  h: number;
  /** Model input voltage [V] (rebuilt command). */
  input: Float64Array;
  handling: InputHandling;
  segments: VoltageSegment[] | null;
  current: Float64Array | null;
  speed: Float64Array | null;
  currentNoise: NoiseLevel | null;
  speedNoise: NoiseLevel | null;
  /** Mean measured load torque [N·m] (loaded runs), else 0. */
  loadTorque: number;
  /** First sample entering the fit (coast-down: first sample after the circuit opened). */
  first: number;
  /** Sign of the running direction (for Coulomb friction). */
  direction: 1 | -1;
  /**
   * Piecewise-constant command as level classes (errors in variables): the levels become
   * nuisance parameters and the voltage samples residual rows; null when the input is used as is.
   */
  levels: LevelModel | null;
  /**
   * Sine-fit input as a linear basis (errors in variables): the coefficients become nuisance
   * parameters with the voltage samples as rows; null when the input is not a sine fit.
   */
  sines: SineModel | null;
  /** Whether the record starts with a pre-trigger baseline at 0 V (informs a current-sensor offset). */
  baseline: boolean;
  /** Torque channel summary of a loaded run (the load level becomes a nuisance with torque rows), else null. */
  torqueStats: ChannelSummary | null;
  /**
   * Which logged voltage drives the model: the terminal voltage, the supply (then R stands for
   * R + Rs), the drive's command (then its limits may show), or none (a speed-only coast-down).
   */
  source: 'terminal' | 'supply' | 'command' | 'none';
  /** The supply drives the fit although the terminal voltage is logged too (R + Rs is fitted; Rs is taken off after). */
  supplyDrives: boolean;
  /** The logged drive voltage the input was rebuilt from (terminal, supply or command) [V], or null. */
  drive: Float64Array | null;
  /** Terminal voltage rows of the detailed fit (open-circuit voltage after a coast-down's cut) [V], or null. */
  terminal: Float64Array | null;
  /** Noise of `terminal`, or null. */
  terminalNoise: NoiseLevel | null;
  /** Angle quantum [rad] when the speed was computed from encoder counts (the fit then uses the angle), else null. */
  encoder: number | null;
  /** The command's own clock when the sample instants are jittered about it, else null. */
  grid: NominalGrid | null;
  /** A coast-down that logs the driven plateau before the circuit opens (voltage or current before the cut). */
  drivenBeforeCut: boolean;
  /** The experiment was declared or detected as a table of steady operating points. */
  table: boolean;
  /** Per-row SDs of a table [SI] (current, speed, voltage), or null. */
  spread: { current: Float64Array | null; speed: Float64Array | null; voltage: Float64Array | null } | null;
}

/** Sufficient statistics of samples that share one level: count, mean, Σ(x − mean)², noise σ. */
export interface ChannelSummary { count: number; mean: number; sumSq: number; sigma: number }

/** A sine-fit input u_k = β0 + Σ_j (β_{2j+1}·cos(ω_j·k) + β_{2j+2}·sin(ω_j·k)), k the sample index. */
export interface SineModel {
  /** Angular frequencies per sample ω_j [rad/sample]. */
  omega: Float64Array;
  /** Least-squares coefficients β̂ [V] (constant, then cos/sin pairs). */
  coefficients: Float64Array;
  /** Lower Cholesky factor L of the Gram matrix XᵀX (q×q row-major), so Σ(v − Xβ)² = RSS + ‖Lᵀ(β − β̂)‖². */
  cholesky: Float64Array;
  /** Residual sum of squares at β̂ [V²]. */
  rss: number;
  /** Number of voltage samples. */
  count: number;
}

/** Level classes of a piecewise-constant command. */
export interface LevelModel {
  /** Class of the input held over [t_k, t_{k+1}], per sample. */
  classOf: Int32Array;
  /** Per class: statistics of the voltage samples used as residual rows. */
  classes: ChannelSummary[];
  /** Sample indices where the class changes (first sample of the new level). */
  switches: Int32Array;
}

const FLOOR = 1e-12;

/**
 * Validates one input recording and prepares it: kind (declared or guessed), noise levels,
 * rebuilt command, coast-down start.
 *
 * @param item - the recording and its optional kind and name
 * @param index - position in the input list (for messages and default names)
 * @param voltageMode - `auto` or `measured` (see `FitMotorOptions.voltage`)
 * @returns the prepared recording
 * @throws TypeError / RangeError naming `recordings[index]` and the channel when the data are unusable
 */
export function prepareRecording(item: MotorRecordingInput, index: number, voltageMode: 'auto' | 'measured'): PreparedRecording {
  if (shared === null || item === null || typeof item !== 'object' || item.recording === null || typeof item.recording !== 'object') return prepareOnce(item, index, voltageMode);
  // The caller keeps the recording unchanged until sharePreparation returns: its channels' noise
  // levels are shared by identity.
  const rec = item.recording;
  if (rec.channels !== null && typeof rec.channels === 'object') keepsUnchanged([rec.time, ...Object.values(rec.channels)]);
  const key = `${index}\u0000${voltageMode}\u0000${item.kind ?? ''}\u0000${item.name ?? ''}`;
  let byKey = shared.get(rec);
  if (byKey === undefined) { byKey = new Map(); shared.set(rec, byKey); }
  let prep = byKey.get(key);
  if (prep === undefined) { prep = prepareOnce(item, index, voltageMode); byKey.set(key, prep); }
  // A shallow copy: a fit replaces the noise levels of its copy (the arrays are only read).
  return { ...prep };
}

/** Preparations shared inside `sharePreparation`, by recording object (null outside it). */
let shared: WeakMap<object, Map<string, PreparedRecording>> | null = null;

/**
 * Runs `work` with the recordings' preparation (checks, kind, noise levels, rebuilt command)
 * done once per recording object and reused by every fit inside it — for a caller that fits the
 * same recordings several times (model choice, score tests), and the noise level of each of their
 * channels estimated once (`estimateNoiseLevel`, by identity). The recordings must not change while
 * `work` runs. Nested calls share the outer scope.
 *
 * @param work - the fits
 * @returns what `work` returns
 * @example
 * const fits = sharePreparation(() => [fitMotor(runs), fitMotor(runs, { coulomb: true })]);
 */
export function sharePreparation<T>(work: () => T): T {
  if (shared !== null) return work();
  shared = new WeakMap();
  try { return shareUnchangedNoise(work); } finally { shared = null; }
}

function prepareOnce(item: MotorRecordingInput, index: number, voltageMode: 'auto' | 'measured'): PreparedRecording {
  const where = `fitMotor: recordings[${index}]`;
  if (item === null || typeof item !== 'object') throw new TypeError(`${where} must be an object { recording, kind?, name? }`);
  const rec = item.recording;
  if (rec === null || typeof rec !== 'object') throw new TypeError(`${where}.recording must be an object with time and channels`);
  const time = rec.time;
  if (!(time instanceof Float64Array)) throw new TypeError(`${where}.recording.time must be a Float64Array`);
  const n = time.length;
  const minRows = rec.layout === 'table' ? 3 : 16;
  if (n < minRows) throw new RangeError(`${where}.recording.time must hold at least ${minRows} ${rec.layout === 'table' ? 'operating points' : 'samples'} (got ${n})`);
  // One pass: finite, strictly increasing, smallest and largest interval.
  let hmin = Infinity, hmax = 0;
  if (!Number.isFinite(time[0]!)) throw new RangeError(`${where}.recording.time[0] must be finite (got ${time[0]})`);
  // (Through the kernel for long records; the loop runs when it cannot, or to say what is wrong.)
  const spacing = n >= KERNEL_MIN_LENGTH ? timeStatsKernel(time) : null;
  if (spacing !== null) ({ hmin, hmax } = spacing);
  else for (let k = 1; k < n; k++) {
    const t = time[k]!;
    if (!Number.isFinite(t)) throw new RangeError(`${where}.recording.time[${k}] must be finite (got ${t})`);
    const d = t - time[k - 1]!;
    if (!(d > 0)) {
      throw new RangeError(`${where}.recording.time must be strictly increasing (time[${k}] = ${t} after ${time[k - 1]})`);
    }
    if (d < hmin) hmin = d;
    if (d > hmax) hmax = d;
  }
  if (rec.channels === null || typeof rec.channels !== 'object') throw new TypeError(`${where}.recording.channels must be an object`);
  const stats = new Map<Float64Array, { maxAbs: number; sum: number }>();
  const channel = (name: 'voltage' | 'supplyVoltage' | 'commandVoltage' | 'current' | 'speed' | 'torque'): Float64Array | null => {
    const v = rec.channels[name];
    if (v === undefined) return null;
    if (!(v instanceof Float64Array)) throw new TypeError(`${where}.recording.channels.${name} must be a Float64Array`);
    if (v.length !== n) throw new TypeError(`${where}.recording.channels.${name} has ${v.length} samples, time has ${n}`);
    // One pass: finite, largest magnitude, sum (for the noise floor and the running direction);
    // through the kernel for long records, the loop when it cannot or to say which sample is not finite.
    const seen = n >= KERNEL_MIN_LENGTH ? channelStatsKernel(v) : null;
    if (seen !== null) {
      stats.set(v, seen);
      return v;
    }
    let maxAbs = 0, sum = 0;
    for (let k = 0; k < n; k++) {
      const x = v[k]!;
      if (!Number.isFinite(x)) throw new RangeError(`${where}.recording.channels.${name}[${k}] must be finite (got ${x})`);
      const a = x < 0 ? -x : x;
      if (a > maxAbs) maxAbs = a;
      sum += x;
    }
    stats.set(v, { maxAbs, sum });
    return v;
  };
  const terminalV = channel('voltage');
  const supplyV = channel('supplyVoltage');
  const commandV = channel('commandVoltage');
  const current = channel('current');
  const speed = channel('speed');
  const torque = channel('torque');
  // The drive voltage: measured at the terminals when logged; else the drive's command (its limits
  // may then show); else the supply (R then stands for R + Rs); else none (speed-only coast).
  let source: PreparedRecording['source'] = terminalV !== null ? 'terminal' : commandV !== null ? 'command' : supplyV !== null ? 'supply' : 'none';
  let voltage = terminalV ?? commandV ?? supplyV;
  if (current === null && speed === null) throw new TypeError(`${where}.recording.channels needs current or speed (got neither)`);
  const table = rec.layout === 'table';
  const name = item.name ?? `recording ${index}`;
  if (typeof name !== 'string') throw new TypeError(`${where}.name must be a string`);

  let kind: MotorExperimentKind;
  let kindSource: 'declared' | 'guessed';
  let kindReason: string;
  // The speed's encoder quantum when the classification already looked for it.
  let seenEncoder: number | null | undefined;
  if (item.kind !== undefined) {
    const kinds: MotorExperimentKind[] = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'];
    if (!kinds.includes(item.kind)) throw new RangeError(`${where}.kind must be one of ${kinds.join(', ')} (got ${JSON.stringify(item.kind)})`);
    kind = item.kind;
    kindSource = 'declared';
    kindReason = 'declared by the caller';
  } else if (table) {
    kind = 'steady-state';
    kindSource = 'guessed';
    kindReason = 'a table of steady operating points (one row each, no time column)';
  } else if (voltage === null) {
    kind = 'coast-down';
    kindSource = 'guessed';
    kindReason = 'no voltage logged: only a coast-down (free deceleration) can be fitted from speed alone';
  } else {
    const g = classifyWithEncoder(rec);
    seenEncoder = g.encoder;
    kind = g.kind;
    kindSource = 'guessed';
    kindReason = g.reason;
  }
  if (voltage === null && kind !== 'coast-down') {
    throw new TypeError(`${where}: a ${kind} recording needs a voltage channel (terminal, supply or command); without one only a coast-down can be fitted`);
  }
  const needs: Record<MotorExperimentKind, ('current' | 'speed' | 'torque')[]> = {
    'locked-rotor': ['current'], step: ['speed'], 'coast-down': ['speed'], 'steady-state': ['current', 'speed'],
    prbs: ['speed'], multisine: ['speed'], loaded: ['current', 'speed', 'torque'],
  };
  for (const c of needs[kind]) {
    if (rec.channels[c] === undefined) throw new TypeError(`${where}.recording.channels.${c} is missing (a ${kind} recording needs it)`);
  }

  // Sampling.
  const h = (time[n - 1]! - time[0]!) / (n - 1);
  const timeBase = hmax - hmin <= 1e-6 * h ? h : time;

  const noise = (v: Float64Array | null): NoiseLevel | null => {
    if (v === null) return null;
    // A table's points are not a time series: its noise comes from its SD columns or the fit.
    if (table) { let q = 0; for (let k = 0; k < n; k++) q += v[k]! * v[k]!; return { sigma: 0.002 * Math.sqrt(q / n) + 1e-12, method: 'given', quantum: null }; }
    const lvl = estimateNoiseLevel(v);
    const maxAbs = stats.get(v)!.maxAbs;
    return { ...lvl, sigma: Math.max(lvl.sigma, FLOOR * Math.max(maxAbs, 1)) };
  };
  const encoder = speed !== null && kind !== 'locked-rotor' && !table ? (seenEncoder !== undefined ? seenEncoder : detectEncoderSpeed(time, speed)) : null;
  const currentNoise = kind === 'coast-down' && !(voltage !== null && current !== null) ? null : noise(current);
  let speedNoise = kind === 'locked-rotor' ? null : noise(speed);
  // Encoder speed: the fit compares angles, whose quantisation error q/√12 is close to white.
  if (encoder !== null && speedNoise !== null) speedNoise = { sigma: encoder / Math.sqrt(12), method: 'quantisation', quantum: encoder };
  let grid = table ? null : nominalTimeGrid(time);

  let input: Float64Array;
  let handling: InputHandling;
  let segments: VoltageSegment[] | null = null;
  let sines: SineModel | null = null;
  let first = 0;
  let supplyDrives = false;
  if (table) {
    input = Float64Array.from(voltage!);
    handling = { method: 'measured', reason: 'steady operating points: each row\'s voltage is the input of its point', stepTime: null, residualRatio: 0, voltageSigma: NaN };
  } else if (kind === 'coast-down') {
    first = findCoastStart(current, speed!, speedNoise!.sigma, voltage);
    const vs = voltage === null ? NaN : estimateNoiseLevel(voltage).sigma;
    input = new Float64Array(n);
    handling = {
      method: 'not-used',
      reason: `coast-down: the armature is open from sample ${first} (t = ${time[first]} s); only the speed decay after it is fitted`,
      stepTime: time[first]!,
      residualRatio: 0,
      voltageSigma: vs,
    };
  } else {
    // Jittered samples see the command's value on its own clock: the index of that value.
    const g0 = grid;
    const phase = g0 === null ? null : Float64Array.from(time, (t) => Math.floor((t - g0.start) / g0.interval + 1e-9));
    grid = g0;
    let rb = rebuildCommand(time, voltage!, voltageMode, phase);
    // Supply and terminal both logged: behind a source resistance the terminal voltage sags with
    // the current and is no longer piecewise constant, while the supply still is. A noisy input
    // biases the constants (errors in variables), so the supply drives the fit (R there is R + Rs)
    // and Rs, from the two voltages, is taken off afterwards.
    if (source === 'terminal' && supplyV !== null) {
      const piecewise = (m: string): boolean => m === 'exact' || m === 'segment-means';
      const bySupply = rebuildCommand(time, supplyV, voltageMode, phase);
      if (piecewise(bySupply.handling.method) && !piecewise(rb.handling.method)) {
        rb = bySupply;
        source = 'supply';
        voltage = supplyV;
        supplyDrives = true;
      }
    }
    if (rb.sineBasis !== undefined) sines = sineModel(rb.sineBasis, voltage!, rb.voltage);
    input = rb.voltage;
    handling = rb.handling;
    segments = rb.segments ?? (kind === 'steady-state' ? detectVoltageSegments(voltage!, handling.voltageSigma) : null);
  }
  let levels = handling.method === 'segment-means' && hasSegments(segments) && !table ? buildLevels(voltage!, segments!, handling.voltageSigma) : null;
  if (kind === 'coast-down' && voltage !== null && first > 8) {
    // The driven plateau before the cut: one level, its voltage samples as rows. The last few
    // samples before the detected cut are left out (the cut may lie a little earlier than seen).
    const margin = Math.max(2, Math.ceil(0.05 * first));
    const plateau = summarise(voltage, 0, Math.max(first - margin, 2));
    levels = { classOf: new Int32Array(n), classes: [{ ...plateau, sigma: handling.voltageSigma }], switches: new Int32Array(0) };
    input.fill(plateau.mean);
  }
  let baseline = false;
  if (levels !== null && segments !== null && segments.length > 1) {
    const s0 = segments![0]!;
    const top = Math.max(...segments!.map((s) => Math.abs(s.level)));
    baseline = s0.end - s0.start >= 8 && Math.abs(s0.level) <= 0.02 * top;
  }
  let torqueStats: ChannelSummary | null = null;
  if (torque !== null && kind === 'loaded') torqueStats = summarise(torque, 0, n);
  const loadTorque = torqueStats === null ? 0 : torqueStats.mean;
  let direction: 1 | -1 = 1;
  if (speed !== null) direction = stats.get(speed)!.sum >= 0 ? 1 : -1;
  handling.source = source;
  handling.sourceNote = source === 'command'
    ? 'input: commanded voltage, not measured at the motor (a drive that limits its voltage or current makes the two differ)'
    : supplyDrives
      ? 'input: supply voltage (piecewise constant, where the terminal voltage sags with the current behind the source resistance); R is R + Rs less Rs from the two voltages'
      : source === 'supply'
      ? 'input: supply voltage, not measured at the motor: R here is R + Rs, the winding plus the supply\'s source resistance'
      : source === 'none' ? 'no voltage logged: only the free deceleration is fitted' : '';
  // A coast-down that shows the driven plateau before the cut (voltage or current there).
  const drivenBeforeCut = kind === 'coast-down' && voltage !== null && first > 8;
  const terminal = drivenBeforeCut && source === 'terminal' ? terminalV : null;
  const spreadOf = (c: 'current' | 'speed' | 'voltage'): Float64Array | null => {
    const v = rec.spread?.[c];
    return v instanceof Float64Array && v.length === n ? v : null;
  };
  return {
    name, kind, kindSource, kindReason, time, timeBase, h, input, handling, segments,
    current: kind === 'coast-down' && !drivenBeforeCut ? null : current,
    speed: kind === 'locked-rotor' ? null : speed,
    currentNoise, speedNoise, loadTorque, first, direction, levels, sines, baseline, torqueStats,
    source, supplyDrives, drive: voltage, terminal, terminalNoise: terminal === null ? null : noise(terminal), encoder, grid, drivenBeforeCut, table,
    spread: table ? { current: spreadOf('current'), speed: spreadOf('speed'), voltage: spreadOf('voltage') } : null,
  };
}

/** The sine fit with the Cholesky factor of its Gram matrix and its residual sum of squares; null when the factor fails. */
function sineModel(basis: SineBasis, voltage: Float64Array, fitted: Float64Array): SineModel | null {
  const q = basis.coefficients.length;
  const G = basis.gram;
  const L = new Float64Array(q * q);
  if (!choleskyFactor(G, q, L)) return null;
  let rss = 0;
  for (let k = 0; k < voltage.length; k++) { const d = voltage[k]! - fitted[k]!; rss += d * d; }
  return { omega: basis.omega, coefficients: basis.coefficients, cholesky: L, rss, count: voltage.length };
}

function hasSegments(segs: VoltageSegment[] | null): boolean {
  return segs !== null && segs.length >= 1;
}

/** Count, mean, Σ(x − mean)² over [a, b) and the channel's noise σ. */
function summarise(x: Float64Array, a: number, b: number): ChannelSummary {
  let m = 0;
  for (let k = a; k < b; k++) m += x[k]!;
  m /= Math.max(b - a, 1);
  let q = 0;
  for (let k = a; k < b; k++) q += (x[k]! - m) * (x[k]! - m);
  return { count: b - a, mean: m, sumSq: q, sigma: estimateNoiseLevel(x).sigma };
}

/**
 * Groups the segments of a piecewise-constant command into level classes (segments whose means
 * differ by less than 6 standard errors share a level, as the two levels of a PRBS do) and
 * collects the statistics of the voltage samples of each class. The two samples around every
 * switching instant are left out of the voltage rows: one of them may straddle the switch.
 */
function buildLevels(voltage: Float64Array, segs: VoltageSegment[], sigma: number): LevelModel {
  const n = voltage.length;
  const classOf = new Int32Array(n);
  const centres: { level: number; count: number }[] = [];
  const segClass: number[] = [];
  const sd = Math.max(sigma, 1e-12);
  for (const s of segs) {
    const cnt = s.end - s.start;
    let found = -1;
    for (let c = 0; c < centres.length; c++) {
      const q = centres[c]!;
      if (Math.abs(q.level - s.level) <= 6 * sd * Math.sqrt(1 / cnt + 1 / q.count) + 1e-9 * Math.abs(s.level)) { found = c; break; }
    }
    if (found < 0) { centres.push({ level: s.level, count: cnt }); found = centres.length - 1; }
    else { const q = centres[found]!; q.level = (q.level * q.count + s.level * cnt) / (q.count + cnt); q.count += cnt; }
    segClass.push(found);
    classOf.fill(found, s.start, s.end);
  }
  const switches = new Int32Array(Math.max(segs.length - 1, 0));
  for (let j = 1; j < segs.length; j++) switches[j - 1] = segs[j]!.start;
  // Samples used as voltage rows: those of each segment without its first (after a switch) and
  // last (before a switch) sample; per class in increasing sample order.
  const m = centres.length;
  const sum = new Float64Array(m), cnt = new Int32Array(m), sq = new Float64Array(m);
  const last = segs.length - 1;
  for (let j = 0; j <= last; j++) {
    const sg = segs[j]!, q = segClass[j]!;
    const a = sg.start + (j > 0 ? 1 : 0), b = sg.end - (j < last ? 1 : 0);
    let s = sum[q]!;
    for (let k = a; k < b; k++) s += voltage[k]!;
    sum[q] = s;
    if (b > a) cnt[q] = cnt[q]! + (b - a);
  }
  const mean = Float64Array.from(sum, (x, q) => (cnt[q]! > 0 ? x / cnt[q]! : centres[q]!.level));
  for (let j = 0; j <= last; j++) {
    const sg = segs[j]!, q = segClass[j]!, mq = mean[q]!;
    const a = sg.start + (j > 0 ? 1 : 0), b = sg.end - (j < last ? 1 : 0);
    let s = sq[q]!;
    for (let k = a; k < b; k++) { const d = voltage[k]! - mq; s += d * d; }
    sq[q] = s;
  }
  const classes: ChannelSummary[] = centres.map((_, q) => ({ count: cnt[q]!, mean: mean[q]!, sumSq: sq[q]!, sigma }));
  return { classOf, classes, switches };
}

/**
 * First sample of the free coast: where the current has dropped below half its running value
 * (when the current is clearly above its noise), else where the smoothed speed first falls 6σ
 * below its early plateau. Errs late (a late start only loses samples; an early one would bias).
 */
function findCoastStart(current: Float64Array | null, speed: Float64Array, sigmaW: number, voltage: Float64Array | null): number {
  const n = speed.length;
  // The early (driven) level from the first 0.5 % of the record: the cut may come early.
  const head = Math.max(5, Math.floor(n / 200));
  if (current !== null) {
    // The current falls to zero at the cut: the best single change point of a two-level fit
    // (before: the running current, after: zero), by least squares over every split (prefix sums).
    const cs = estimateNoiseLevel(current).sigma;
    let s = 0;
    for (let k = 0; k < head; k++) s += current[k]!;
    const i0 = s / head;
    if (Math.abs(i0) > 4 * cs / Math.sqrt(head)) {
      const prefix = new Float64Array(n + 1), prefix2 = new Float64Array(n + 1);
      for (let k = 0; k < n; k++) { prefix[k + 1] = prefix[k]! + current[k]!; prefix2[k + 1] = prefix2[k]! + current[k]! * current[k]!; }
      let best = -1, bestSse = Infinity;
      for (let k = 4; k <= n - 4; k++) {
        const a = prefix[k]!, a2 = prefix2[k]!, b = prefix[n]! - a, b2 = prefix2[n]! - a2;
        const sse = a2 - (a * a) / k + b2 - (b * b) / (n - k);
        if (sse < bestSse) { bestSse = sse; best = k; }
      }
      const before = prefix[best]! / best, after = (prefix[n]! - prefix[best]!) / (n - best);
      if (best > 0 && Math.abs(after) < 0.5 * Math.abs(before)) return Math.min(best, n - 8);
    }
  }
  if (voltage !== null) {
    // The drive voltage holds its level until the cut; the open-circuit voltage Ke·ω then follows
    // the speed down: the first sample that leaves the early level by more than 6σ for good.
    const vs = Math.max(estimateNoiseLevel(voltage).sigma, 1e-12);
    const sorted = Float64Array.from(voltage.subarray(0, head)).sort();
    const v0 = sorted[head >> 1]!;
    for (let k = 1; k + 3 < n; k++) {
      if (Math.abs(voltage[k]! - v0) > 6 * vs && Math.abs(voltage[k + 1]! - v0) > 6 * vs && Math.abs(voltage[k + 2]! - v0) > 6 * vs) return Math.min(k, n - 8);
    }
  }
  const sorted = Float64Array.from(speed.subarray(0, head)).sort();
  const w0 = sorted[head >> 1]!;
  const win = 5;
  for (let k = win; k < n; k++) {
    let s = 0;
    for (let j = k - win; j < k; j++) s += speed[j]!;
    if (Math.abs(s / win - w0) > 6 * sigmaW / Math.sqrt(win) + 0) return Math.min(k, n - 8);
  }
  return 0;
}
