import { stat } from 'node:fs/promises';
import { resolve } from 'node:path';

/** An input file that cannot be used: not found, a folder, or not readable. Exit code 1. */
export class InputFileError extends Error {
  override name = 'InputFileError';
  /** The file as the user typed it. */
  readonly path: string;
  constructor(message: string, path: string) {
    super(message);
    this.path = path;
  }
}

/** Plain words for a file-system error code, or null for a code not listed. */
export function fsReason(code: unknown): string | null {
  switch (code) {
    case 'ENOENT': return 'not found';
    case 'ENOTDIR': return 'a part of the path is not a folder';
    case 'EISDIR': return 'it is a folder';
    case 'EACCES':
    case 'EPERM': return 'permission denied';
    case 'ENOSPC': return 'no space left on the device';
    case 'EROFS': return 'read-only file system';
    case 'EMFILE':
    case 'ENFILE': return 'too many open files';
    default: return null;
  }
}

/**
 * One line for a file-system error on `file` (as the user typed it): `file not found: PATH`,
 * `cannot read PATH: permission denied`, … — never the raw `ENOENT: …, stat '…'` text.
 *
 * @param file - the path as typed
 * @param err - the error from `node:fs`
 */
export function fileErrorText(file: string, err: unknown): string {
  const code = (err as { code?: unknown } | null)?.code;
  switch (code) {
    case 'ENOENT': return `file not found: ${file}`;
    case 'ENOTDIR': return `file not found: ${file} (a part of the path is not a folder)`;
    case 'EISDIR': return `${file} is a folder, not a file`;
    case 'EACCES':
    case 'EPERM': return `cannot read ${file}: permission denied`;
    case 'EMFILE':
    case 'ENFILE': return `cannot open ${file}: too many open files`;
    default: return `cannot read ${file}${typeof code === 'string' ? ` (${code})` : ''}`;
  }
}

/**
 * Checks, before any work, that every input file exists and is a file.
 *
 * @param cwd - folder relative paths are taken from
 * @param files - the paths as typed
 * @throws InputFileError naming the first file that cannot be used
 */
export async function checkInputFiles(cwd: string, files: readonly string[]): Promise<void> {
  for (const file of files) {
    let info;
    try {
      info = await stat(resolve(cwd, file));
    } catch (err) {
      throw new InputFileError(fileErrorText(file, err), file);
    }
    if (!info.isFile()) throw new InputFileError(`${file} is ${info.isDirectory() ? 'a folder' : 'not a regular file'}; give a file`, file);
  }
}

/**
 * Whether an output path can be written without surprises: `null` when fine, else the reason (it
 * is an existing folder). Checked before any work so a long fit does not end in a write error.
 */
export async function outputPathProblem(cwd: string, file: string): Promise<string | null> {
  try {
    const info = await stat(resolve(cwd, file));
    return info.isDirectory() ? `${file} is a folder; give a file name to write` : null;
  } catch {
    return null;
  }
}
