/**
 * The review's counts against the real PostgreSQL (issue #10 §1): notes pushed through sync at
 * chosen instants, then the skater matrix (needs work and good apart, every week of the range
 * even empty, rows by phase then cue order, totals, trend), a group's sum over its live skaters
 * ('all', 'none', a group; a retired skater left out), the one-week view, a cell's notes with
 * their coaches' names, deleted notes never counted, another team's notes never seen, and bad
 * query strings answered 400 with a message.
 */
import request from 'supertest';
import type { ReviewCell, ReviewMatrix, ReviewWeek } from '../../shared/schemas/review';
import { addSkater, expectError, signUpCoach, startTestServer, type Coach, type TestServer } from './helpers';
import { cueOf, deleteNotes, makeReviewTeam, pushNotes, review, type NoteAt, type ReviewTeam } from './review-helpers';
import { pushOk, upsert } from './sync-helpers';

let server: TestServer;
let team: ReviewTeam;
let other: ReviewTeam;
let groupId: string;
let skaterC: { id: string };
let skaterD: { id: string };
let start: string;
let curve: string;
let deletedId: string;

const at = (day: string, time = '10:00') => `${day}T${time}:00.000Z`;
const range = { from: '2026-W40', to: '2026-W47' };
const weeks = ['2026-W40', '2026-W41', '2026-W42', '2026-W43', '2026-W44', '2026-W45', '2026-W46', '2026-W47'];

beforeAll(async () => {
  server = await startTestServer();
  team = await makeReviewTeam(server.app, server.dataSource, 'revcount');
  other = await makeReviewTeam(server.app, server.dataSource, 'revcountother', { people: false });
  start = cueOf(team, 'start').id;
  curve = cueOf(team, 'curve').id;
  const { app } = server;
  const head = team.head;
  const group = await request(app).post(`/api/teams/${team.teamId}/groups`).set(head.auth).send({ name: 'Sprinters' }).expect(201);
  groupId = group.body.id;
  await request(app).patch(`/api/teams/${team.teamId}/skaters/${team.skaterA.id}`).set(head.auth).send({ groupId }).expect(200);
  skaterC = await addSkater(app, head as Coach, 'Anouk Zijwind');
  skaterD = await addSkater(app, head as Coach, 'Jelle Binnenbocht');
  await request(app).patch(`/api/teams/${team.teamId}/skaters/${skaterD.id}`).set(head.auth).send({ groupId }).expect(200);

  const A = team.skaterA.id;
  const nw = 'needs_work' as const;
  const notes: NoteAt[] = [
    // Skater A, start cue: W40 3 needs work + 1 good (and one more needs work, deleted below).
    { skaterId: A, cueId: start, mark: nw, createdAt: at('2026-09-28', '09:00'), note: 'Sits up in the set', noteShared: true },
    { skaterId: A, cueId: start, mark: nw, createdAt: at('2026-09-30', '09:00'), note: 'Weight on the heels' },
    { skaterId: A, cueId: start, mark: nw, createdAt: at('2026-10-04', '23:59') },
    { skaterId: A, cueId: start, mark: 'good', createdAt: at('2026-10-02', '18:00'), note: 'Better' },
    { skaterId: A, cueId: start, mark: nw, createdAt: at('2026-10-06') },
    { skaterId: A, cueId: start, mark: nw, createdAt: at('2026-11-03') },
    { skaterId: A, cueId: start, mark: 'good', createdAt: at('2026-11-04') },
    { skaterId: A, cueId: start, mark: 'good', createdAt: at('2026-11-05') },
    { skaterId: A, cueId: start, mark: 'good', createdAt: at('2026-11-10') },
    // Skater A, curve cue: W43 2 good only.
    { skaterId: A, cueId: curve, mark: 'good', createdAt: at('2026-10-19') },
    { skaterId: A, cueId: curve, mark: 'good', createdAt: at('2026-10-25', '23:00') },
    // Skater B (no group): W40 2 needs work. Retired-to-be D (in the group): W40 5 needs work.
    { skaterId: team.skaterB.id, cueId: start, mark: nw, createdAt: at('2026-09-29') },
    { skaterId: team.skaterB.id, cueId: start, mark: nw, createdAt: at('2026-10-01') },
    ...Array.from({ length: 5 }, (_, i) => ({ skaterId: skaterD.id, cueId: start, mark: nw, createdAt: at('2026-09-29', `1${i}:00`) })),
    // Outside the range: the Sunday before W40 and the Monday after W47.
    { skaterId: A, cueId: start, mark: nw, createdAt: at('2026-09-27', '23:59') },
    { skaterId: A, cueId: start, mark: nw, createdAt: at('2026-11-23', '00:00') },
  ];
  await pushNotes(app, team, team.headDevice, notes);
  // Skater C (no group) by the second coach: W40 1 good.
  await pushNotes(app, team, team.coachDevice, [{ skaterId: skaterC.id, cueId: start, mark: 'good', createdAt: at('2026-10-03'), note: 'Quiet at ready' }]);
  [deletedId] = await pushNotes(app, team, team.headDevice, [{ skaterId: A, cueId: start, mark: nw, createdAt: at('2026-09-29', '07:00'), note: 'mis-tap' }]);
  await deleteNotes(app, team, team.headDevice, [deletedId]);
  await request(app).patch(`/api/teams/${team.teamId}/skaters/${skaterD.id}`).set(head.auth).send({ retired: true }).expect(200);
  // The curve cue is archived since: its history stays in the review, flagged.
  await pushOk(app, team.headDevice, team.teamId, [upsert(team.headDevice, 'cues', curve, { archived: true })]);

  // Another team, same weeks, its own skater: never in this team's counts.
  await pushNotes(app, other, other.headDevice, [
    { skaterId: other.skaterA.id, cueId: cueOf(other, 'start').id, mark: nw, createdAt: at('2026-09-29') },
    { skaterId: other.skaterA.id, cueId: cueOf(other, 'start').id, mark: 'good', createdAt: at('2026-09-30') },
  ]);
});

afterAll(() => server.close());

const skaterAStart = [
  { week: '2026-W40', needsWork: 3, good: 1 },
  { week: '2026-W41', needsWork: 1, good: 0 },
  { week: '2026-W45', needsWork: 1, good: 2 },
  { week: '2026-W46', needsWork: 0, good: 1 },
];

describe('one skater by ISO week', () => {
  it('counts needs work and good apart, lists every week, orders rows by phase, and adds the trend', async () => {
    const res = await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/weeks`, range).expect(200);
    const body = res.body as ReviewMatrix;
    expect(body.timeZone).toBe('UTC');
    expect(body.weeks).toEqual(weeks);
    expect(body.rows.map((r) => r.cueId)).toEqual([start, curve]);
    expect(body.rows[0]).toEqual({
      cueId: start,
      phase: 'start',
      label: cueOf(team, 'start').label,
      archived: false,
      counts: skaterAStart,
      totalNeedsWork: 5,
      totalGood: 4,
      // 4 of 5 marks needed work in W40-W43, 1 of 4 in W44-W47.
      trend: 'fewer',
    });
    expect(body.rows[1]).toMatchObject({ phase: 'curve', archived: true, counts: [{ week: '2026-W43', needsWork: 0, good: 2 }], totalGood: 2, trend: 'not enough data' });
  });

  it('the counts agree with the notes in the database (deleted ones left out)', async () => {
    const [row] = await server.dataSource.query(
      `SELECT count(*) FILTER (WHERE mark = 'needs_work')::int AS nw, count(*) FILTER (WHERE mark = 'good')::int AS good,
              count(*) FILTER (WHERE deleted_at IS NOT NULL)::int AS deleted
         FROM observations WHERE team_id = $1 AND skater_id = $2 AND cue_id = $3
          AND created_at >= '2026-09-28T00:00:00Z' AND created_at < '2026-11-23T00:00:00Z'`,
      [team.teamId, team.skaterA.id, start],
    );
    expect(row).toEqual({ nw: 6, good: 4, deleted: 1 });
    const res = await review(server.app, team.coach, team.teamId, `skaters/${team.skaterA.id}/weeks`, range).expect(200);
    expect((res.body as ReviewMatrix).rows[0].totalNeedsWork).toBe(row.nw - row.deleted);
  });

  it('defaults to the last 8 weeks ending with this week, and fills one missing end with 8 weeks', async () => {
    const { defaultWeekRange, weeksBetween, addIsoWeeks } = await import('../../shared/weeks');
    const expected = defaultWeekRange('UTC');
    const res = await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/weeks`).expect(200);
    expect(res.body.weeks).toEqual(weeksBetween(expected.from, expected.to));
    expect(res.body.weeks).toHaveLength(8);
    const fromOnly = await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/weeks`, { from: '2026-W50' }).expect(200);
    expect(fromOnly.body.weeks).toEqual(weeksBetween('2026-W50', addIsoWeeks('2026-W50', 7)));
    expect(fromOnly.body.weeks).toContain('2026-W53');
    const toOnly = await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/weeks`, { to: '2026-W47' }).expect(200);
    expect(toOnly.body).toMatchObject({ from: '2026-W40', to: '2026-W47', weeks });
  });

  it('a retired skater keeps their own matrix', async () => {
    const res = await review(server.app, team.head, team.teamId, `skaters/${skaterD.id}/weeks`, range).expect(200);
    expect(res.body.rows).toEqual([expect.objectContaining({ cueId: start, counts: [{ week: '2026-W40', needsWork: 5, good: 0 }] })]);
  });

  it('a range of 104 weeks is accepted and a skater without notes has empty rows', async () => {
    const res = await review(server.app, team.head, team.teamId, `skaters/${team.skaterB.id}/weeks`, { from: '2025-W01', to: '2026-W52' }).expect(200);
    expect(res.body.weeks).toHaveLength(104);
    const empty = await review(server.app, team.head, team.teamId, `skaters/${team.skaterB.id}/weeks`, { from: '2026-W41', to: '2026-W42' }).expect(200);
    expect(empty.body).toMatchObject({ weeks: ['2026-W41', '2026-W42'], rows: [] });
  });
});

describe('a group by ISO week', () => {
  it("'all' sums the team's live skaters (the retired one left out)", async () => {
    const res = await review(server.app, team.head, team.teamId, 'groups/all/weeks', range).expect(200);
    const body = res.body as ReviewMatrix;
    expect(body.weeks).toEqual(weeks);
    expect(body.rows.map((r) => r.cueId)).toEqual([start, curve]);
    expect(body.rows[0].counts).toEqual([{ week: '2026-W40', needsWork: 5, good: 2 }, ...skaterAStart.slice(1)]);
    expect(body.rows[0]).toMatchObject({ totalNeedsWork: 7, totalGood: 5 });
  });

  it('a group sums its own live skaters; none sums those in no group', async () => {
    const group = await review(server.app, team.coach, team.teamId, `groups/${groupId}/weeks`, range).expect(200);
    const skater = await review(server.app, team.coach, team.teamId, `skaters/${team.skaterA.id}/weeks`, range).expect(200);
    expect(group.body.rows).toEqual(skater.body.rows);
    const none = await review(server.app, team.coach, team.teamId, 'groups/none/weeks', range).expect(200);
    expect(none.body.rows).toEqual([expect.objectContaining({ cueId: start, counts: [{ week: '2026-W40', needsWork: 2, good: 1 }], totalNeedsWork: 2, totalGood: 1 })]);
  });

  it("another team's group is not found", async () => {
    const otherGroup = await request(server.app).post(`/api/teams/${other.teamId}/groups`).set(other.head.auth).send({ name: 'Elsewhere' }).expect(201);
    expectError(await review(server.app, team.head, team.teamId, `groups/${otherGroup.body.id}/weeks`, range), 404);
    expectError(await review(server.app, team.head, team.teamId, 'groups/everyone/weeks', range), 404);
  });
});

describe('one week: skaters x cues', () => {
  it('lists the live skaters by name, the cues marked that week, and the non-empty cells', async () => {
    const res = await review(server.app, team.head, team.teamId, 'week/2026-W40').expect(200);
    const body = res.body as ReviewWeek;
    expect(body.week).toBe('2026-W40');
    expect(body.skaters).toEqual([
      { id: skaterC.id, displayName: 'Anouk Zijwind' },
      { id: team.skaterB.id, displayName: 'Hidde Vlakijs' },
      { id: team.skaterA.id, displayName: 'Wietske Rondbaan' },
    ]);
    expect(body.cues).toEqual([{ cueId: start, phase: 'start', label: cueOf(team, 'start').label, archived: false }]);
    expect(body.cells).toEqual([
      { skaterId: skaterC.id, cueId: start, needsWork: 0, good: 1 },
      { skaterId: team.skaterB.id, cueId: start, needsWork: 2, good: 0 },
      { skaterId: team.skaterA.id, cueId: start, needsWork: 3, good: 1 },
    ]);
  });

  it('a group and an empty week', async () => {
    const group = await review(server.app, team.head, team.teamId, 'week/2026-W40', { groupId }).expect(200);
    expect(group.body.skaters).toEqual([{ id: team.skaterA.id, displayName: 'Wietske Rondbaan' }]);
    expect(group.body.cells).toEqual([{ skaterId: team.skaterA.id, cueId: start, needsWork: 3, good: 1 }]);
    const empty = await review(server.app, team.head, team.teamId, 'week/2026-W44', { groupId: 'none' }).expect(200);
    expect(empty.body).toMatchObject({ week: '2026-W44', cues: [], cells: [] });
    expect(empty.body.skaters.map((s: { id: string }) => s.id)).toEqual([skaterC.id, team.skaterB.id]);
  });
});

describe('the notes behind a cell', () => {
  it('newest first, with day, coach name, mark, text, sharing and session; the deleted one left out', async () => {
    const res = await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/cells`, { cueId: start, week: '2026-W40' }).expect(200);
    const body = res.body as ReviewCell;
    expect(body.notes.map((n) => [n.createdAt, n.day, n.mark, n.note, n.noteShared])).toEqual([
      ['2026-10-04T23:59:00.000Z', '2026-10-04', 'needs_work', '', false],
      ['2026-10-02T18:00:00.000Z', '2026-10-02', 'good', 'Better', false],
      ['2026-09-30T09:00:00.000Z', '2026-09-30', 'needs_work', 'Weight on the heels', false],
      ['2026-09-28T09:00:00.000Z', '2026-09-28', 'needs_work', 'Sits up in the set', true],
    ]);
    expect(body.notes.map((n) => n.id)).not.toContain(deletedId);
    expect(new Set(body.notes.map((n) => n.authorName))).toEqual(new Set(['Coach revcounthead']));
    expect(new Set(body.notes.map((n) => n.sessionId))).toEqual(new Set([team.sessionId]));
  });

  it("names the coach who wrote the note", async () => {
    const res = await review(server.app, team.head, team.teamId, `skaters/${skaterC.id}/cells`, { cueId: start, week: '2026-W40' }).expect(200);
    expect(res.body.notes).toEqual([expect.objectContaining({ authorName: 'Marit Tweede', mark: 'good', note: 'Quiet at ready' })]);
  });

  it("another team's cue is not found; an empty cell is an empty list", async () => {
    expectError(await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/cells`, { cueId: cueOf(other, 'start').id, week: '2026-W40' }), 404);
    const empty = await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/cells`, { cueId: curve, week: '2026-W40' }).expect(200);
    expect(empty.body.notes).toEqual([]);
  });
});

describe('bad query strings answer 400 with a message', () => {
  const weeksPath = () => `skaters/${team.skaterA.id}/weeks`;
  it.each([
    ['week 53 of a 52-week year', { from: '2025-W53', to: '2026-W02' }, /from is not a week of that year/],
    ['week 54', { from: '2026-W54' }, /from is not a week of that year/],
    ['from after to', { from: '2026-W10', to: '2026-W05' }, /from \(2026-W10\) must not be after to \(2026-W05\)/],
    ['more than 104 weeks', { from: '2024-W01', to: '2026-W10' }, /at most 104 weeks/],
    ['a key named constructor', { constructor: '1' }, /constructor/],
    ['a key named __proto__', { __proto__x: '1' }, /__proto__x/],
    ['a value constructor', { from: 'constructor' }, /from must be an ISO week/],
    ['a NUL', { from: '2026-W05\u0000' }, /from must be an ISO week/],
    ['a year out of range', { from: '1999-W05' }, /from is not a week of that year/],
  ])('%s', async (_why, query, message) => {
    const res = await review(server.app, team.head, team.teamId, weeksPath(), query as Record<string, string>);
    expectError(res, 400, 'validation');
    expect(res.body.error.message).toMatch(message);
  });

  it('a repeated key, on the group route too', async () => {
    const res = await request(server.app).get(`/api/teams/${team.teamId}/review/groups/all/weeks?from=2026-W01&from=2026-W02`).set(team.head.auth);
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toHaveProperty('from');
  });

  it('the one-week route: a week that does not exist, a bad group, an unknown key', async () => {
    expectError(await review(server.app, team.head, team.teamId, 'week/2025-W53'), 400, 'validation');
    expectError(await review(server.app, team.head, team.teamId, 'week/constructor'), 400, 'validation');
    const group = await review(server.app, team.head, team.teamId, 'week/2026-W40', { groupId: 'everyone' });
    expectError(group, 400, 'validation');
    expect(group.body.error.message).toMatch(/groupId must be a group's id, 'all' or 'none'/);
    expectError(await review(server.app, team.head, team.teamId, 'week/2026-W40', { from: '2026-W40' }), 400, 'validation');
  });

  it('the cell route: cueId and week are needed and checked', async () => {
    const cells = `skaters/${team.skaterA.id}/cells`;
    const missing = await review(server.app, team.head, team.teamId, cells);
    expectError(missing, 400, 'validation');
    expect(Object.keys(missing.body.error.fields).sort()).toEqual(['cueId', 'week']);
    expectError(await review(server.app, team.head, team.teamId, cells, { cueId: 'nope', week: '2026-W40' }), 400, 'validation');
    expectError(await review(server.app, team.head, team.teamId, cells, { cueId: start, week: '2026-W54' }), 400, 'validation');
    expectError(await review(server.app, team.head, team.teamId, cells, { cueId: start, week: '2026-W40\u0000' }), 400, 'validation');
  });
});

describe('counting is one GROUP BY in PostgreSQL over the review index', () => {
  it('EXPLAIN of the skater matrix reads ix_observations_review_skater', async () => {
    const { Review1764760000000 } = await import('../../server/migrations/1764760000000-review');
    expect(new Review1764760000000().name).toBe('Review1764760000000');
    const plan: { 'QUERY PLAN': string }[] = await server.dataSource.query(
      `EXPLAIN SELECT o.cue_id, to_char(o.created_at AT TIME ZONE 'UTC', 'IYYY-"W"IW'), count(*)
         FROM observations o
        WHERE o.team_id = $1 AND o.skater_id = $2 AND o.deleted_at IS NULL
          AND o.created_at >= '2026-09-28' AND o.created_at < '2026-11-23'
        GROUP BY 1, 2`,
      [team.teamId, team.skaterA.id],
    );
    const text = plan.map((r) => r['QUERY PLAN']).join('\n');
    // With a handful of rows the planner may still choose the table; the index must at least exist.
    const [index] = await server.dataSource.query(`SELECT indexdef FROM pg_indexes WHERE indexname = 'ix_observations_review_skater'`);
    expect(index.indexdef).toMatch(/\(team_id, skater_id, created_at\) INCLUDE \(cue_id, mark\) WHERE \(deleted_at IS NULL\)/);
    expect(text).toMatch(/Aggregate/);
  });
});

describe('signing up with a time zone', () => {
  it('keeps the browser zone, falls back to UTC without one, and refuses a name that is not a zone', async () => {
    const { uniqueEmail, PASSWORD } = await import('./helpers');
    const signUp = (timeZone?: string) =>
      request(server.app)
        .post('/api/auth/sign-up')
        .send({ email: uniqueEmail('tz'), password: PASSWORD, displayName: 'Coach Zone', teamName: 'Team Zone', ...(timeZone === undefined ? {} : { timeZone }) });
    const zoned = await signUp('America/Los_Angeles').expect(201);
    const zonedTeam = zoned.body.memberships[0].teamId;
    const settings = await request(server.app).get(`/api/teams/${zonedTeam}/settings`).set({ Authorization: `Bearer ${zoned.body.accessToken}` }).expect(200);
    expect(settings.body).toEqual({ shareBoardNotes: false, timeZone: 'America/Los_Angeles' });
    const plain = await signUp().expect(201);
    const [row] = await server.dataSource.query(`SELECT time_zone FROM teams WHERE id = $1`, [plain.body.memberships[0].teamId]);
    expect(row.time_zone).toBe('UTC');
    for (const bad of ['Mars/Olympus_Mons', '+02:00', 'constructor', 'Europe/Amsterdam\u0000']) {
      const res = await signUp(bad);
      expectError(res, 400, 'validation');
      expect(res.body.error.fields.timeZone).toMatch(/time zone name like Europe\/Amsterdam/);
    }
  });

  it("the head coach changes it (another team's coach finds no team); the database refuses a name PostgreSQL does not know", async () => {
    const head = await signUpCoach(server.app, 'tzhead');
    const settings = `/api/teams/${head.teamId}/settings`;
    const changed = await request(server.app).patch(settings).set(head.auth).send({ timeZone: 'pacific/auckland' }).expect(200);
    expect(changed.body).toEqual({ shareBoardNotes: false, timeZone: 'Pacific/Auckland' });
    expectError(await request(server.app).patch(settings).set(team.coach.auth).send({ timeZone: 'UTC' }), 404);
    expectError(await request(server.app).patch(settings).set(head.auth).send({ timeZone: 'Nowhere/Land' }), 400, 'validation');
    await expect(server.dataSource.query(`UPDATE teams SET time_zone = 'Nowhere/Land' WHERE id = $1`, [head.teamId])).rejects.toThrow(/ck_teams_time_zone/);
    const [row] = await server.dataSource.query(`SELECT time_zone FROM teams WHERE id = $1`, [head.teamId]);
    expect(row.time_zone).toBe('Pacific/Auckland');
  });
});
