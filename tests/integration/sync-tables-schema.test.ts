/**
 * The one description of the synced tables (shared/sync-tables.ts) against the PostgreSQL schema
 * the migrations build: every field a push may write has its column with the described type, and
 * every synced table has the bookkeeping columns sync relies on. A field added to the description
 * without its migration fails here rather than in a push.
 */
import { fieldsOf, syncTableNames, tableSpec } from '../../shared/sync-tables';
import { startTestServer, type TestServer } from './helpers';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(() => server.close());

const pgType = { uuid: 'uuid', text: 'text', bool: 'boolean', int: 'integer', timestamptz: 'timestamp with time zone', jsonb: 'jsonb' } as const;

describe('synced tables in PostgreSQL', () => {
  it.each(syncTableNames)('%s: described columns exist with their types', async (table) => {
    const spec = tableSpec(table);
    const rows: { column_name: string; data_type: string }[] = await server.dataSource.query(
      `SELECT column_name, data_type FROM information_schema.columns WHERE table_schema = 'public' AND table_name = $1`,
      [spec.serverTable],
    );
    const columns = new Map(rows.map((r) => [r.column_name, r.data_type]));
    for (const [field, f] of fieldsOf(table)) {
      if (f.read) continue; // computed on read from other columns
      expect({ field, type: columns.get(f.column) }).toEqual({ field, type: pgType[f.server] });
    }
    for (const column of ['team_id', 'id', 'server_seq', 'field_hlc', 'deleted_at']) expect(columns.has(column)).toBe(true);
    if (spec.pushBy !== 'none') expect(columns.has('deleted_hlc')).toBe(true);
  });
});
