/**
 * Helpers for the sync integration tests (tests/integration/sync-*.test.ts): a team with every
 * role, devices that make ops the way sync/store.ts does (one HLC per changed field, a delete's
 * under "deleted"), push and pull through the real app, and draining a pull to the end.
 */
import request from 'supertest';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';
import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import { HybridClock } from '../../shared/hlc';
import type { Op, PullReply, PushReply, PushTable } from '../../shared/schemas/sync';
import type { Skater } from '../../shared/schemas';
import { addSkater, inviteAndAccept, signUpCoach, type Account, type Coach } from './helpers';

export interface SyncTeam {
  teamId: string;
  head: Coach;
  coach: Account;
  skaterA: Skater;
  skaterB: Skater;
  /** Signs in as skater A. */
  skaterAccount: Account;
  /** Guardian of skater B. */
  guardian: Account;
  cueIds: string[];
  sessionId: string;
}

export interface Device {
  clientId: string;
  clock: HybridClock;
  account: Account;
}

/** A device of `account` whose physical clock is `now()` (real time unless pinned). */
export const device = (account: Account, now: () => number = Date.now): Device => {
  const clientId = uuidv4();
  return { clientId, clock: new HybridClock(clientId, now), account };
};

export const userIdOf = (account: Account) => account.session.user.id;

export async function cueIdsOf(app: Express, coach: Coach): Promise<string[]> {
  const res = await request(app).get(`/api/teams/${coach.teamId}/cues`).set(coach.auth).expect(200);
  return (res.body as { id: string }[]).map((c) => c.id);
}

/** A team with a head coach, a coach, skater A (with an account) and skater B (with a guardian), and a session. */
export async function makeTeam(app: Express, label: string, options: { people?: boolean } = {}): Promise<SyncTeam> {
  const head = await signUpCoach(app, `${label}head`);
  const teamId = head.teamId;
  const skaterA = await addSkater(app, head, 'Wietske Rondbaan');
  const skaterB = await addSkater(app, head, 'Hidde Vlakijs');
  const people = options.people ?? true;
  const coach = people ? await inviteAndAccept(app, head, 'coach', { label: `${label}coach` }) : head;
  const skaterAccount = people ? await inviteAndAccept(app, head, 'skater', { skaterId: skaterA.id, label: `${label}skater` }) : head;
  const guardian = people ? await inviteAndAccept(app, head, 'guardian', { skaterId: skaterB.id, label: `${label}guardian` }) : head;
  const cueIds = await cueIdsOf(app, head);
  const sessionId = uuidv7();
  const setup = device(head);
  await push(app, setup, teamId, [sessionCreate(setup, sessionId, userIdOf(head))]).expect(200);
  return { teamId, head, coach, skaterA, skaterB, skaterAccount, guardian, cueIds, sessionId };
}

// ---- ops, as the device store makes them ------------------------------------------------------

export function upsert(dev: Device, table: PushTable, recordId: string, fields: Record<string, unknown>, hlc = dev.clock.now()): Op {
  return { opId: uuidv7(), table, recordId, kind: 'upsert', fields, hlc: Object.fromEntries(Object.keys(fields).map((f) => [f, hlc])) };
}

export function remove(dev: Device, table: PushTable, recordId: string, hlc = dev.clock.now()): Op {
  return { opId: uuidv7(), table, recordId, kind: 'delete', fields: {}, hlc: { deleted: hlc } };
}

export function sessionCreate(dev: Device, id: string, createdBy: string, day = '2026-01-15'): Op {
  return upsert(dev, 'sessions', id, { day, rink: 'Oval', title: '', focusCueIds: [], createdAt: new Date().toISOString(), createdBy });
}

export interface ObservationInput {
  id?: string;
  sessionId: string;
  skaterId: string;
  cueId: string;
  mark?: 'good' | 'needs_work';
  note?: string;
  noteShared?: boolean;
  createdBy: string;
}

export function observationCreate(dev: Device, input: ObservationInput): Op {
  return upsert(dev, 'observations', input.id ?? uuidv7(), {
    sessionId: input.sessionId,
    skaterId: input.skaterId,
    cueId: input.cueId,
    mark: input.mark ?? 'needs_work',
    note: input.note ?? '',
    noteShared: input.noteShared ?? false,
    createdAt: new Date().toISOString(),
    createdBy: input.createdBy,
  });
}

export const newObservation = (team: SyncTeam, dev: Device, extra: Partial<ObservationInput> = {}) =>
  observationCreate(dev, {
    sessionId: team.sessionId,
    skaterId: team.skaterA.id,
    cueId: team.cueIds[0],
    createdBy: userIdOf(dev.account),
    ...extra,
  });

// ---- push and pull ----------------------------------------------------------------------------

export const push = (app: Express, dev: Device, teamId: string, ops: Op[]) =>
  request(app).post('/api/sync/push').set(dev.account.auth).send({ clientId: dev.clientId, teamId, ops });

/** Pushes and returns the reply, folding the server clock into the device's as the contract asks. */
export async function pushOk(app: Express, dev: Device, teamId: string, ops: Op[]): Promise<PushReply> {
  const res = await push(app, dev, teamId, ops);
  if (res.status !== 200) throw new Error(`push answered ${res.status}: ${JSON.stringify(res.body)}`);
  const reply = res.body as PushReply;
  dev.clock.receive(reply.serverClock);
  return reply;
}

export const pull = (app: Express, account: Account, teamId: string, cursor = 0, limit?: number) =>
  request(app)
    .get('/api/sync/pull')
    .query({ teamId, cursor, ...(limit ? { limit } : {}) })
    .set(account.auth);

export interface Drained {
  pages: PullReply[];
  changes: PullReply['changes'];
  tombstones: PullReply['tombstones'];
  cursor: number;
}

/** Pulls pages until hasMore is false. */
export async function pullAll(app: Express, account: Account, teamId: string, cursor = 0, limit?: number): Promise<Drained> {
  const out: Drained = { pages: [], changes: [], tombstones: [], cursor };
  for (let guard = 0; guard < 10_000; guard++) {
    const res = await pull(app, account, teamId, out.cursor, limit);
    if (res.status !== 200) throw new Error(`pull answered ${res.status}: ${JSON.stringify(res.body)}`);
    const page = res.body as PullReply;
    out.pages.push(page);
    out.changes.push(...page.changes);
    out.tombstones.push(...page.tombstones);
    out.cursor = page.nextCursor;
    if (!page.hasMore) return out;
  }
  throw new Error('pull never ended');
}

/** The latest state per record from a drained pull: live fields, or 'deleted'. */
export function latest(drained: Drained): Map<string, Record<string, unknown> | 'deleted'> {
  const rows = [
    ...drained.changes.map((c) => ({ key: `${c.table}:${c.id}`, seq: c.serverSeq, value: c.fields })),
    ...drained.tombstones.map((t) => ({ key: `${t.table}:${t.id}`, seq: t.serverSeq, value: 'deleted' as const })),
  ].sort((a, b) => a.seq - b.seq);
  const map = new Map<string, Record<string, unknown> | 'deleted'>();
  for (const row of rows) map.set(row.key, row.value);
  return map;
}

/** `rows` observations for `team` in bulk, numbered from the team counter in one transaction like any writer. */
export async function seedObservations(dataSource: DataSource, team: SyncTeam, rows: number): Promise<void> {
  await dataSource.transaction(async (tx) => {
    const [counter] = await tx.query(`UPDATE team_counters SET seq = seq + $2 WHERE team_id = $1 RETURNING seq`, [team.teamId, rows]);
    const first = Number(counter[0].seq) - rows + 1;
    await tx.query(
      `INSERT INTO observations (team_id, id, session_id, skater_id, cue_id, mark, note, created_at, created_by, server_seq)
       SELECT $1, gen_random_uuid(), $2, $3, $4, CASE WHEN g % 2 = 0 THEN 'good' ELSE 'needs_work' END, 'seeded ' || g,
              now(), $5, $6::bigint + g
         FROM generate_series(0, $7::int - 1) AS g`,
      [team.teamId, team.sessionId, team.skaterA.id, team.cueIds[0], team.head.session.user.id, first, rows],
    );
  });
}
