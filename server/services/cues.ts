/** The team's cue library on the server: the default set for a new team, and reading it. */
import type { DataSource, EntityManager } from 'typeorm';
import { v7 as uuidv7 } from 'uuid';
import { defaultCueList } from '../../shared/cues';
import type { Cue } from '../../shared/schemas';
import { nextSeqs } from './sync/counter';

/**
 * Gives a new team the default library (one multi-row insert), numbered from the team's sync
 * counter so a first pull finds it. Run it inside the transaction that creates the team.
 */
export async function insertDefaultCues(db: DataSource | EntityManager, teamId: string, ids?: string[]) {
  const list = defaultCueList;
  const first = await nextSeqs(db, teamId, list.length);
  await db.query(
    `INSERT INTO cues (team_id, id, phase, label, sort_order, server_seq)
     SELECT $1, id, phase, label, sort_order, $6::bigint + ord - 1
       FROM unnest($2::uuid[], $3::text[], $4::text[], $5::int[]) WITH ORDINALITY AS c(id, phase, label, sort_order, ord)`,
    [
      teamId,
      list.map((_, index) => ids?.[index] ?? uuidv7()),
      list.map((c) => c.phase),
      list.map((c) => c.label),
      list.map((c) => c.sortOrder),
      first,
    ],
  );
}

export async function listCues(db: DataSource, teamId: string): Promise<Cue[]> {
  const rows: { id: string; phase: Cue['phase']; label: string; sort_order: number; archived: boolean }[] =
    await db.query(
      `SELECT id, phase, label, sort_order, archived FROM cues WHERE team_id = $1 AND deleted_at IS NULL ORDER BY phase, sort_order, label`,
      [teamId],
    );
  return rows.map((r) => ({
    id: r.id,
    phase: r.phase,
    label: r.label,
    sortOrder: r.sort_order,
    archived: r.archived,
  }));
}
