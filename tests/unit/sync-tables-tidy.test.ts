/**
 * The description's tidy-up parts (shared/sync-tables.ts): a note's session, skater and cue are
 * editable references (a move keeps the note's id, author and createdAt fixed); a table whose
 * owner can change names the server column remembering former owners and filters viewers by
 * owner; a "kept while referenced" rule points at a real reference to the table it protects.
 */
import { boardSessionIdFor, fieldSpec, syncTableNames, tableSpec } from '../../shared/sync-tables';
import { sessionIdFor } from '../../sync/tables/sessions';

describe('tidy-up in the table description', () => {
  it('lets a note move (session, skater, cue editable references) while its author and createdAt stay fixed', () => {
    for (const [field, ref] of [['sessionId', 'sessions'], ['skaterId', 'skaters'], ['cueId', 'cues']] as const) {
      const spec = fieldSpec('observations', field)!;
      expect({ field, immutable: spec.immutable ?? false, ref: spec.ref, required: spec.required }).toEqual({ field, immutable: false, ref, required: true });
    }
    for (const field of ['createdAt', 'createdBy', 'authorName']) expect({ field, immutable: fieldSpec('observations', field)!.immutable }).toEqual({ field, immutable: true });
  });

  it('a table whose owner moves names its former-owner column and filters viewers by owner', () => {
    const movable = syncTableNames.filter((t) => tableSpec(t).formerOwnersColumn);
    expect(movable).toEqual(['observations']);
    for (const table of movable) {
      const spec = tableSpec(table);
      expect(spec.ownerField).toBeDefined();
      expect(fieldSpec(table, spec.ownerField!)!.immutable ?? false).toBe(false);
      expect(spec.viewerRows).not.toBe('team');
      // Never a field: the list of former owners is not pulled or pushed.
      expect(Object.values(spec.fields).map((f) => f.column)).not.toContain(spec.formerOwnersColumn);
    }
    // Tables whose owner may not move keep it fixed (a run or a target does not change skater).
    for (const table of syncTableNames.filter((t) => tableSpec(t).ownerField && !tableSpec(t).formerOwnersColumn)) {
      expect({ table, immutable: fieldSpec(table, tableSpec(table).ownerField!)!.immutable }).toEqual({ table, immutable: true });
    }
  });

  it('a session is kept while notes point at it, through a real reference, and is deleted as a tombstone', () => {
    for (const table of syncTableNames) {
      const rule = tableSpec(table).keptWhileReferenced;
      if (!rule) continue;
      expect(fieldSpec(rule.table, rule.field)?.ref).toBe(table);
      expect(tableSpec(table).deletes).toBe('tombstone');
    }
    expect(tableSpec('sessions').keptWhileReferenced).toEqual({ table: 'observations', field: 'sessionId' });
  });

  it('guards session deletes: author or head coach, only a held id, never the board session derived from team and day', () => {
    const guard = tableSpec('sessions').deleteGuard!;
    expect({ by: guard.by, held: guard.held }).toEqual({ by: 'author_or_head_coach', held: true });
    const team = '0193a000-0000-7000-8000-00000000aaaa';
    // The server's derivation is the device's, for any day.
    for (const day of ['2026-03-02', '2026-12-31', '2027-01-01']) expect(boardSessionIdFor(team, day)).toBe(sessionIdFor(team, day));
    expect(guard.derivedId!(team, { day: '2026-03-02' })).toBe(sessionIdFor(team, '2026-03-02'));
    expect(guard.derivedId!(team, {})).toBeNull();
    // No other table carries a guard it would not be checked for.
    expect(syncTableNames.filter((t) => tableSpec(t).deleteGuard)).toEqual(['sessions']);
  });
});
