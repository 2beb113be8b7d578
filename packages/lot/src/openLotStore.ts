import type initSqlJs from 'sql.js';
import type { Database } from 'sql.js';
import { LotError } from './LotError.js';
import { LOT_STORE_SCHEMA_ID } from './storeSchema.js';

/**
 * Internal: opens store bytes with sql.js and checks that they are a lot store of this schema (or
 * an empty database, or nothing at all, which become one). The caller closes the database.
 * @throws LotError `store-invalid`
 */
export function openLotStore(SQL: initSqlJs.SqlJsStatic, existing: Uint8Array | null, file: string): Database {
  if (existing === null || existing.length === 0) return new SQL.Database();
  let db: Database;
  try {
    db = new SQL.Database(existing);
    const tables = db.exec("SELECT name FROM sqlite_master WHERE type = 'table'")[0]?.values.map((r) => String(r[0])) ?? [];
    if (tables.length === 0) return db;
    if (!tables.includes('store_info')) {
      db.close();
      throw new LotError('store-invalid', file, `is a SQLite file but not a motorprint lot store (its tables: ${tables.join(', ')}); use another store file`);
    }
    const schema = db.exec("SELECT value FROM store_info WHERE key = 'schema'")[0]?.values[0]?.[0];
    if (schema !== LOT_STORE_SCHEMA_ID) {
      db.close();
      throw new LotError('store-invalid', file, `is a lot store of schema ${JSON.stringify(schema ?? null)}, not ${LOT_STORE_SCHEMA_ID}; use another store file`);
    }
    return db;
  } catch (error) {
    if (error instanceof LotError) throw error;
    throw new LotError('store-invalid', file, `is not a SQLite database (${(error as Error).message}); use another store file`, { cause: error });
  }
}

