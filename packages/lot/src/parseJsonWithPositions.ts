import { LotError, type LotErrorCode } from './LotError.js';

/** A parsed JSON document with the line and column where each value starts, keyed by JSON path. */
export interface JsonWithPositions {
  /** The value, as `JSON.parse` would give it. */
  value: unknown;
  /** 1-based line and column of each value, keyed by path (`''` for the root, `limits.R.min`, `list[2]`). */
  positions: Map<string, { line: number; column: number }>;
}

function childPath(parent: string, key: string | number): string {
  if (typeof key === 'number') return `${parent}[${key}]`;
  const plain = /^[A-Za-z_$][A-Za-z0-9_$]*$/.test(key) ? key : JSON.stringify(key);
  if (parent === '') return plain;
  return plain.startsWith('"') ? `${parent}[${plain}]` : `${parent}.${plain}`;
}

/**
 * Parses JSON text (RFC 8259) and records where every value starts, so that a later check can name
 * the line and column as well as the JSON path. Unlike `JSON.parse` it refuses an object with the
 * same key twice (the first would otherwise be dropped without a word).
 *
 * @param text - the file's text (a leading byte-order mark is allowed)
 * @param file - file name for messages
 * @param code - error code to throw with
 * @returns the value and the positions
 * @throws LotError with line and column on a syntax error or a repeated key
 * @example
 * parseJsonWithPositions('{"a": [1, 2]}', 'x.json', 'spec-not-json').positions.get('a[1]'); // => { line: 1, column: 11 }
 */
export function parseJsonWithPositions(text: string, file: string, code: LotErrorCode): JsonWithPositions {
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const positions = new Map<string, { line: number; column: number }>();
  let i = 0;
  let line = 1;
  let lineStart = 0;
  const where = () => ({ line, column: i - lineStart + 1 });
  const fail = (message: string): never => { throw new LotError(code, file, message, where()); };
  const skip = () => {
    for (;;) {
      const c = src[i];
      if (c === '\n') { i++; line++; lineStart = i; } else if (c === ' ' || c === '\t' || c === '\r') i++;
      else return;
    }
  };
  const parseString = (): string => {
    const start = i;
    i++; // opening quote
    for (;;) {
      const c = src[i];
      if (c === undefined || c === '\n') { i = start; return fail('a string is not closed on its line (missing ")'); }
      if (c === '"') { i++; break; }
      if (c === '\\') i += 2; else i++;
    }
    try { return JSON.parse(src.slice(start, i)) as string; } catch { i = start; return fail('a string has an invalid escape sequence'); }
  };
  const parseValue = (path: string): unknown => {
    skip();
    positions.set(path, where());
    const c = src[i];
    if (c === '{') {
      i++;
      const out: Record<string, unknown> = {};
      skip();
      if (src[i] === '}') { i++; return out; }
      for (;;) {
        skip();
        if (src[i] !== '"') fail(`expected a key in double quotes${src[i] === undefined ? ' before the end of the file' : ` but found "${src[i]}"`}`);
        const keyAt = where();
        const key = parseString();
        if (Object.prototype.hasOwnProperty.call(out, key)) {
          throw new LotError(code, file, `the key "${key}" appears twice in the same object; keep one`, { path: childPath(path, key), ...keyAt });
        }
        skip();
        if (src[i] !== ':') fail(`expected ":" after the key "${key}"`);
        i++;
        out[key] = parseValue(childPath(path, key));
        skip();
        if (src[i] === ',') { i++; continue; }
        if (src[i] === '}') { i++; return out; }
        fail(`expected "," or "}" after the value of "${key}"${src[i] === undefined ? ' before the end of the file' : ''}`);
      }
    }
    if (c === '[') {
      i++;
      const out: unknown[] = [];
      skip();
      if (src[i] === ']') { i++; return out; }
      for (;;) {
        out.push(parseValue(childPath(path, out.length)));
        skip();
        if (src[i] === ',') { i++; continue; }
        if (src[i] === ']') { i++; return out; }
        fail(`expected "," or "]" in a list${src[i] === undefined ? ' before the end of the file' : ''}`);
      }
    }
    if (c === '"') return parseString();
    const m = /^(?:-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?|true|false|null)/.exec(src.slice(i, i + 64));
    if (m === null) return fail(c === undefined ? 'the file ends where a value should be' : `unexpected "${c}" where a value should be`);
    i += m[0].length;
    return JSON.parse(m[0]) as unknown;
  };
  const value = parseValue('');
  skip();
  if (i < src.length) fail('unexpected text after the end of the JSON document');
  return { value, positions };
}
