/**
 * The squad a head coach manages: retired skaters, withdrawn invitations, and names that tell
 * people and cues apart.
 *
 * - skaters.retired_at: a retired skater keeps every note and run but leaves the board. The
 *   device reads it as the boolean `retired` (shared/sync-tables.ts).
 * - invitations.revoked_at: the head coach withdrew the invitation; its link fails like an
 *   expired one.
 * - One name per person, group and cue: unique indexes on the name's key, which is the name in
 *   Unicode NFC, lower-cased by ICU's root locale ("und-x-icu": the database's own collation is C,
 *   whose lower() only knows ASCII, so "ÉLODIE" and "élodie" would pass as two people). The same
 *   key is computed on the client by shared/names.ts (trim + NFC + toLowerCase), so the forms warn
 *   before the server refuses. Names are already trimmed by the shared schemas.
 *   - skaters: per team; retired skaters count (a retired "Mia K." blocks a new "Mia K.": the
 *     coach brings her back or adds an initial).
 *   - skater_groups: per team.
 *   - cues: per team and phase. Archived cues count: an archived cue can be brought back, and two
 *     live cues with one label in a phase could not be told apart on the board. Deleted cues
 *     (tombstones, which never come back) do not.
 *   Every index leaves tombstoned rows (deleted_at set) out: they are nobody's name any more.
 *
 * Existing duplicates would stop the indexes from building: every duplicate but the first made
 * is renamed "<name> (2)", "(3)", ... first (the first free number, the name cut to the column's
 * length limit). The rename goes through the stamp_server_seq trigger, so devices pull it. `down`
 * drops the indexes and columns; the renames stay (they are the coach's data now).
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

/** The key a name is unique by. Keep in step with shared/names.ts (nameKey). */
const key = (column: string) => `lower(normalize(${column}, NFC) COLLATE "und-x-icu")`;

interface Named {
  table: string;
  column: string;
  /** Columns besides team_id within which the name is unique. */
  scope: string[];
  /** Longest name the table accepts (characters). */
  maxLength: number;
}

const named: Named[] = [
  { table: 'skaters', column: 'display_name', scope: [], maxLength: 80 },
  { table: 'skater_groups', column: 'name', scope: [], maxLength: 80 },
  { table: 'cues', column: 'label', scope: ['phase'], maxLength: 60 },
];

/** Renames every duplicate but the oldest to the first free "<name> (n)". */
async function renameDuplicates(q: QueryRunner, { table, column, scope, maxLength }: Named) {
  const partition = ['team_id', ...scope].join(', ');
  const duplicates: { team_id: string; id: string; name: string; scope: string[] }[] = await q.query(
    `SELECT team_id, id, ${column} AS name, ARRAY[${scope.length ? scope.join(', ') : `''`}]::text[] AS scope
       FROM (SELECT team_id, id, ${column}, created_at, server_seq, ${scope.length ? `${scope.join(', ')}, ` : ''}
                    row_number() OVER (PARTITION BY ${partition}, ${key(column)} ORDER BY created_at, server_seq, id) AS n
               FROM ${table} WHERE deleted_at IS NULL) ranked
      WHERE n > 1
      ORDER BY team_id, created_at, server_seq, id`,
  );
  for (const row of duplicates) {
    const scopeMatch = scope.map((c, i) => ` AND ${c} = $${i + 3}`).join('');
    for (let n = 2; ; n += 1) {
      const suffix = ` (${n})`;
      const candidate = [...row.name].slice(0, maxLength - suffix.length).join('').trimEnd() + suffix;
      const taken: unknown[] = await q.query(
        `SELECT 1 FROM ${table} WHERE team_id = $1 AND deleted_at IS NULL AND ${key(column)} = ${key('$2::text')}${scopeMatch}`,
        [row.team_id, candidate, ...(scope.length ? row.scope : [])],
      );
      if (taken.length > 0) continue;
      // server_seq is left to the stamp_server_seq trigger: the rename gets the team's next number.
      await q.query(`UPDATE ${table} SET ${column} = $3, updated_at = now() WHERE team_id = $1 AND id = $2`, [row.team_id, row.id, candidate]);
      break;
    }
  }
}

export class SquadManagement1764740000000 implements MigrationInterface {
  name = 'SquadManagement1764740000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE skaters ADD COLUMN retired_at timestamptz NULL`);
    await q.query(`ALTER TABLE invitations ADD COLUMN revoked_at timestamptz NULL`);
    for (const spec of named) await renameDuplicates(q, spec);
    await q.query(`CREATE UNIQUE INDEX ux_skaters_team_name ON skaters (team_id, ${key('display_name')}) WHERE deleted_at IS NULL`);
    await q.query(`CREATE UNIQUE INDEX ux_skater_groups_team_name ON skater_groups (team_id, ${key('name')}) WHERE deleted_at IS NULL`);
    await q.query(`CREATE UNIQUE INDEX ux_cues_team_phase_label ON cues (team_id, phase, ${key('label')}) WHERE deleted_at IS NULL`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX ux_cues_team_phase_label`);
    await q.query(`DROP INDEX ux_skater_groups_team_name`);
    await q.query(`DROP INDEX ux_skaters_team_name`);
    await q.query(`ALTER TABLE invitations DROP COLUMN revoked_at`);
    await q.query(`ALTER TABLE skaters DROP COLUMN retired_at`);
  }
}
