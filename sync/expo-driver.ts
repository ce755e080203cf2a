/** The SqlDriver over expo-sqlite's async API (the only one that works in every browser setup). */
import * as SQLite from 'expo-sqlite';
import type { SqlDriver, SqlValue } from './driver';

/** One database file for the device, whoever signs in (browsers allow only a few per origin). */
export const DEVICE_DATABASE = 'boardside.db';

export async function openExpoDriver(name = DEVICE_DATABASE): Promise<SqlDriver> {
  const db = await SQLite.openDatabaseAsync(name);
  // One tab owns the file (sync/tab-lock.ts), so an exclusive lock costs nothing and spares every
  // transaction a lock round trip; a persistent journal spares creating and deleting a journal
  // file per commit. Both keep full durability (synchronous stays FULL: a dead battery at the
  // rink must not corrupt the notebook).
  await db.execAsync('PRAGMA locking_mode = EXCLUSIVE; PRAGMA journal_mode = PERSIST; PRAGMA foreign_keys = ON;');
  return {
    exec: (sql) => db.execAsync(sql),
    run: async (sql, params: readonly SqlValue[] = []) => {
      const result = await db.runAsync(sql, params as SqlValue[]);
      return { changes: result.changes };
    },
    all: <T>(sql: string, params: readonly SqlValue[] = []) => db.getAllAsync<T>(sql, params as SqlValue[]),
    close: () => db.closeAsync(),
  };
}
