/** A SqlDriver over sql.js (SQLite compiled to WebAssembly) so the device store's SQL runs in jest. */
import initSqlJs, { type Database } from 'sql.js';
import type { SqlDriver, SqlValue } from '../../../sync/driver';

export async function openMemoryDriver(): Promise<SqlDriver & { raw: Database }> {
  const SQL = await initSqlJs();
  const db = new SQL.Database();
  return {
    raw: db,
    async exec(sql) {
      db.exec(sql);
    },
    async run(sql, params: readonly SqlValue[] = []) {
      db.run(sql, params as SqlValue[]);
      return { changes: db.getRowsModified() };
    },
    async all<T>(sql: string, params: readonly SqlValue[] = []) {
      const statement = db.prepare(sql, params as SqlValue[]);
      const rows: T[] = [];
      try {
        while (statement.step()) rows.push(statement.getAsObject() as T);
      } finally {
        statement.free();
      }
      return rows;
    },
    async close() {
      db.close();
    },
  };
}
