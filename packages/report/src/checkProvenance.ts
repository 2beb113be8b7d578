import type { JsonValue, Provenance } from './types.js';

function checkJson(fn: string, path: string, v: unknown, depth: number): JsonValue {
  if (depth > 32) throw new TypeError(`${fn}: ${path} is nested too deeply (more than 32 levels)`);
  if (v === null || typeof v === 'boolean' || typeof v === 'string') return v;
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) throw new RangeError(`${fn}: ${path} must be a finite number (got ${v})`);
    return v;
  }
  if (Array.isArray(v)) return v.map((x, i) => checkJson(fn, `${path}[${i}]`, x, depth + 1));
  if (typeof v === 'object' && Object.getPrototypeOf(v) === Object.prototype) {
    const o: { [k: string]: JsonValue } = {};
    for (const [k, x] of Object.entries(v as Record<string, unknown>)) {
      if (x === undefined) continue;
      o[k] = checkJson(fn, `${path}.${k}`, x, depth + 1);
    }
    return o;
  }
  throw new TypeError(`${fn}: ${path} must be JSON data (null, boolean, finite number, string, array or plain object) (got ${typeof v})`);
}

/**
 * Check a provenance record and return a deep, JSON-only copy of it (undefined option values are
 * left out; anything else that JSON cannot hold is an error).
 *
 * @param fn - name of the calling function, for messages
 * @param path - path of the record in the caller's input, for messages
 * @param p - the record
 * @returns a checked copy
 * @throws TypeError for wrong types (non-string tool name, non-array inputs, a function among the
 *   options…), RangeError for a malformed sha256 or an empty date
 * @example
 * checkProvenance('f', 'options.provenance', { tool: { name: 'motorprint', version: '0.1.0' }, date: '2025-01-01', inputs: [], options: {} }).tool.name;
 * // => 'motorprint'
 */
export function checkProvenance(fn: string, path: string, p: unknown): Provenance {
  if (p === null || typeof p !== 'object') throw new TypeError(`${fn}: ${path} must be an object (got ${p === null ? 'null' : typeof p})`);
  const q = p as Record<string, unknown>;
  const tool = q.tool as Record<string, unknown> | undefined;
  if (tool === null || typeof tool !== 'object') throw new TypeError(`${fn}: ${path}.tool must be an object { name, version }`);
  for (const k of ['name', 'version'] as const) {
    if (typeof tool[k] !== 'string' || tool[k] === '') throw new TypeError(`${fn}: ${path}.tool.${k} must be a non-empty string (got ${JSON.stringify(tool[k])})`);
  }
  if (typeof q.date !== 'string') throw new TypeError(`${fn}: ${path}.date must be a string (got ${JSON.stringify(q.date)})`);
  if (q.date.trim() === '') throw new RangeError(`${fn}: ${path}.date must not be empty`);
  if (!Array.isArray(q.inputs)) throw new TypeError(`${fn}: ${path}.inputs must be an array (got ${typeof q.inputs})`);
  const inputs = q.inputs.map((f: unknown, i: number) => {
    const r = f as Record<string, unknown> | null;
    if (r === null || typeof r !== 'object') throw new TypeError(`${fn}: ${path}.inputs[${i}] must be an object { file, sha256 }`);
    if (typeof r.file !== 'string' || r.file === '') throw new TypeError(`${fn}: ${path}.inputs[${i}].file must be a non-empty string (got ${JSON.stringify(r.file)})`);
    if (typeof r.sha256 !== 'string') throw new TypeError(`${fn}: ${path}.inputs[${i}].sha256 must be a string (got ${JSON.stringify(r.sha256)})`);
    if (!/^[0-9a-f]{64}$/.test(r.sha256)) {
      throw new RangeError(`${fn}: ${path}.inputs[${i}].sha256 must be 64 lowercase hex digits (got ${JSON.stringify(r.sha256)})`);
    }
    return { file: r.file, sha256: r.sha256 };
  });
  const options = q.options === undefined ? {} : checkJson(fn, `${path}.options`, q.options, 0);
  if (options === null || typeof options !== 'object' || Array.isArray(options)) throw new TypeError(`${fn}: ${path}.options must be a plain object`);
  return { tool: { name: tool.name as string, version: tool.version as string }, date: q.date, inputs, options };
}
