/**
 * The cue library (the head coach's words on the chips): add, rename, archive, reorder. Every
 * change is a per-field edit in the outbox, so two coaches renaming and reordering at the same
 * time settle field by field on the server.
 */
import { v7 as uuidv7 } from 'uuid';
import { cueLabelSchema, type Phase } from '../../shared/cues';
import type { Cue } from '../../shared/schemas';
import type { SqlValue } from '../driver';
import { decodeRow, insertRecord, selectColumns } from '../fields';
import { queueEdit, stampRow } from '../outbox';
import { StoreError, validate, type StoreContext } from '../store-context';

type HeldCue = Cue & { teamId: string };

async function cueRow(ctx: StoreContext, id: string): Promise<HeldCue> {
  const [row] = await ctx.db.all<Record<string, SqlValue>>(`SELECT id, team_id, ${selectColumns('cues')} FROM cues WHERE id = ?`, [id]);
  if (!row) throw new StoreError('That cue no longer exists');
  return decodeRow<HeldCue>('cues', row);
}

/** One edit of a cue's fields, queued with the values it replaces. */
const cueChanged = (ctx: StoreContext, cue: HeldCue, userId: string, id: string, fields: Partial<Cue>, previous: Partial<Cue>) =>
  queueEdit(ctx, { teamId: cue.teamId, userId, table: 'cues', recordId: id, fields, previous });

export async function addCue(ctx: StoreContext, teamId: string, userId: string, phase: Phase, label: string): Promise<Cue> {
  const text = validate<string>(cueLabelSchema, label);
  return ctx.tx(async () => {
    const [{ next }] = await ctx.db.all<{ next: number }>(
      `SELECT coalesce(max(sort_order), 0) + 1 AS next FROM cues WHERE team_id = ? AND phase = ?`,
      [teamId, phase],
    );
    const cue: Cue = { id: uuidv7(), phase, label: text, sortOrder: next, archived: false };
    const { id: _id, ...fields } = cue;
    await insertRecord(ctx.db, 'cues', { id: cue.id, teamId }, fields);
    const fieldHlc = await ctx.enqueue({ teamId, userId, table: 'cues', recordId: cue.id, kind: 'upsert', fields, hlc: ctx.tick() });
    await stampRow(ctx.db, 'cues', cue.id, fieldHlc);
    return cue;
  });
}

export async function renameCue(ctx: StoreContext, id: string, userId: string, label: string): Promise<void> {
  const text = validate<string>(cueLabelSchema, label);
  await ctx.tx(async () => {
    const cue = await cueRow(ctx, id);
    if (cue.label === text) return;
    await cueChanged(ctx, cue, userId, id, { label: text }, { label: cue.label });
  });
}

export async function setCueArchived(ctx: StoreContext, id: string, userId: string, archived: boolean): Promise<void> {
  await ctx.tx(async () => {
    const cue = await cueRow(ctx, id);
    if (cue.archived === archived) return;
    await cueChanged(ctx, cue, userId, id, { archived }, { archived: cue.archived });
  });
}

/** Moves a cue one place up or down within its phase (swaps order with its neighbour). */
export async function moveCue(ctx: StoreContext, id: string, userId: string, direction: 'up' | 'down'): Promise<void> {
  await ctx.tx(async () => {
    const cue = await cueRow(ctx, id);
    const siblings = await ctx.db.all<{ id: string; sort_order: number }>(
      `SELECT id, sort_order FROM cues WHERE team_id = ? AND phase = ? AND archived = 0 ORDER BY sort_order, label`,
      [cue.teamId, cue.phase],
    );
    const index = siblings.findIndex((s) => s.id === id);
    const other = siblings[direction === 'up' ? index - 1 : index + 1];
    if (index < 0 || !other) return;
    // Renumber the phase densely so equal sort orders cannot make a swap a no-op.
    const order = siblings.map((s) => s.id);
    [order[index], order[order.indexOf(other.id)]] = [other.id, id];
    for (const [position, cueId] of order.entries()) {
      const sortOrder = position + 1;
      const before = siblings.find((s) => s.id === cueId)!.sort_order;
      if (before === sortOrder) continue;
      await cueChanged(ctx, cue, userId, cueId, { sortOrder }, { sortOrder: before });
    }
  });
}

/** The team's cue library in board order, archived cues included. */
export async function listCues(ctx: StoreContext, teamId: string): Promise<Cue[]> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(
    `SELECT id, ${selectColumns('cues')} FROM cues WHERE team_id = ? ORDER BY sort_order, label`,
    [teamId],
  );
  return rows.map((row) => decodeRow<Cue>('cues', row));
}
