/** Loads the package's own copies of the NIST StRD nonlinear datasets (test support). */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { parseStrdNonlinear, type StrdDataset } from './parseStrdNonlinear.js';

/** Directory of the copied `.dat` files (packages/estimate/test-data/nist-strd). */
export const STRD_DIR = fileURLToPath(new URL('../../../test-data/nist-strd/', import.meta.url));

/**
 * Reads and parses one dataset by name (without `.dat`).
 *
 * @param name - e.g. `'Misra1a'`
 * @returns the parsed dataset
 */
export function loadStrd(name: string): StrdDataset {
  return parseStrdNonlinear(readFileSync(`${STRD_DIR}${name}.dat`, 'latin1'), `${name}.dat`);
}
