/**
 * Who wrote a note and who may change it, against the real server: the author's name comes from
 * the account (never from the device) and reaches the coaches and the skater; a coach changes or
 * deletes only their own notes and the head coach any; only the skater acknowledges (a guardian
 * reads); the head coach sets whether boards notes are shared by default.
 */
import request from 'supertest';
import { expectError, startTestServer, type TestServer } from './helpers';
import { device, latest, makeTeam, newObservation, pullAll, pushOk, remove, upsert, type SyncTeam } from './sync-helpers';

let server: TestServer;
let team: SyncTeam;

beforeAll(async () => {
  server = await startTestServer();
  team = await makeTeam(server.app, 'authors');
});

afterAll(async () => {
  await server.close();
});

const rowOf = async (id: string) =>
  ((await server.dataSource.query(`SELECT mark, note, author_name, created_by, deleted_at, acknowledged_at FROM observations WHERE team_id = $1 AND id = $2`, [team.teamId, id])) as Record<string, unknown>[])[0];

const nameOf = async (userId: string) =>
  ((await server.dataSource.query(`SELECT display_name FROM users WHERE id = $1`, [userId])) as { display_name: string }[])[0].display_name;

describe('the author of a note', () => {
  it("is the signed-in coach's name, whatever the device sends, and the skater pulls it", async () => {
    const coach = device(team.coach);
    const note = newObservation(team, coach, { skaterId: team.skaterA.id, note: 'hands quiet', noteShared: true });
    note.fields.authorName = 'Head Coach Himself';
    note.hlc.authorName = note.hlc.mark;
    const reply = await pushOk(server.app, coach, team.teamId, [note]);
    expect(reply.results[0].status).toBe('applied');
    const coachName = await nameOf(team.coach.session.user.id);
    expect(await rowOf(note.recordId)).toMatchObject({ author_name: coachName });

    const seen = latest(await pullAll(server.app, team.skaterAccount, team.teamId)).get(`observations:${note.recordId}`);
    expect(seen).toMatchObject({ authorName: coachName });
  });
});

describe('who may change a note', () => {
  it("another coach can neither edit nor delete the head coach's note; the head coach changes the coach's", async () => {
    const head = device(team.head);
    const coach = device(team.coach);
    const headNote = newObservation(team, head, { note: 'from the head coach' });
    const coachNote = newObservation(team, coach, { note: 'from the coach' });
    await pushOk(server.app, head, team.teamId, [headNote]);
    await pushOk(server.app, coach, team.teamId, [coachNote]);

    const refused = await pushOk(server.app, coach, team.teamId, [
      upsert(coach, 'observations', headNote.recordId, { note: 'overwritten', mark: 'good' }),
      remove(coach, 'observations', headNote.recordId),
    ]);
    expect(refused.results.map((r) => [r.status, r.reason])).toEqual([
      ['rejected', 'permission'],
      ['rejected', 'permission'],
    ]);
    expect(await rowOf(headNote.recordId)).toMatchObject({ note: 'from the head coach', mark: 'needs_work', deleted_at: null });

    const own = await pushOk(server.app, coach, team.teamId, [upsert(coach, 'observations', coachNote.recordId, { note: 'from the coach, fixed' })]);
    expect(own.results[0].status).toBe('applied');
    const byHead = await pushOk(server.app, head, team.teamId, [
      upsert(head, 'observations', coachNote.recordId, { mark: 'good' }),
      remove(head, 'observations', coachNote.recordId),
    ]);
    expect(byHead.results.map((r) => r.status)).toEqual(['applied', 'applied']);
    expect(await rowOf(coachNote.recordId)).toMatchObject({ note: 'from the coach, fixed', mark: 'good', deleted_at: expect.any(Date) });
  });
});

describe('"got it"', () => {
  it('is refused from the guardian and taken from the skater', async () => {
    const head = device(team.head);
    const forB = newObservation(team, head, { skaterId: team.skaterB.id, note: 'arms low', noteShared: true });
    await pushOk(server.app, head, team.teamId, [forB]);
    const guardian = device(team.guardian);
    const at = new Date().toISOString();
    const reply = await pushOk(server.app, guardian, team.teamId, [upsert(guardian, 'observations', forB.recordId, { acknowledgedAt: at })]);
    expect(reply.results[0]).toMatchObject({ status: 'rejected', reason: 'permission' });
    expect((await rowOf(forB.recordId)).acknowledged_at).toBeNull();

    const forA = newObservation(team, head, { skaterId: team.skaterA.id });
    await pushOk(server.app, head, team.teamId, [forA]);
    const skater = device(team.skaterAccount);
    const mine = await pushOk(server.app, skater, team.teamId, [upsert(skater, 'observations', forA.recordId, { acknowledgedAt: at })]);
    expect(mine.results[0].status).toBe('applied');
  });
});

describe("the team's default for sharing boards notes", () => {
  const settings = (teamId: string) => `/api/teams/${teamId}/settings`;

  it('starts as coaches only; the head coach changes it, a coach reads it, a coach or skater cannot change it', async () => {
    const fresh = await makeTeam(server.app, 'share', { people: true });
    const read = await request(server.app).get(settings(fresh.teamId)).set(fresh.coach.auth).expect(200);
    expect(read.body).toEqual({ shareBoardNotes: false, timeZone: 'UTC' });

    expectError(await request(server.app).patch(settings(fresh.teamId)).set(fresh.coach.auth).send({ shareBoardNotes: true }), 403);
    expectError(await request(server.app).get(settings(fresh.teamId)).set(fresh.skaterAccount.auth), 403);
    expectError(await request(server.app).patch(settings(fresh.teamId)).set(fresh.head.auth).send({ shareBoardNotes: 'yes' }), 400, 'validation');
    expectError(await request(server.app).patch(settings(fresh.teamId)).set(fresh.head.auth).send({ colour: 'red' }), 400, 'validation');
    // Another team's head coach finds nothing.
    expectError(await request(server.app).patch(settings(fresh.teamId)).set(team.head.auth).send({ shareBoardNotes: true }), 404);

    const changed = await request(server.app).patch(settings(fresh.teamId)).set(fresh.head.auth).send({ shareBoardNotes: true }).expect(200);
    expect(changed.body).toEqual({ shareBoardNotes: true, timeZone: 'UTC' });
    expect((await request(server.app).get(settings(fresh.teamId)).set(fresh.coach.auth).expect(200)).body).toEqual({ shareBoardNotes: true, timeZone: 'UTC' });
    // One team's choice stays its own.
    expect((await request(server.app).get(settings(team.teamId)).set(team.head.auth).expect(200)).body).toEqual({ shareBoardNotes: false, timeZone: 'UTC' });
  });
});
