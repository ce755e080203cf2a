/**
 * The squad the head coach manages: skater profiles (add, rename, move to a group, retire and
 * bring back), groups (add, rename) and members (remove). Every statement is bounded by the team.
 *
 * Profiles and groups sync to devices: each write stamps the row with the team's next server_seq
 * in its own transaction (services/sync/counter.ts). Taking that number first also takes the
 * team counter's row lock, so two writes to one team's squad run one after the other: the
 * duplicate-name check that follows sees the other's committed name and answers 409. The unique
 * indexes (migration 1764740000000) stay the last word: a unique violation that gets past the
 * check anyway is answered with the same 409, never a 500.
 */
import type { DataSource, EntityManager } from 'typeorm';
import { v7 as uuidv7 } from 'uuid';
import { duplicateGroupMessage, duplicateSkaterMessage } from '../../shared/names';
import type { Group, GroupCreateInput, GroupUpdateInput, Skater as SkaterDto, SkaterCreateInput, SkaterUpdateInput } from '../../shared/schemas';
import { conflict, notFound } from '../lib/errors';
import { revokeAllForUser } from './sessions';
import { nextSeqs } from './sync/counter';

/** The key names are unique by: the same expression as the unique indexes (and shared/names.ts nameKey). */
const nameKey = (sql: string) => `lower(normalize(${sql}, NFC) COLLATE "und-x-icu")`;

interface SkaterRow {
  id: string;
  display_name: string;
  group_id: string | null;
  user_id: string | null;
  retired_at: Date | null;
}

export const skaterDtoOf = (row: SkaterRow): SkaterDto => ({
  id: row.id,
  displayName: row.display_name,
  groupId: row.group_id,
  hasAccount: row.user_id !== null,
  retired: row.retired_at !== null,
});

interface GroupRow {
  id: string;
  name: string;
  sort_order: number;
}

const groupDtoOf = (row: GroupRow): Group => ({ id: row.id, name: row.name, sortOrder: row.sort_order });

/** The constraint a PostgreSQL unique violation names, or undefined for any other error. */
function uniqueViolation(error: unknown): string | undefined {
  const e = error as { code?: unknown; constraint?: unknown; driverError?: { code?: unknown; constraint?: unknown } };
  const code = e?.driverError?.code ?? e?.code;
  const constraint = e?.driverError?.constraint ?? e?.constraint;
  return code === '23505' && typeof constraint === 'string' ? constraint : undefined;
}

const skaterColumns = 'id, display_name, group_id, user_id, retired_at';

/** The 409 for a skater name another profile of the team has (live or retired). */
async function refuseTakenSkaterName(db: DataSource | EntityManager, teamId: string, displayName: string, exceptId: string | null) {
  const [taken]: { display_name: string; retired: boolean }[] = await db.query(
    `SELECT display_name, retired_at IS NOT NULL AS retired FROM skaters
      WHERE team_id = $1 AND deleted_at IS NULL AND ${nameKey('display_name')} = ${nameKey('$2::text')}
        AND ($3::uuid IS NULL OR id <> $3::uuid)
      LIMIT 1`,
    [teamId, displayName, exceptId],
  );
  if (!taken) return;
  const { message, field } = duplicateSkaterMessage({ displayName: taken.display_name, retired: taken.retired });
  throw conflict(message, { displayName: field });
}

async function refuseTakenGroupName(db: DataSource | EntityManager, teamId: string, name: string, exceptId: string | null) {
  const [taken]: { name: string }[] = await db.query(
    `SELECT name FROM skater_groups
      WHERE team_id = $1 AND deleted_at IS NULL AND ${nameKey('name')} = ${nameKey('$2::text')}
        AND ($3::uuid IS NULL OR id <> $3::uuid)
      LIMIT 1`,
    [teamId, name, exceptId],
  );
  if (!taken) return;
  const { message, field } = duplicateGroupMessage(taken);
  throw conflict(message, { name: field });
}

async function requireGroup(db: EntityManager, teamId: string, groupId: string) {
  const found: unknown[] = await db.query(`SELECT 1 FROM skater_groups WHERE team_id = $1 AND id = $2 AND deleted_at IS NULL`, [teamId, groupId]);
  if (found.length === 0) throw notFound('No such group in this team');
}

/**
 * Runs a squad write; a unique violation that slipped past the checks (a race the counter lock did
 * not order, or a row written outside these routes) becomes the 409 the check would have given.
 */
async function squadWrite<T>(
  dataSource: DataSource,
  teamId: string,
  name: { skater?: string; group?: string; exceptId: string | null },
  work: (tx: EntityManager) => Promise<T>,
): Promise<T> {
  try {
    return await dataSource.transaction(work);
  } catch (error) {
    const constraint = uniqueViolation(error);
    if (!constraint) throw error;
    if (constraint === 'ux_skaters_team_name' && name.skater !== undefined) await refuseTakenSkaterName(dataSource, teamId, name.skater, name.exceptId);
    if (constraint === 'ux_skater_groups_team_name' && name.group !== undefined) await refuseTakenGroupName(dataSource, teamId, name.group, name.exceptId);
    if (constraint === 'pk_skaters') throw conflict('A skater with this id exists already');
    if (constraint === 'pk_skater_groups') throw conflict('A group with this id exists already');
    throw conflict('This name is taken in this team: pick another one');
  }
}

export function createSkater(dataSource: DataSource, teamId: string, input: SkaterCreateInput): Promise<SkaterDto> {
  const id = input.id ?? uuidv7();
  return squadWrite(dataSource, teamId, { skater: input.displayName, exceptId: null }, async (tx) => {
    // The counter first: its lock orders this after any other squad write of the team.
    const serverSeq = await nextSeqs(tx, teamId, 1);
    if (input.groupId) await requireGroup(tx, teamId, input.groupId);
    const known: unknown[] = await tx.query(`SELECT 1 FROM skaters WHERE team_id = $1 AND id = $2`, [teamId, id]);
    if (known.length > 0) throw conflict('A skater with this id exists already');
    await refuseTakenSkaterName(tx, teamId, input.displayName, null);
    const [row]: SkaterRow[] = await tx.query(
      `INSERT INTO skaters (team_id, id, display_name, group_id, user_id, server_seq) VALUES ($1, $2, $3, $4, NULL, $5)
       RETURNING ${skaterColumns}`,
      [teamId, id, input.displayName, input.groupId ?? null, serverSeq],
    );
    return skaterDtoOf(row);
  });
}

/** Rename, move (groupId null: no group) and retire or bring back, in any combination. */
export function updateSkater(dataSource: DataSource, teamId: string, skaterId: string, input: SkaterUpdateInput): Promise<SkaterDto> {
  return squadWrite(dataSource, teamId, { skater: input.displayName, exceptId: skaterId }, async (tx) => {
    const serverSeq = await nextSeqs(tx, teamId, 1);
    const [current]: SkaterRow[] = await tx.query(
      `SELECT ${skaterColumns} FROM skaters WHERE team_id = $1 AND id = $2 AND deleted_at IS NULL FOR UPDATE`,
      [teamId, skaterId],
    );
    if (!current) throw notFound('No such skater in this team');
    if (input.groupId) await requireGroup(tx, teamId, input.groupId);
    if (input.displayName !== undefined) await refuseTakenSkaterName(tx, teamId, input.displayName, skaterId);
    // Re-stamped even when a field keeps its value: every device then holds what this answer says.
    // (An UPDATE answers [rows, count] through TypeORM.)
    const [[row]]: [SkaterRow[], number] = await tx.query(
      `UPDATE skaters
          SET display_name = coalesce($3, display_name),
              group_id = CASE WHEN $4::boolean THEN $5::uuid ELSE group_id END,
              retired_at = CASE WHEN $6::boolean IS NULL THEN retired_at WHEN $6::boolean THEN coalesce(retired_at, now()) END,
              updated_at = now(),
              server_seq = $7
        WHERE team_id = $1 AND id = $2
        RETURNING ${skaterColumns}`,
      [teamId, skaterId, input.displayName ?? null, input.groupId !== undefined, input.groupId ?? null, input.retired ?? null, serverSeq],
    );
    return skaterDtoOf(row);
  });
}

/** A new group, sorted after the team's last one. */
export function createGroup(dataSource: DataSource, teamId: string, input: GroupCreateInput): Promise<Group> {
  const id = input.id ?? uuidv7();
  return squadWrite(dataSource, teamId, { group: input.name, exceptId: null }, async (tx) => {
    const serverSeq = await nextSeqs(tx, teamId, 1);
    const known: unknown[] = await tx.query(`SELECT 1 FROM skater_groups WHERE team_id = $1 AND id = $2`, [teamId, id]);
    if (known.length > 0) throw conflict('A group with this id exists already');
    await refuseTakenGroupName(tx, teamId, input.name, null);
    const [row]: GroupRow[] = await tx.query(
      `INSERT INTO skater_groups (team_id, id, name, sort_order, server_seq)
       SELECT $1, $2, $3, coalesce(max(sort_order), 0) + 1, $4 FROM skater_groups WHERE team_id = $1 AND deleted_at IS NULL
       RETURNING id, name, sort_order`,
      [teamId, id, input.name, serverSeq],
    );
    return groupDtoOf(row);
  });
}

export function renameGroup(dataSource: DataSource, teamId: string, groupId: string, input: GroupUpdateInput): Promise<Group> {
  return squadWrite(dataSource, teamId, { group: input.name, exceptId: groupId }, async (tx) => {
    const serverSeq = await nextSeqs(tx, teamId, 1);
    await refuseTakenGroupName(tx, teamId, input.name, groupId);
    const [[row]]: [GroupRow[], number] = await tx.query(
      `UPDATE skater_groups SET name = $3, updated_at = now(), server_seq = $4
        WHERE team_id = $1 AND id = $2 AND deleted_at IS NULL
        RETURNING id, name, sort_order`,
      [teamId, groupId, input.name, serverSeq],
    );
    if (!row) throw notFound('No such group in this team');
    return groupDtoOf(row);
  });
}

/**
 * Removes a member from the team. Their every sign-in ends at once (all devices: an access token
 * names no team, so this is the only way to end this team's access now), and a skater's profile
 * is unlinked from their account (it keeps every note and can be invited again).
 */
export async function removeMember(dataSource: DataSource, teamId: string, callerId: string, userId: string): Promise<void> {
  if (userId === callerId) {
    throw conflict('You cannot remove yourself from the team: the team needs its head coach');
  }
  await dataSource.transaction(async (tx) => {
    const [member]: { role: string; skater_id: string | null }[] = await tx.query(
      `SELECT role, skater_id FROM memberships WHERE team_id = $1 AND user_id = $2 FOR UPDATE`,
      [teamId, userId],
    );
    if (!member) throw notFound('No such member in this team');
    if (member.role === 'head_coach') throw conflict('A head coach cannot be removed from the team');
    await tx.query(`DELETE FROM memberships WHERE team_id = $1 AND user_id = $2`, [teamId, userId]);
    // The profile stays with its notes; without the account it can be invited again (hasAccount
    // changes, so it gets a new server_seq and every device pulls it).
    const linked: unknown[] = await tx.query(`SELECT 1 FROM skaters WHERE team_id = $1 AND user_id = $2`, [teamId, userId]);
    if (linked.length > 0) {
      const serverSeq = await nextSeqs(tx, teamId, 1);
      await tx.query(`UPDATE skaters SET user_id = NULL, updated_at = now(), server_seq = $3 WHERE team_id = $1 AND user_id = $2`, [
        teamId,
        userId,
        serverSeq,
      ]);
    }
    await revokeAllForUser(tx, userId);
  });
}

