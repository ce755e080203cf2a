/**
 * Tidy-up through push and pull (shared/sync-tables.ts, observations and sessions): a note moved
 * to another skater, session or cue keeps its id, author and createdAt; the refs are checked (a
 * skater of another team, a cue or session that is not live: rejected with a reason, never a
 * 500); a plain coach moves only their own notes; the old skater's next pull evicts the note and
 * the new skater's brings it, with the acknowledgement cleared; a merge (moves, focus cues, the
 * emptied session deleted) is applied whole, and a session still holding notes is not deleted.
 * Hostile session deletes: a day's board session (held or not yet), an id the server never held,
 * and another coach's session are refused with a reason, and leave no tombstone behind.
 */
import { v7 as uuidv7 } from 'uuid';
import type { PullReply, PushReply } from '../../shared/schemas/sync';
import { boardSessionIdFor } from '../../shared/sync-tables';
import { startTestServer, type TestServer } from './helpers';
import { device, makeTeam, newObservation, pull, pullAll, pushOk, remove, sessionCreate, upsert, userIdOf, type SyncTeam } from './sync-helpers';

let server: TestServer;
let team: SyncTeam;
let other: SyncTeam;

beforeAll(async () => {
  server = await startTestServer();
  [team, other] = await Promise.all([makeTeam(server.app, 'tidyA'), makeTeam(server.app, 'tidyB', { people: false })]);
});
afterAll(() => server.close());

const row = async (id: string) =>
  (
    await server.dataSource.query(
      `SELECT skater_id, session_id, cue_id, created_by, author_name, created_at, acknowledged_at, former_skater_ids, deleted_at
         FROM observations WHERE team_id = $1 AND id = $2`,
      [team.teamId, id],
    )
  )[0] as Record<string, unknown>;

const statuses = (reply: PushReply) => reply.results.map((r) => `${r.status}${r.reason ? `:${r.reason}` : ''}`);

/** A note by the plain coach on skater A, acknowledged by skater A. */
async function coachNoteOnA(text = 'Arms loose 🙂 — قوس أعمق') {
  const coachDev = device(team.coach);
  const op = newObservation(team, coachDev, { note: text, noteShared: true });
  expect(statuses(await pushOk(server.app, coachDev, team.teamId, [op]))).toEqual(['applied']);
  const skaterDev = device(team.skaterAccount);
  const ack = upsert(skaterDev, 'observations', op.recordId, { acknowledgedAt: new Date().toISOString() });
  expect(statuses(await pushOk(server.app, skaterDev, team.teamId, [ack]))).toEqual(['applied']);
  return { id: op.recordId, createdAt: op.fields.createdAt as string };
}

describe('moving a note to another skater', () => {
  it('keeps its author and createdAt, clears the acknowledgement, evicts it from the old skater and brings it to the new one', async () => {
    const note = await coachNoteOnA();
    const before = await row(note.id);
    expect(before.acknowledged_at).not.toBeNull();
    const skaterCursor = (await pullAll(server.app, team.skaterAccount, team.teamId)).cursor;
    const guardianCursor = (await pullAll(server.app, team.guardian, team.teamId)).cursor;
    expect((await pullAll(server.app, team.skaterAccount, team.teamId)).changes.some((c) => c.id === note.id)).toBe(true);

    const head = device(team.head);
    const reply = await pushOk(server.app, head, team.teamId, [upsert(head, 'observations', note.id, { skaterId: team.skaterB.id })]);
    expect(statuses(reply)).toEqual(['applied']);
    const after = await row(note.id);
    expect(after).toMatchObject({
      skater_id: team.skaterB.id,
      created_by: userIdOf(team.coach),
      author_name: before.author_name,
      acknowledged_at: null,
      former_skater_ids: [team.skaterA.id],
    });
    expect(new Date(after.created_at as string).toISOString()).toBe(new Date(note.createdAt).toISOString());

    // The old skater: an eviction, no change, from their cursor and from scratch alike.
    const since = await pull(server.app, team.skaterAccount, team.teamId, skaterCursor).expect(200);
    const page = since.body as PullReply;
    expect(page.evictions).toContainEqual({ table: 'observations', id: note.id });
    expect(page.changes.some((c) => c.id === note.id)).toBe(false);
    const fresh = await pullAll(server.app, team.skaterAccount, team.teamId);
    expect(fresh.changes.some((c) => c.id === note.id)).toBe(false);
    expect(fresh.pages.flatMap((p) => p.evictions)).toContainEqual({ table: 'observations', id: note.id });

    // The new skater's guardian: the note, on skater B, not acknowledged, with its shared text.
    const theirs = await pullAll(server.app, team.guardian, team.teamId, guardianCursor);
    const change = theirs.changes.find((c) => c.id === note.id);
    expect(change?.fields).toMatchObject({ skaterId: team.skaterB.id, acknowledgedAt: null, note: 'Arms loose 🙂 — قوس أعمق', createdBy: userIdOf(team.coach) });

    // Skater A can no longer acknowledge it; moving it back brings it back to A (and evicts it from B).
    const skaterDev = device(team.skaterAccount);
    const late = await pushOk(server.app, skaterDev, team.teamId, [upsert(skaterDev, 'observations', note.id, { acknowledgedAt: new Date().toISOString() })]);
    expect(statuses(late)).toEqual(['rejected:permission']);
    await pushOk(server.app, head, team.teamId, [upsert(head, 'observations', note.id, { skaterId: team.skaterA.id })]);
    const back = await pullAll(server.app, team.skaterAccount, team.teamId, since.body.nextCursor);
    expect(back.changes.find((c) => c.id === note.id)?.fields).toMatchObject({ skaterId: team.skaterA.id });
    const gone = await pullAll(server.app, team.guardian, team.teamId, theirs.cursor);
    expect(gone.pages.flatMap((p) => p.evictions)).toContainEqual({ table: 'observations', id: note.id });
    expect((await row(note.id)).former_skater_ids).toEqual([team.skaterA.id, team.skaterB.id]);
  });

  it('a plain coach moves their own note but not the head coach\'s (refused, nothing changes)', async () => {
    const head = device(team.head);
    const headNote = newObservation(team, head);
    await pushOk(server.app, head, team.teamId, [headNote]);
    const mine = await coachNoteOnA('mine');
    const coachDev = device(team.coach);
    const reply = await pushOk(server.app, coachDev, team.teamId, [
      upsert(coachDev, 'observations', headNote.recordId, { skaterId: team.skaterB.id }),
      upsert(coachDev, 'observations', mine.id, { skaterId: team.skaterB.id, cueId: team.cueIds[1] }),
    ]);
    expect(statuses(reply)).toEqual(['rejected:permission', 'applied']);
    expect(reply.results[0].message).toMatch(/Only its author or the head coach/);
    expect((await row(headNote.recordId)).skater_id).toBe(team.skaterA.id);
    expect(await row(mine.id)).toMatchObject({ skater_id: team.skaterB.id, cue_id: team.cueIds[1] });
  });

  it('refuses a skater of another team, an unknown cue and a deleted session with a reason (no 500), and the rest of the batch is applied', async () => {
    const note = await coachNoteOnA('refs');
    const head = device(team.head);
    const gone = uuidv7();
    await pushOk(server.app, head, team.teamId, [sessionCreate(head, gone, userIdOf(team.head), '2026-01-20'), remove(head, 'sessions', gone)]);
    const reply = await pushOk(server.app, head, team.teamId, [
      upsert(head, 'observations', note.id, { skaterId: other.skaterA.id }),
      upsert(head, 'observations', note.id, { cueId: uuidv7() }),
      upsert(head, 'observations', note.id, { sessionId: gone }),
      upsert(head, 'observations', note.id, { skaterId: 'not-a-uuid' }),
      upsert(head, 'observations', note.id, { mark: 'good' }),
    ]);
    expect(statuses(reply)).toEqual(['rejected:validation', 'rejected:validation', 'rejected:validation', 'rejected:validation', 'applied']);
    expect(reply.results[0].message).toMatch(/skaterId: no such skater in this team/);
    expect(reply.results[1].message).toMatch(/cueId: no such cue/);
    expect(reply.results[2].message).toMatch(/sessionId: no such session/);
    expect(await row(note.id)).toMatchObject({ skater_id: team.skaterA.id, session_id: team.sessionId, former_skater_ids: [] });
  });
});

describe('merging two sessions of one day', () => {
  it('moves the notes, unites the focus cues and deletes the emptied session in one batch; nothing lost, nothing doubled', async () => {
    const head = device(team.head);
    const coachDev = device(team.coach);
    const day = '2026-02-03';
    const near = uuidv7();
    const far = uuidv7();
    await pushOk(server.app, head, team.teamId, [
      { ...sessionCreate(head, near, userIdOf(team.head), day) },
      upsert(head, 'sessions', near, { focusCueIds: [team.cueIds[0]] }),
    ]);
    await pushOk(server.app, coachDev, team.teamId, [
      sessionCreate(coachDev, far, userIdOf(team.coach), day),
      upsert(coachDev, 'sessions', far, { focusCueIds: [team.cueIds[1], team.cueIds[0]] }),
    ]);
    const nearNote = newObservation(team, head, { sessionId: near });
    const farNotes = [newObservation(team, coachDev, { sessionId: far }), newObservation(team, coachDev, { sessionId: far, skaterId: team.skaterB.id })];
    await pushOk(server.app, head, team.teamId, [nearNote]);
    await pushOk(server.app, coachDev, team.teamId, farNotes);
    const cursor = (await pullAll(server.app, team.coach, team.teamId)).cursor;

    // A session deleted while it holds notes: refused (a merge into itself would be this).
    const early = await pushOk(server.app, head, team.teamId, [remove(head, 'sessions', far)]);
    expect(statuses(early)).toEqual(['rejected:validation']);
    expect(early.results[0].message).toMatch(/still holds 2 observations: move them first/);

    const merge = await pushOk(server.app, head, team.teamId, [
      ...farNotes.map((n) => upsert(head, 'observations', n.recordId, { sessionId: near })),
      upsert(head, 'sessions', near, { focusCueIds: [team.cueIds[0], team.cueIds[1]] }),
      remove(head, 'sessions', far),
    ]);
    expect(statuses(merge)).toEqual(['applied', 'applied', 'applied', 'applied']);

    const seen = await pullAll(server.app, team.coach, team.teamId, cursor);
    expect(seen.tombstones).toContainEqual(expect.objectContaining({ table: 'sessions', id: far }));
    const notes = await server.dataSource.query(
      `SELECT id, created_by FROM observations WHERE team_id = $1 AND session_id = $2 AND deleted_at IS NULL ORDER BY id`,
      [team.teamId, near],
    );
    expect(notes.map((n: { id: string }) => n.id)).toEqual([nearNote.recordId, ...farNotes.map((n) => n.recordId)].sort());
    expect(notes.filter((n: { created_by: string }) => n.created_by === userIdOf(team.coach))).toHaveLength(2);
    const [session] = await server.dataSource.query(`SELECT focus_cue_ids FROM sessions WHERE team_id = $1 AND id = $2`, [team.teamId, near]);
    expect(session.focus_cue_ids).toEqual([team.cueIds[0], team.cueIds[1]]);

    // A note another coach moved into the merged-away session meanwhile is refused with a reason.
    const late = await pushOk(server.app, coachDev, team.teamId, [upsert(coachDev, 'observations', farNotes[0].recordId, { sessionId: far })]);
    expect(statuses(late)).toEqual(['rejected:validation']);
  });

  it('two coaches moving the same note offline converge on the newer move, and the author stays', async () => {
    const note = await coachNoteOnA('contested');
    // Both tidy after the note was made, offline: the coach first, the head coach four seconds later.
    const coachDev = device(team.coach, () => Date.now() + 1_000);
    const head = device(team.head, () => Date.now() + 5_000);
    const older = upsert(coachDev, 'observations', note.id, { skaterId: team.skaterB.id, cueId: team.cueIds[2] });
    const newer = upsert(head, 'observations', note.id, { skaterId: team.skaterA.id, mark: 'good' });
    // The newer move arrives first; the older one loses skaterId but its cue (unchallenged) wins.
    await pushOk(server.app, head, team.teamId, [newer]);
    expect(statuses(await pushOk(server.app, coachDev, team.teamId, [older]))).toEqual(['applied']);
    expect(await row(note.id)).toMatchObject({ skater_id: team.skaterA.id, cue_id: team.cueIds[2], created_by: userIdOf(team.coach), former_skater_ids: [] });
  });
});

describe('session deletes a coach cannot use to block a day', () => {
  const tombstones = async (id: string) =>
    Number((await server.dataSource.query(`SELECT count(*) AS n FROM sync_tombstones WHERE team_id = $1 AND id = $2`, [team.teamId, id]))[0].n);
  const sessionRow = async (id: string) =>
    (await server.dataSource.query(`SELECT day, deleted_at FROM sessions WHERE team_id = $1 AND id = $2`, [team.teamId, id]))[0] as
      | { day: string; deleted_at: Date | null }
      | undefined;

  it('refuses a delete of a future day\'s board session the server never held; that day\'s board then works on every device', async () => {
    const day = '2026-03-02';
    const board = boardSessionIdFor(team.teamId, day);
    const coachDev = device(team.coach);
    const head = device(team.head);
    // Before the day, by a plain coach and by the head coach, alone and in a batch with a note.
    const early = await pushOk(server.app, coachDev, team.teamId, [remove(coachDev, 'sessions', board)]);
    expect(statuses(early)).toEqual(['rejected:validation']);
    expect(early.results[0].message).toMatch(/No such session on the server: only a session the server holds can be deleted/);
    const byHead = await pushOk(server.app, head, team.teamId, [remove(head, 'sessions', board), remove(head, 'sessions', uuidv7())]);
    expect(statuses(byHead)).toEqual(['rejected:validation', 'rejected:validation']);
    expect(await tombstones(board)).toBe(0);
    expect(await sessionRow(board)).toBeUndefined();

    // On the day: the head coach's device and the coach's device both write into the board session.
    const create = sessionCreate(head, board, userIdOf(team.head), day);
    const note = newObservation(team, coachDev, { sessionId: board });
    expect(statuses(await pushOk(server.app, head, team.teamId, [create]))).toEqual(['applied']);
    expect(statuses(await pushOk(server.app, coachDev, team.teamId, [sessionCreate(coachDev, board, userIdOf(team.coach), day), note]))).toEqual([
      'applied',
      'applied',
    ]);
    expect((await sessionRow(board))?.deleted_at).toBeNull();
    const pulled = await pullAll(server.app, team.coach, team.teamId);
    expect(pulled.changes.find((c) => c.id === note.recordId)?.fields).toMatchObject({ sessionId: board });
  });

  it('refuses a delete of a held board session, even an empty one by its author the head coach', async () => {
    const day = '2026-03-05';
    const board = boardSessionIdFor(team.teamId, day);
    const head = device(team.head);
    await pushOk(server.app, head, team.teamId, [sessionCreate(head, board, userIdOf(team.head), day)]);
    const reply = await pushOk(server.app, head, team.teamId, [remove(head, 'sessions', board)]);
    expect(statuses(reply)).toEqual(['rejected:validation']);
    expect(reply.results[0].message).toMatch(/board's session of its day .* it is never deleted/);
    expect((await sessionRow(board))?.deleted_at).toBeNull();
    // A new note on that day is still taken.
    expect(statuses(await pushOk(server.app, head, team.teamId, [newObservation(team, head, { sessionId: board })]))).toEqual(['applied']);
  });

  it('lets only the author or the head coach delete an emptied session that is not a board session', async () => {
    const head = device(team.head);
    const coachDev = device(team.coach);
    const [headSession, coachSession] = [uuidv7(), uuidv7()];
    await pushOk(server.app, head, team.teamId, [sessionCreate(head, headSession, userIdOf(team.head), '2026-03-07')]);
    await pushOk(server.app, coachDev, team.teamId, [sessionCreate(coachDev, coachSession, userIdOf(team.coach), '2026-03-07')]);
    const refused = await pushOk(server.app, coachDev, team.teamId, [remove(coachDev, 'sessions', headSession)]);
    expect(statuses(refused)).toEqual(['rejected:permission']);
    expect(refused.results[0].message).toBe('Only its author or the head coach may delete this session');
    expect((await sessionRow(headSession))?.deleted_at).toBeNull();
    expect(statuses(await pushOk(server.app, coachDev, team.teamId, [remove(coachDev, 'sessions', coachSession)]))).toEqual(['applied']);
    expect(statuses(await pushOk(server.app, head, team.teamId, [remove(head, 'sessions', headSession)]))).toEqual(['applied']);
    expect((await sessionRow(headSession))?.deleted_at).not.toBeNull();
    // Deleting it again answers the same, without a new tombstone.
    expect(statuses(await pushOk(server.app, coachDev, team.teamId, [remove(coachDev, 'sessions', headSession)]))).toEqual(['applied']);
  });
});
