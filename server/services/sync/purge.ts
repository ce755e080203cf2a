/**
 * Tombstone retention (shared/SYNC.md, "Pull"): deleted records are kept TOMBSTONE_RETENTION_DAYS
 * so devices that were away learn of the delete. `purgeTombstones` removes older tombstones of a
 * team and raises the team's sync horizon to the highest server_seq it removed: a device whose
 * cursor is below it may have missed one of those deletes and gets 410 (resync from cursor 0).
 * op_log is left alone: dropping an op id would let a very late retry of a create bring back a
 * record whose tombstone is gone (op_log needs its own, longer retention).
 *
 * Skaters and groups have no delete path yet; their tombstones are purged the same way once an
 * unreferenced one exists.
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
      `WITH o AS (DELETE FROM observations WHERE team_id = $1 AND deleted_at < $2 RETURNING server_seq),
            s AS (DELETE FROM sessions WHERE team_id = $1 AND deleted_at < $2 RETURNING server_seq),
            c AS (DELETE FROM cues WHERE team_id = $1 AND deleted_at < $2 RETURNING server_seq),
            k AS (DELETE FROM skaters t WHERE team_id = $1 AND deleted_at < $2
                    AND NOT EXISTS (SELECT 1 FROM observations x WHERE x.team_id = t.team_id AND x.skater_id = t.id)
                    AND NOT EXISTS (SELECT 1 FROM memberships x WHERE x.team_id = t.team_id AND x.skater_id = t.id)
                    AND NOT EXISTS (SELECT 1 FROM invitations x WHERE x.team_id = t.team_id AND x.skater_id = t.id)
                  RETURNING server_seq),
            g AS (DELETE FROM skater_groups t WHERE team_id = $1 AND deleted_at < $2
                    AND NOT EXISTS (SELECT 1 FROM skaters x WHERE x.team_id = t.team_id AND x.group_id = t.id)
                  RETURNING server_seq),
            gone AS (SELECT server_seq FROM o UNION ALL SELECT server_seq FROM s UNION ALL SELECT server_seq FROM c
                     UNION ALL SELECT server_seq FROM k UNION ALL SELECT server_seq FROM g)
       SELECT count(*) AS purged, max(server_seq) AS max_seq FROM gone`,
      [teamId, olderThan],
    );
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
