import { open, stat } from 'node:fs/promises';
import { createIngestor, HEAD_BYTES } from './createIngestor.js';
import { IngestError } from './IngestError.js';
import type { IngestOptions, IngestResult } from './types.js';

/** Bytes per read. */
const CHUNK = 1 << 20;

/**
 * Reads a CSV file from disk, streaming it through {@link createIngestor} in 1 MiB chunks (the file
 * is hashed with SHA-256 as it streams). Two buffers take turns: the next chunk is read into one
 * while the other is parsed. This is the package's only file-system use.
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
  let handle: Awaited<ReturnType<typeof open>> | undefined;
  let next: Promise<{ bytesRead: number }> | undefined;
  try {
    handle = await open(path, 'r');
    const buffers = [Buffer.allocUnsafeSlow(CHUNK), Buffer.allocUnsafeSlow(CHUNK)];
    let turn = 0;
    // The first read is the head the ingestor settles the encoding and dialect on: a whole first chunk
    // would be decoded into a string of 1 MB for that alone (≈ 250 pages touched, and the dialect's
    // scan over all of it); the chunks after it are read as bytes.
    next = handle.read(buffers[0]!, 0, HEAD_BYTES, null);
    for (;;) {
      const { bytesRead } = await next;
      next = undefined;
      if (bytesRead === 0) break;
      const chunk = buffers[turn]!;
      turn ^= 1;
      next = handle.read(buffers[turn]!, 0, CHUNK, null);
      // push() keeps no reference to the chunk, so its buffer can be refilled afterwards.
      ingestor.push(bytesRead === CHUNK ? chunk : chunk.subarray(0, bytesRead));
    }
  } catch (error) {
    if (error instanceof IngestError) throw error;
    throw new IngestError('file-unreadable', fileName, `reading failed (${(error as Error).message})`, { cause: error });
  } finally {
    // A read still in flight (after an error) must end before the file is closed.
    if (next) await next.catch(() => undefined);
    await handle?.close();
  }
  return ingestor.finish();
}
