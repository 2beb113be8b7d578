import initSqlJs from 'sql.js';
import { openLotStore } from './openLotStore.js';

/**
 * Checks, before a lot is fitted, that a store file can take a new lot run: it is missing or
 * empty, or it is a lot store of schema `motorprint.lot-store/1`. Returns how many lot runs it
 * holds already.
 *
 * @param existing - the file's bytes, or null when there is none yet
 * @param file - the store's file name, for messages
 * @returns the number of lot runs in the store (0 for a new one)
 * @throws LotError `store-invalid` when the bytes are not SQLite or not a lot store of this schema
 * @example
 * await checkLotStore(null, 'lots.sqlite'); // => 0
 */
export async function checkLotStore(existing: Uint8Array | null, file: string): Promise<number> {
  const SQL = await initSqlJs();
  const db = openLotStore(SQL, existing, file);
  try {
    const has = db.exec("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'lot_runs'").length > 0;
    return has ? Number(db.exec('SELECT count(*) FROM lot_runs')[0]!.values[0]![0]) : 0;
  } finally {
    db.close();
  }
}
