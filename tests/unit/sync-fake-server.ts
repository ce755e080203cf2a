/**
 * A tiny in-memory sync server for the device-side sync tests: keeps records with a clock per
 * field (newest wins), an op log answering `duplicate` by op id, tombstones (delete wins), and one
 * increasing server_seq per team. Requests or replies can be dropped on demand, and a cursor
 * below `retainedFrom` answers 410.
 */
import { v7 as uuidv7 } from 'uuid';
import { HybridClock } from '../../shared/hlc';
import type { Cue } from '../../shared/schemas';
import { DeviceStore } from '../../sync/store';
import { openMemoryDriver } from './support/sqljs-driver';
import type { OpResult, PullReply, PullTable, PushBody, PushReply } from '../../shared/schemas/sync';
import { ResyncRequired, TransportError, type PullQuery, type SyncTransport } from '../../sync/transport';

type StoredRecord = { table: PullTable; id: string; teamId: string; fields: Record<string, unknown>; hlc: Record<string, string>; serverSeq: number };
type StoredTombstone = { table: PullTable; id: string; teamId: string; serverSeq: number };

/** Fields a record needs before it exists (an edit to an unknown record is refused). */
const REQUIRED: Record<string, string> = { observations: 'createdAt', sessions: 'createdAt', cues: 'phase', runs: 'createdAt', crossings: 'createdAt', targets: 'targetMs' };

export class FakeSyncServer {
  readonly records = new Map<string, StoredRecord>();
  readonly tombstones = new Map<string, StoredTombstone>();
  readonly opLog = new Map<string, OpResult>();
  private seq = 0;
  private readonly clock = new HybridClock('server', () => this.time);
  time = Date.UTC(2026, 11, 2, 9, 0, 0);
  /** Ops applied (not duplicates): each op id at most once. */
  readonly appliedOps: string[] = [];
  pushCalls = 0;
  pullCalls = 0;
  /** Cursors below this answer 410 (tombstones older than retention are gone). */
  retainedFrom = 0;

  // Failure switches: each is consulted per request.
  dropPushRequest: () => boolean = () => false;
  dropPushReply: () => boolean = () => false;
  dropPull: () => boolean = () => false;
  /** Refuse an op for a reason (permission, validation...), or return null to accept it. */
  judge: (op: PushBody['ops'][number]) => OpResult['reason'] | null = () => null;

  nextSeq(): number {
    this.seq += 1 + (this.seq % 3 === 0 ? 1 : 0); // gaps, like a real counter may have
    return this.seq;
  }

  /** Writes a record directly (another device, or the server itself). */
  put(teamId: string, table: PullTable, id: string, fields: Record<string, unknown>): void {
    const key = `${table}/${id}`;
    const existing = this.records.get(key);
    this.records.set(key, { table, id, teamId, fields: { ...existing?.fields, ...fields }, hlc: existing?.hlc ?? {}, serverSeq: this.nextSeq() });
  }

  remove(teamId: string, table: PullTable, id: string): void {
    const key = `${table}/${id}`;
    this.records.delete(key);
    this.tombstones.set(key, { table, id, teamId, serverSeq: this.nextSeq() });
  }

  private applyOp(teamId: string, op: PushBody['ops'][number]): OpResult {
    const reason = this.judge(op);
    if (reason) return { opId: op.opId, status: 'rejected', reason, message: `refused: ${reason}` };
    const key = `${op.table}/${op.recordId}`;
    for (const value of Object.values(op.hlc)) this.clock.receive(value);
    if (this.tombstones.has(key)) return { opId: op.opId, status: 'applied' }; // delete wins
    const existing = this.records.get(key);
    if (op.kind === 'delete') {
      this.records.delete(key);
      this.tombstones.set(key, { table: op.table, id: op.recordId, teamId, serverSeq: this.nextSeq() });
      return { opId: op.opId, status: 'applied' };
    }
    if (!existing && !(REQUIRED[op.table] in op.fields)) {
      return { opId: op.opId, status: 'rejected', reason: 'unknown_record', message: 'No such record' };
    }
    const record = existing ?? { table: op.table, id: op.recordId, teamId, fields: {}, hlc: {}, serverSeq: 0 };
    for (const [field, value] of Object.entries(op.fields)) {
      const clock = op.hlc[field];
      if (record.hlc[field] && clock <= record.hlc[field]) continue;
      record.fields[field] = value;
      record.hlc[field] = clock;
    }
    record.serverSeq = this.nextSeq();
    this.records.set(key, record);
    this.appliedOps.push(op.opId);
    return { opId: op.opId, status: 'applied' };
  }

  readonly transport: SyncTransport = {
    push: async (body: PushBody): Promise<PushReply> => {
      this.pushCalls += 1;
      await Promise.resolve();
      if (this.dropPushRequest()) throw new TransportError('request lost');
      const results = body.ops.map((op) => {
        const stored = this.opLog.get(op.opId);
        if (stored) return { ...stored, status: 'duplicate' as const };
        const result = this.applyOp(body.teamId, op);
        this.opLog.set(op.opId, result);
        return result;
      });
      if (this.dropPushReply()) throw new TransportError('reply lost');
      return { results, serverClock: this.clock.now(), serverTime: new Date(this.time).toISOString() };
    },
    pull: async ({ teamId, cursor, limit }: PullQuery): Promise<PullReply> => {
      this.pullCalls += 1;
      await Promise.resolve();
      if (this.dropPull()) throw new TransportError('pull lost');
      if (cursor < this.retainedFrom) throw new ResyncRequired();
      const events = [
        ...[...this.records.values()].map((r) => ({ kind: 'change' as const, r })),
        ...[...this.tombstones.values()].map((r) => ({ kind: 'tombstone' as const, r })),
      ]
        .filter((e) => e.r.teamId === teamId && e.r.serverSeq > cursor)
        .sort((a, b) => a.r.serverSeq - b.r.serverSeq);
      const page = events.slice(0, limit);
      return {
        changes: page.filter((e) => e.kind === 'change').map(({ r }) => ({ table: r.table, id: r.id, serverSeq: r.serverSeq, fields: { ...(r as StoredRecord).fields } })),
        tombstones: page.filter((e) => e.kind === 'tombstone').map(({ r }) => ({ table: r.table, id: r.id, serverSeq: r.serverSeq })),
        evictions: [],
        nextCursor: page.length > 0 ? page[page.length - 1].r.serverSeq : cursor,
        hasMore: events.length > page.length,
        remaining: events.length - page.length,
        serverClock: this.clock.now(),
        serverTime: new Date(this.time).toISOString(),
      };
    },
  };

  /** Live records of a table: id -> fields. */
  table(table: PullTable): Map<string, Record<string, unknown>> {
    return new Map([...this.records.values()].filter((r) => r.table === table).map((r) => [r.id, r.fields]));
  }
}

// ---- devices ----------------------------------------------------------------------------------


export const TEAM = '0193a000-0000-7000-8000-00000000aaaa';
export const OTHER_TEAM = '0193a000-0000-7000-8000-00000000bbbb';
export const COACH = '0193a000-0000-7000-8000-00000000c0c0';
export const SKATERS = ['0193a000-0000-7000-8000-000000000001', '0193a000-0000-7000-8000-000000000002', '0193a000-0000-7000-8000-000000000003'];
export const CUES: Cue[] = [
  { id: '0193a000-0000-7000-8000-0000000c0e01', phase: 'curve', label: 'Lean in from the ankle', sortOrder: 1, archived: false },
  { id: '0193a000-0000-7000-8000-0000000c0e02', phase: 'start', label: 'Low first strides', sortOrder: 1, archived: false },
];

/** Puts the team's squad and cue library on the server, as the server-side setup would. */
export function seedServer(server: FakeSyncServer): void {
  for (const [i, id] of SKATERS.entries()) server.put(TEAM, 'skaters', id, { displayName: `Skater ${i}`, groupId: null, hasAccount: false });
  for (const cue of CUES) server.put(TEAM, 'cues', cue.id, { phase: cue.phase, label: cue.label, sortOrder: cue.sortOrder, archived: cue.archived });
}

export async function openDevice(now: () => number = () => Date.UTC(2026, 11, 2, 9, 0, 0)) {
  const driver = await openMemoryDriver();
  const store = await DeviceStore.open(driver, { now });
  await store.loadTeam(TEAM, {
    groups: [],
    skaters: SKATERS.map((id, i) => ({ id, displayName: `Skater ${i}`, groupId: null, hasAccount: false, retired: false })),
    cues: CUES,
  });
  const session = await store.startSession(TEAM, COACH);
  const tap = (skaterIds: readonly string[] = [SKATERS[0]], mark: 'good' | 'needs_work' = 'good', note = '') =>
    store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds, cueId: CUES[0].id, mark, note });
  return { driver, store, session, tap };
}

/** The device's live observations: id -> the fields the server keeps. */
export async function deviceObservations(driver: Awaited<ReturnType<typeof openMemoryDriver>>) {
  const rows = await driver.all<{ id: string; mark: string; note: string; note_shared: number; skater_id: string }>(
    `SELECT id, mark, note, note_shared, skater_id FROM observations WHERE deleted = 0 ORDER BY id`,
  );
  return new Map(rows.map((r) => [r.id, { mark: r.mark, note: r.note, noteShared: r.note_shared === 1, skaterId: r.skater_id }]));
}

export const newId = () => uuidv7();
