/**
 * Targets on the device (shared/sync-tables.ts `targets`): a skater's target time for a distance
 * on a track, with its pace plan (even pace with an optional opener, or section shares).
 *
 * The id is derived from team, skater, track and distance (targetIdFor), so a coach who sets a
 * target offline and another who sets the same one elsewhere write ONE record: the server merges
 * their fields by their clocks. Setting a target the device holds is an edit of the fields that
 * changed (the plan's three fields always travel together, so the server checks a whole plan);
 * setting one it does not hold is a create carrying every field. Targets are never deleted.
 */
import type { Role } from '../../shared/schemas';
import { targetIdFor, targetInputSchema, type Target, type TargetInput } from '../../shared/schemas/clock';
import { tableSpec } from '../../shared/sync-tables';
import type { SqlValue } from '../driver';
import { decodeRow, insertRecord, selectColumns } from '../fields';
import { queueEdit } from '../outbox';
import { StoreError, validate, type StoreContext } from '../store-context';

const SELECT = `SELECT id, team_id, ${selectColumns('targets')} FROM targets`;

export async function getTarget(ctx: StoreContext, id: string): Promise<Target | null> {
  const [row] = await ctx.db.all<Record<string, SqlValue>>(`${SELECT} WHERE id = ?`, [id]);
  return row ? decodeRow<Target>('targets', row) : null;
}

const PLAN_FIELDS = ['plan', 'openerMs', 'sharesPct'] as const;
const same = (a: unknown, b: unknown) => JSON.stringify(a ?? null) === JSON.stringify(b ?? null);

/** Sets a skater's target for a distance (coaches only). Resolves to the target as stored here. */
export async function setTarget(
  ctx: StoreContext,
  input: TargetInput & { teamId: string; userId: string; role?: Role },
): Promise<Target> {
  if (input.role === 'skater' || input.role === 'guardian') throw new StoreError('Only a coach sets targets');
  const { teamId, userId, role: _role, ...raw } = input;
  const value = validate<TargetInput>(targetInputSchema, raw);
  const id = targetIdFor(teamId, value.skaterId, value.track, value.distanceM);
  const wanted: Omit<Target, 'id' | 'teamId'> = {
    skaterId: value.skaterId,
    distanceM: value.distanceM,
    track: value.track,
    targetMs: value.targetMs,
    plan: value.plan,
    openerMs: value.openerMs ?? null,
    sharesPct: value.sharesPct ?? null,
    note: value.note ?? '',
    updatedBy: userId,
  };
  const problem = tableSpec('targets').check?.(wanted, { id, teamId });
  if (problem) throw new StoreError(problem);
  ctx.assertWriter(userId);
  return ctx.tx(async () => {
    const held = await getTarget(ctx, id);
    if (!held) {
      const fields: Record<string, unknown> = { ...wanted };
      const hlc = ctx.tick();
      await insertRecord(ctx.db, 'targets', { id, teamId }, fields, Object.fromEntries(Object.keys(fields).map((f) => [f, hlc])));
      await ctx.enqueue({ teamId, userId, table: 'targets', recordId: id, kind: 'upsert', fields, hlc });
      return (await getTarget(ctx, id))!;
    }
    const fields: Record<string, unknown> = {};
    if (wanted.targetMs !== held.targetMs) fields.targetMs = wanted.targetMs;
    if (PLAN_FIELDS.some((f) => !same(wanted[f], held[f]))) for (const f of PLAN_FIELDS) fields[f] = wanted[f];
    // The note is kept unless the coach gave one.
    if (value.note !== undefined && value.note !== held.note) fields.note = value.note;
    if (Object.keys(fields).length === 0) return held;
    fields.updatedBy = userId;
    await queueEdit(ctx, {
      teamId, userId, table: 'targets', recordId: id, fields,
      previous: Object.fromEntries(Object.keys(fields).map((f) => [f, held[f as keyof Target]])),
    });
    return (await getTarget(ctx, id))!;
  });
}

/** The team's targets on this device, by skater, track and distance. */
export async function listTargets(ctx: StoreContext, teamId: string): Promise<Target[]> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(`${SELECT} WHERE team_id = ? ORDER BY skater_id, track, distance_m`, [teamId]);
  return rows.map((row) => decodeRow<Target>('targets', row));
}
