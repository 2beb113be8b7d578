import { createIngestor } from './createIngestor.js';
import type { IngestOptions, IngestResult } from './types.js';

/**
 * Reads a whole CSV held in a string. The SHA-256 in meta is that of the text's UTF-8 bytes.
 *
 * @param text - the file contents
 * @param options - see {@link IngestOptions}
 * @returns the recording and its issues
 * @throws IngestError for unusable input (see the README for the codes)
 * @example
 * ingestText('t [s],V [V],I [mA]\n0,0,0\n0.001,12,350\n0.002,12,340\n').recording.channels.current
 * // => Float64Array [0, 0.35, 0.34]
 */
export function ingestText(text: string, options: IngestOptions = {}): IngestResult {
  const ingestor = createIngestor({ ...options, sizeHint: options.sizeHint ?? text.length });
  ingestor.push(text);
  return ingestor.finish();
}
