import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import { createIngestor } from './createIngestor.js';
import { IngestError } from './IngestError.js';
import type { IngestOptions, IngestResult } from './types.js';

/**
 * Reads a CSV file from disk, streaming it through {@link createIngestor} in 1 MiB chunks (the file
 * is hashed with SHA-256 as it streams). This is the package's only file-system use.
 *
 * @param path - file path
 * @param options - see {@link IngestOptions}; `fileName` defaults to `path`
 * @returns the recording and its issues
 * @throws IngestError `file-unreadable` when the file cannot be opened or read, or any ingest error
 * @example
 * const { recording } = await readRecording('fixtures/demo/step.csv');
 * recording.meta.timeBase.sampleRate // ≈ 10000
 */
export async function readRecording(path: string, options: IngestOptions = {}): Promise<IngestResult> {
  const fileName = options.fileName ?? path;
  let size: number;
  try {
    const info = await stat(path);
    if (!info.isFile()) throw new Error('not a regular file');
    size = info.size;
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'file not found' : code === 'EISDIR' ? 'it is a folder, not a file' : `cannot read the file (${(error as Error).message})`;
    throw new IngestError('file-unreadable', fileName, why, { cause: error });
  }
  const ingestor = createIngestor({ ...options, fileName, sizeHint: options.sizeHint ?? size });
  const stream = createReadStream(path, { highWaterMark: 1 << 20 });
  try {
    for await (const chunk of stream) ingestor.push(chunk as Buffer);
  } catch (error) {
    if (error instanceof IngestError) throw error;
    throw new IngestError('file-unreadable', fileName, `reading failed (${(error as Error).message})`, { cause: error });
  } finally {
    stream.destroy();
  }
  return ingestor.finish();
}
