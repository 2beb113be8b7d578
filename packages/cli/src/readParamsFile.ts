import type { DetailedParams } from '@motorprint/model';

/** Keys accepted in a parameter file, with their SI units (for messages and help). */
/** Entries of a parameter set that are not inputs of the model (ratios and combinations of constants). */
const SET_ONLY = ['R+Rs', 'Kt/Ke', 'b/J', 'Tc/J', 'c/J', 'speed gain', 'mechanical time constant', 'R20'];

export const PARAM_KEYS: Readonly<Record<string, string>> = {
  R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad',
  Tc: 'N·m', Ts: 'N·m', cd: 'N·m·s²/rad²', Vmax: 'V', Imax: 'A', Rth: 'K/W', Cth: 'J/K',
  referenceTemperature: '°C', copperConstant: '(234.5 or 235)', ambientTemperature: '°C',
  initialTemperature: '°C', Rs: 'Ω', loadInertia: 'kg·m²', loadTorque: 'N·m', loadDamping: 'N·m·s/rad',
};

/**
 * Reads motor constants from the text of a JSON file. Two shapes are accepted:
 * a plain object of SI numbers (`{"R": 1.2, "L": 0.0008, …}`), or a parameter set as written by
 * `motorprint fit --json` (`{"parameters": {"R": {"value": 1.2, "unit": "Ω"}, …}}`).
 * When `Kt` or `Ke` is missing, it takes the other's value (Kt = Ke in SI) — or `K` if given.
 *
 * @param text - the file's contents
 * @param file - the file name, for messages
 * @returns the constants and effect terms
 * @throws Error naming the file and the key when a value is missing, not a number, or unknown
 */
export function readParamsFile(text: string, file: string): DetailedParams {
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (err) {
    throw new Error(`${file}: not valid JSON (${(err as Error).message})`);
  }
  if (doc === null || typeof doc !== 'object' || Array.isArray(doc)) {
    throw new Error(`${file}: expected a JSON object of constants, e.g. {"R": 1.2, "L": 0.0008, "Kt": 0.035, "Ke": 0.035, "J": 4e-6, "b": 2e-6}`);
  }
  const record = doc as Record<string, unknown>;
  const source =
    record.parameters !== null && typeof record.parameters === 'object' && !Array.isArray(record.parameters)
      ? (record.parameters as Record<string, unknown>)
      : record;
  const out = new Map<string, number>();
  const fromSet = source !== record;
  for (const [rawKey, raw] of Object.entries(source)) {
    const value =
      raw !== null && typeof raw === 'object' && 'value' in (raw as object) ? (raw as { value: unknown }).value : raw;
    // A parameter set also states ratios (b/J, Kt/Ke, …), effects the data did not support (value
    // null) and the copper-law R20; the drag coefficient is `c` there and `cd` in the model.
    let key = rawKey;
    if (fromSet) {
      if (SET_ONLY.includes(key)) continue;
      if (value === null && !['R', 'L', 'Kt', 'Ke', 'J', 'b'].includes(key)) continue;
      if (key === 'c') key = 'cd';
    }
    if (key === 'K') {
      if (typeof value !== 'number' || !Number.isFinite(value)) throw new Error(`${file}: "K" must be a finite number (got ${JSON.stringify(value)})`);
      out.set('K', value);
      continue;
    }
    if (!Object.hasOwn(PARAM_KEYS, key)) {
      if (source === record && ['$schema', 'schemaVersion', 'tool', 'version', 'provenance', 'findings', 'model', 'notes'].includes(key)) continue;
      throw new Error(`${file}: unknown constant "${key}". Known: ${Object.keys(PARAM_KEYS).join(', ')}`);
    }
    if (typeof value !== 'number' || !Number.isFinite(value)) {
      throw new Error(`${file}: "${key}" must be a finite number in ${PARAM_KEYS[key]} (got ${JSON.stringify(value)})`);
    }
    out.set(key, value);
  }
  const k = out.get('K');
  out.delete('K');
  if (!out.has('Kt') && out.has('Ke')) out.set('Kt', out.get('Ke') as number);
  if (!out.has('Ke') && out.has('Kt')) out.set('Ke', out.get('Kt') as number);
  if (k !== undefined) {
    if (!out.has('Kt')) out.set('Kt', k);
    if (!out.has('Ke')) out.set('Ke', k);
  }
  for (const key of ['R', 'L', 'Kt', 'Ke', 'J', 'b']) {
    if (!out.has(key)) throw new Error(`${file}: missing constant "${key}" [${PARAM_KEYS[key]}]`);
  }
  // The heating model's R is the resistance at 20 °C.
  if (fromSet && out.has('Rth') && out.has('Cth')) {
    const r20 = (source.R20 as { value?: unknown } | undefined)?.value;
    if (typeof r20 === 'number' && Number.isFinite(r20)) { out.set('R', r20); out.set('referenceTemperature', 20); }
  }
  const params = Object.create(null) as Record<string, number>;
  for (const [key, value] of out) params[key] = value;
  return { ...params } as unknown as DetailedParams;
}
