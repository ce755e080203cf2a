/**
 * The one description of the synced tables (shared/sync-tables.ts) against the device database
 * the migrations build: every described field has its column, with a storage class that fits its
 * device type. A table or field added to the description without its device migration fails here.
 * (tests/integration/sync-tables-schema.test.ts checks the same against PostgreSQL.)
 */
import { fieldsOf, pushableTables, syncTableNames, tableSpec } from '../../shared/sync-tables';
import { migrateDevice } from '../../sync/schema';
import { TABLE_COLUMNS } from '../../sync/fields';
import { openMemoryDriver } from './support/sqljs-driver';

const affinity = { text: 'TEXT', json: 'TEXT', int: 'INTEGER', bool: 'INTEGER' } as const;

describe('synced tables on the device', () => {
  it.each(syncTableNames)('%s: every described field has a device column of the right type', async (table) => {
    const db = await openMemoryDriver();
    await migrateDevice(db);
    const columns = new Map((await db.all<{ name: string; type: string }>(`PRAGMA table_info(${table})`)).map((c) => [c.name, c.type.toUpperCase()]));
    expect(columns.size).toBeGreaterThan(0);
    for (const [field, spec] of fieldsOf(table)) {
      expect({ field, type: columns.get(spec.column) }).toEqual({ field, type: affinity[spec.device] });
    }
    expect(columns.has('id') && columns.has('team_id') && columns.has('synced')).toBe(true);
    await db.close();
  });

  it('the device mapping is the description: same fields, same columns', () => {
    for (const table of syncTableNames) {
      expect(TABLE_COLUMNS[table].map((c) => [c.field, c.column])).toEqual(fieldsOf(table).map(([field, f]) => [field, f.column]));
    }
  });

  it('pushable tables describe what a new record needs and who may push', () => {
    expect([...pushableTables].sort()).toEqual(['crossings', 'cues', 'observations', 'runs', 'sessions', 'targets']);
    for (const table of pushableTables) {
      const fields = fieldsOf(table);
      expect(fields.some(([, f]) => f.required)).toBe(true);
      // Every field a push may carry has a rule; a field without one only flows down.
      for (const [, f] of fields) if (f.required || f.immutable) expect(f.rule).toBeDefined();
      expect(tableSpec(table).pushBy).not.toBe('none');
    }
  });
});
