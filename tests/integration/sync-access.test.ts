/**
 * Authorization matrix over push and pull (shared/SYNC.md proof 8): 0 rows leaked, 0 foreign
 * writes applied. Team A has a head coach, a coach, skater A (own account) and skater B (with a
 * guardian); team B's head coach must find nothing of team A.
 */
import request from 'supertest';
import { v7 as uuidv7 } from 'uuid';
import type { Op, PullReply } from '../../shared/schemas/sync';
import { expectError, startTestServer, type TestServer } from './helpers';
import {
  device,
  makeTeam,
  newObservation,
  pull,
  pullAll,
  push,
  pushOk,
  remove,
  upsert,
  userIdOf,
  type SyncTeam,
} from './sync-helpers';

let server: TestServer;
let a: SyncTeam;
let b: SyncTeam;
// Observations in team A: one per skater with a private note, one per skater with a shared note.
let privateA: Op;
let sharedA: Op;
let privateB: Op;
let sharedB: Op;
const PRIVATE_A = 'private about A: hips too high';
const PRIVATE_B = 'private about B: late on the crossover';

beforeAll(async () => {
  server = await startTestServer();
  [a, b] = await Promise.all([makeTeam(server.app, 'accA'), makeTeam(server.app, 'accB', { people: false })]);
  const dev = device(a.head);
  privateA = newObservation(a, dev, { skaterId: a.skaterA.id, note: PRIVATE_A });
  sharedA = newObservation(a, dev, { skaterId: a.skaterA.id, note: 'shared with A', noteShared: true });
  privateB = newObservation(a, dev, { skaterId: a.skaterB.id, note: PRIVATE_B });
  sharedB = newObservation(a, dev, { skaterId: a.skaterB.id, note: 'shared with B', noteShared: true });
  await pushOk(server.app, dev, a.teamId, [privateA, sharedA, privateB, sharedB]);
});
afterAll(async () => {
  await server.close();
});

const rowOf = async (id: string) =>
  (await server.dataSource.query(`SELECT * FROM observations WHERE team_id = $1 AND id = $2`, [a.teamId, id]))[0];

describe('push', () => {
  it('a coach of team B pushing into team A gets 404 and nothing is written', async () => {
    const dev = device(b.head);
    const op = newObservation(a, dev, { note: 'foreign' });
    expectError(await push(server.app, dev, a.teamId, [op]), 404, 'not_found');
    expect(await rowOf(op.recordId)).toBeUndefined();
    // Team B's own push naming team A's records cannot reach them either.
    const reply = await pushOk(server.app, dev, b.teamId, [upsert(dev, 'observations', privateA.recordId, { note: 'hijack' })]);
    expect(reply.results[0]).toMatchObject({ status: 'rejected', reason: 'unknown_record' });
    expect((await rowOf(privateA.recordId)).note).toBe(PRIVATE_A);
  });

  it('without a token push and pull are 401', async () => {
    expectError(await request(server.app).post('/api/sync/push').send({}), 401, 'unauthorized');
    expectError(await request(server.app).get('/api/sync/pull').query({ teamId: a.teamId }), 401, 'unauthorized');
  });

  it("a client id belongs to the first user who pushes with it: another user's use is 403", async () => {
    const dev = device(a.head);
    await pushOk(server.app, dev, a.teamId, [newObservation(a, dev)]);
    const stolen = { ...device(a.coach), clientId: dev.clientId };
    const op = newObservation(a, stolen);
    expectError(await push(server.app, stolen, a.teamId, [op]), 403, 'forbidden');
    expect(await rowOf(op.recordId)).toBeUndefined();
  });

  it('role matrix: who may change what', async () => {
    const head = device(a.head);
    const coach = device(a.coach);
    const skater = device(a.skaterAccount);
    const guardian = device(a.guardian);
    const cue = a.cueIds[1];
    const coachNote = newObservation(a, coach);
    const cases: { who: typeof head; op: Op; expected: 'applied' | 'permission' }[] = [
      { who: coach, op: coachNote, expected: 'applied' },
      // A coach changes their own notes; the head coach any; another coach's only the head coach.
      { who: coach, op: upsert(coach, 'observations', coachNote.recordId, { note: 'seen on the back straight' }), expected: 'applied' },
      { who: coach, op: upsert(coach, 'observations', sharedA.recordId, { mark: 'good' }), expected: 'permission' },
      { who: coach, op: remove(coach, 'observations', sharedA.recordId), expected: 'permission' },
      { who: head, op: upsert(head, 'observations', sharedA.recordId, { mark: 'good' }), expected: 'applied' },
      { who: head, op: upsert(head, 'observations', coachNote.recordId, { mark: 'good' }), expected: 'applied' },
      { who: head, op: remove(head, 'observations', coachNote.recordId), expected: 'applied' },
      { who: coach, op: upsert(coach, 'sessions', a.sessionId, { title: 'Intervals' }), expected: 'applied' },
      { who: coach, op: upsert(coach, 'cues', cue, { label: 'Coach renames' }), expected: 'permission' },
      { who: coach, op: upsert(coach, 'observations', sharedA.recordId, { acknowledgedAt: new Date().toISOString() }), expected: 'permission' },
      { who: head, op: upsert(head, 'cues', cue, { label: 'Head renames' }), expected: 'applied' },
      { who: head, op: upsert(head, 'cues', uuidv7(), { phase: 'curve', label: 'Look through the curve' }), expected: 'applied' },
      { who: skater, op: upsert(skater, 'observations', privateA.recordId, { mark: 'good' }), expected: 'permission' },
      { who: skater, op: upsert(skater, 'observations', privateA.recordId, { note: 'I disagree' }), expected: 'permission' },
      { who: skater, op: newObservation(a, skater, { skaterId: a.skaterA.id }), expected: 'permission' },
      { who: skater, op: remove(skater, 'observations', privateA.recordId), expected: 'permission' },
      { who: skater, op: upsert(skater, 'sessions', a.sessionId, { title: 'mine now' }), expected: 'permission' },
      { who: skater, op: upsert(skater, 'cues', cue, { label: 'Skater renames' }), expected: 'permission' },
      { who: skater, op: upsert(skater, 'observations', privateB.recordId, { acknowledgedAt: new Date().toISOString() }), expected: 'permission' },
      { who: skater, op: upsert(skater, 'observations', uuidv7(), { acknowledgedAt: new Date().toISOString() }), expected: 'permission' },
      { who: skater, op: upsert(skater, 'observations', privateA.recordId, { acknowledgedAt: new Date().toISOString() }), expected: 'applied' },
      { who: guardian, op: upsert(guardian, 'observations', privateA.recordId, { acknowledgedAt: new Date().toISOString() }), expected: 'permission' },
      // A guardian reads along but never acknowledges for the skater.
      { who: guardian, op: upsert(guardian, 'observations', sharedB.recordId, { acknowledgedAt: new Date().toISOString() }), expected: 'permission' },
      { who: guardian, op: upsert(guardian, 'observations', sharedB.recordId, { noteShared: false }), expected: 'permission' },
    ];
    const before = await server.dataSource.query(`SELECT id, mark, note, note_shared FROM observations WHERE team_id = $1 ORDER BY id`, [a.teamId]);
    for (const [index, c] of cases.entries()) {
      const reply = await pushOk(server.app, c.who, a.teamId, [c.op]);
      const outcome = reply.results[0].status === 'applied' ? 'applied' : reply.results[0].reason;
      expect({ index, outcome }).toEqual({ index, outcome: c.expected });
    }
    // No refused change reached a skater's observation: marks, notes and sharing are as before
    // except the head coach's edit of sharedA's mark.
    const after = await server.dataSource.query(`SELECT id, mark, note, note_shared FROM observations WHERE team_id = $1 ORDER BY id`, [a.teamId]);
    const changed = after.filter((row: { id: string }) => {
      const old = before.find((o: { id: string }) => o.id === row.id);
      return old && JSON.stringify(old) !== JSON.stringify(row);
    });
    expect(changed.map((r: { id: string }) => r.id)).toEqual([sharedA.recordId]);
    expect((await rowOf(privateA.recordId)).acknowledged_at).not.toBeNull();
    expect((await rowOf(sharedB.recordId)).acknowledged_at).toBeNull();
  });
});

describe('pull', () => {
  const everything = async (who: Parameters<typeof pullAll>[1]) => pullAll(server.app, who, a.teamId);
  const ids = (p: { changes: PullReply['changes'] }, table: string) => p.changes.filter((c) => c.table === table).map((c) => c.id);

  it('a coach of team B pulling team A gets 404', async () => {
    expectError(await pull(server.app, b.head, a.teamId), 404, 'not_found');
  });

  it("a skater gets only their own observations, never a private note's text, and only their own profile", async () => {
    const mine = await everything(a.skaterAccount);
    const own: { id: string }[] = await server.dataSource.query(
      `SELECT id FROM observations WHERE team_id = $1 AND skater_id = $2 AND deleted_at IS NULL`,
      [a.teamId, a.skaterA.id],
    );
    expect(own.map((r) => r.id)).toEqual(expect.arrayContaining([privateA.recordId, sharedA.recordId]));
    expect(ids(mine, 'observations').sort()).toEqual(own.map((r) => r.id).sort());
    const byId = Object.fromEntries(mine.changes.map((c) => [c.id, c.fields]));
    expect(byId[privateA.recordId]).toMatchObject({ note: '', noteShared: false, skaterId: a.skaterA.id });
    expect(byId[sharedA.recordId]).toMatchObject({ note: 'shared with A', noteShared: true });
    expect(ids(mine, 'skaters')).toEqual([a.skaterA.id]);
    expect(ids(mine, 'sessions')).toContain(a.sessionId);
    expect(ids(mine, 'cues').length).toBeGreaterThan(20);
    const text = JSON.stringify(mine.pages);
    for (const leak of [PRIVATE_A, PRIVATE_B, 'shared with B', privateB.recordId, sharedB.recordId, a.skaterB.id]) {
      expect(text).not.toContain(leak);
    }
  });

  it("a guardian gets their linked skater's observations, with the same rules", async () => {
    const theirs = await everything(a.guardian);
    const linked: { id: string }[] = await server.dataSource.query(
      `SELECT id FROM observations WHERE team_id = $1 AND skater_id = $2 AND deleted_at IS NULL`,
      [a.teamId, a.skaterB.id],
    );
    expect(linked.map((r) => r.id).sort()).toEqual([privateB.recordId, sharedB.recordId].sort());
    expect(ids(theirs, 'observations').sort()).toEqual(linked.map((r) => r.id).sort());
    expect(ids(theirs, 'skaters')).toEqual([a.skaterB.id]);
    const text = JSON.stringify(theirs.pages);
    for (const leak of [PRIVATE_A, PRIVATE_B, 'shared with A', privateA.recordId, a.skaterA.id]) expect(text).not.toContain(leak);
    expect(text).toContain('shared with B');
  });

  it("a deleted observation reaches only those who saw it: another skater's tombstone is not leaked", async () => {
    const head = device(a.head);
    const start = await everything(a.skaterAccount);
    const gone = newObservation(a, head, { skaterId: a.skaterB.id, note: 'about B, then removed' });
    await pushOk(server.app, head, a.teamId, [gone]);
    await pushOk(server.app, head, a.teamId, [remove(head, 'observations', gone.recordId)]);
    const since = await pullAll(server.app, a.skaterAccount, a.teamId, start.cursor);
    expect(JSON.stringify(since.pages)).not.toContain(gone.recordId);
    const guardianView = await everything(a.guardian);
    expect(guardianView.tombstones.map((t) => t.id)).toContain(gone.recordId);
  });

  it('coaches get the whole team, private notes included', async () => {
    for (const who of [a.head, a.coach]) {
      const all = await everything(who);
      expect(ids(all, 'observations')).toEqual(expect.arrayContaining([privateA, sharedA, privateB, sharedB].map((o) => o.recordId)));
      expect(ids(all, 'skaters').sort()).toEqual([a.skaterA.id, a.skaterB.id].sort());
      expect(JSON.stringify(all.pages)).toContain(PRIVATE_B);
    }
  });

  it('a query with unknown or bad parameters is a 400 naming the field', async () => {
    const res = await request(server.app).get('/api/sync/pull').query({ teamId: a.teamId, cursor: -1 }).set(a.head.auth);
    expectError(res, 400, 'validation');
    expect(JSON.stringify(res.body.error.fields)).toMatch(/cursor/);
    expectError(await request(server.app).get('/api/sync/pull').query({ teamId: 'nope' }).set(a.head.auth), 400, 'validation');
  });

  it('the created-by of a skater-side device is never trusted for access: user ids only come from the token', async () => {
    // A skater claiming to be the head coach in createdBy is still a skater.
    const skater = device(a.skaterAccount);
    const op = newObservation(a, skater, { createdBy: userIdOf(a.head) });
    const reply = await pushOk(server.app, skater, a.teamId, [op]);
    expect(reply.results[0]).toMatchObject({ status: 'rejected', reason: 'permission' });
  });
});
