/**
 * Tombstone retention (shared/SYNC.md, "Pull"): deleted records are kept TOMBSTONE_RETENTION_DAYS
 * so devices that were away learn of the delete. `purgeTombstones` removes older tombstones of a
 * team and raises the team's sync horizon to the highest server_seq it removed: a device whose
 * cursor is below it may have missed one of those deletes and gets 410 (resync from cursor 0).
 *
 * The purged ids of pushable tables (observations, sessions, cues, runs, crossings) stay remembered in
 * sync_tombstones - an id and a clock value, no content - which push reads for ids it has no row
 * for: a device that comes back after longer than any retention and sends again a create whose
 * op id has been trimmed from op_log finds the id deleted, and its create (or edit) is dropped
 * instead of bringing the record back. op_log has its own, longer retention (retention.ts, which
 * also runs this purge for every team on a schedule).
 *
 * Targets are never deleted (shared/sync-tables.ts `deletes: 'never'`): nothing to purge.
 * Skaters and groups have no delete path yet; their tombstones are purged the same way once an
 * unreferenced one exists (devices never create them, so they need no memory).
 */
import type { DataSource } from 'typeorm';
import { TOMBSTONE_RETENTION_DAYS } from '../../../shared/schemas/sync';

export const retentionCutoff = (now = Date.now()) => new Date(now - TOMBSTONE_RETENTION_DAYS * 86_400_000);

export async function purgeTombstones(
  dataSource: DataSource,
  teamId: string,
  olderThan: Date = retentionCutoff(),
): Promise<{ purged: number; horizon: number }> {
  return dataSource.transaction(async (tx) => {
    const [{ purged, max_seq }]: { purged: string; max_seq: string | null }[] = await tx.query(
      `WITH o AS (DELETE FROM observations WHERE team_id = $1 AND deleted_at < $2
                    RETURNING 'observations'::text AS tbl, id, server_seq, deleted_at, deleted_hlc),
            s AS (DELETE FROM sessions WHERE team_id = $1 AND deleted_at < $2
                    RETURNING 'sessions'::text AS tbl, id, server_seq, deleted_at, deleted_hlc),
            c AS (DELETE FROM cues WHERE team_id = $1 AND deleted_at < $2
                    RETURNING 'cues'::text AS tbl, id, server_seq, deleted_at, deleted_hlc),
            xs AS (DELETE FROM crossings WHERE team_id = $1 AND deleted_at < $2
                    RETURNING 'crossings'::text AS tbl, id, server_seq, deleted_at, deleted_hlc),
            -- A run goes once no crossing row points at it any more (a later pass, when its
            -- crossings' tombstones went in this one).
            rs AS (DELETE FROM runs t WHERE team_id = $1 AND deleted_at < $2
                    AND NOT EXISTS (SELECT 1 FROM crossings x WHERE x.team_id = t.team_id AND x.run_id = t.id)
                  RETURNING 'runs'::text AS tbl, id, server_seq, deleted_at, deleted_hlc),
            k AS (DELETE FROM skaters t WHERE team_id = $1 AND deleted_at < $2
                    AND NOT EXISTS (SELECT 1 FROM observations x WHERE x.team_id = t.team_id AND x.skater_id = t.id)
                    AND NOT EXISTS (SELECT 1 FROM runs x WHERE x.team_id = t.team_id AND x.skater_id = t.id)
                    AND NOT EXISTS (SELECT 1 FROM targets x WHERE x.team_id = t.team_id AND x.skater_id = t.id)
                    AND NOT EXISTS (SELECT 1 FROM memberships x WHERE x.team_id = t.team_id AND x.skater_id = t.id)
                    AND NOT EXISTS (SELECT 1 FROM invitations x WHERE x.team_id = t.team_id AND x.skater_id = t.id)
                  RETURNING server_seq),
            g AS (DELETE FROM skater_groups t WHERE team_id = $1 AND deleted_at < $2
                    AND NOT EXISTS (SELECT 1 FROM skaters x WHERE x.team_id = t.team_id AND x.group_id = t.id)
                  RETURNING server_seq),
            pushable AS (SELECT * FROM o UNION ALL SELECT * FROM s UNION ALL SELECT * FROM c UNION ALL SELECT * FROM xs UNION ALL SELECT * FROM rs),
            remembered AS (
              INSERT INTO sync_tombstones (team_id, tbl, id, deleted_at, deleted_hlc)
              SELECT $1, tbl, id, deleted_at,
                     -- a delete from before clock values were kept: its moment as a clock value
                     coalesce(deleted_hlc, lpad((extract(epoch FROM deleted_at) * 1000)::bigint::text, 15, '0') || '-000000-purge')
                FROM pushable
              ON CONFLICT DO NOTHING),
            gone AS (SELECT server_seq FROM pushable UNION ALL SELECT server_seq FROM k UNION ALL SELECT server_seq FROM g)
       SELECT count(*) AS purged, max(server_seq) AS max_seq FROM gone`,
      [teamId, olderThan],
    );
    if (Number(purged) === 0) {
      // Nothing purged: the horizon stays where it is (no write for a scheduled pass that finds nothing).
      const [row]: { horizon_seq: string }[] = await tx.query(`SELECT horizon_seq FROM team_sync_horizons WHERE team_id = $1`, [teamId]);
      return { purged: 0, horizon: Number(row?.horizon_seq ?? 0) };
    }
    const [{ horizon_seq }]: { horizon_seq: string }[] = await tx.query(
      `INSERT INTO team_sync_horizons (team_id, horizon_seq, purged_at) VALUES ($1, $2, now())
       ON CONFLICT (team_id) DO UPDATE
         SET horizon_seq = GREATEST(team_sync_horizons.horizon_seq, excluded.horizon_seq), purged_at = now()
       RETURNING horizon_seq`,
      [teamId, max_seq ?? 0],
    );
    return { purged: Number(purged), horizon: Number(horizon_seq) };
  });
}
