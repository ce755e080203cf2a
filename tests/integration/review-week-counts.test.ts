/**
 * The kept week counts (observation_week_counts, migration 1764785000000) against the notes
 * themselves: after every kind of write (a push of new notes, mark edits and deletes through
 * sync; notes moved to another skater, cue or instant, hard deletes, a tombstone brought back and
 * one statement touching two teams, straight in SQL as any other writer would; a change of the
 * team's zone; skaters moved between groups, retired, brought back, deleted) the kept counts, per
 * skater and per group of live skaters, equal a fresh count of the live notes by
 * to_char(created_at AT TIME ZONE zone, 'IYYY-"W"IW'), row for row, no 0 / 0 row left behind;
 * and the group matrix route answers what that fresh count says.
 */
import request from 'supertest';
import type { ReviewMatrix } from '../../shared/schemas/review';
import { startTestServer, type TestServer } from './helpers';
import { cueOf, deleteNotes, makeReviewTeam, pushNotes, review, type NoteAt, type ReviewTeam } from './review-helpers';
import { pushOk, upsert } from './sync-helpers';

let server: TestServer;
let team: ReviewTeam;
let other: ReviewTeam;

beforeAll(async () => {
  server = await startTestServer();
  team = await makeReviewTeam(server.app, server.dataSource, 'revwc', { people: false, timeZone: 'Europe/Amsterdam' });
  other = await makeReviewTeam(server.app, server.dataSource, 'revwcother', { people: false, timeZone: 'America/Los_Angeles' });
});

afterAll(() => server.close());

/** Kept rows that differ from a fresh count of the team's live notes, both ways ([] when they agree). */
async function differences(teamId: string): Promise<unknown[]> {
  return server.dataSource.query(
    `WITH fresh AS (
       SELECT o.skater_id, o.cue_id, to_char(o.created_at AT TIME ZONE t.time_zone, 'IYYY-"W"IW') AS week,
              count(*) FILTER (WHERE o.mark = 'needs_work')::int AS needs_work, count(*) FILTER (WHERE o.mark = 'good')::int AS good
         FROM observations o JOIN teams t ON t.id = o.team_id
        WHERE o.team_id = $1 AND o.deleted_at IS NULL
        GROUP BY 1, 2, 3
     ),
     kept AS (
       SELECT skater_id, cue_id, to_char(week_start, 'IYYY-"W"IW') AS week, needs_work, good
         FROM observation_week_counts WHERE team_id = $1
     )
     (SELECT 'kept only' AS side, * FROM (SELECT * FROM kept EXCEPT ALL SELECT * FROM fresh) a)
     UNION ALL
     (SELECT 'fresh only', * FROM (SELECT * FROM fresh EXCEPT ALL SELECT * FROM kept) b)`,
    [teamId],
  );
}

/** The same for the counts kept per group of live skaters (observation_group_week_counts). */
async function groupDifferences(teamId: string): Promise<unknown[]> {
  return server.dataSource.query(
    `WITH fresh AS (
       SELECT coalesce(s.group_id, '00000000-0000-0000-0000-000000000000'::uuid) AS group_key, o.cue_id,
              to_char(o.created_at AT TIME ZONE t.time_zone, 'IYYY-"W"IW') AS week,
              count(*) FILTER (WHERE o.mark = 'needs_work')::int AS needs_work, count(*) FILTER (WHERE o.mark = 'good')::int AS good
         FROM observations o JOIN teams t ON t.id = o.team_id JOIN skaters s ON s.team_id = o.team_id AND s.id = o.skater_id
        WHERE o.team_id = $1 AND o.deleted_at IS NULL AND s.deleted_at IS NULL AND s.retired_at IS NULL
        GROUP BY 1, 2, 3
     ),
     kept AS (
       SELECT group_key, cue_id, to_char(week_start, 'IYYY-"W"IW') AS week, needs_work, good
         FROM observation_group_week_counts WHERE team_id = $1
     )
     (SELECT 'kept only' AS side, * FROM (SELECT * FROM kept EXCEPT ALL SELECT * FROM fresh) a)
     UNION ALL
     (SELECT 'fresh only', * FROM (SELECT * FROM fresh EXCEPT ALL SELECT * FROM kept) b)`,
    [teamId],
  );
}

/** Both kept tables against the notes. */
async function agree(teamId: string) {
  expect(await differences(teamId)).toEqual([]);
  expect(await groupDifferences(teamId)).toEqual([]);
}

async function keptRows(teamId: string): Promise<number> {
  const [{ n }]: { n: number }[] = await server.dataSource.query(`SELECT count(*)::int AS n FROM observation_week_counts WHERE team_id = $1`, [teamId]);
  return n;
}

/** Local wall time in Amsterdam in winter (UTC+1) as an instant. */
const at = (day: string, time = '12:00') => new Date(Date.parse(`${day}T${time}:00+01:00`)).toISOString();

describe('the kept week counts', () => {
  let ids: string[] = [];

  it('follow new notes, mark edits and deletes pushed through sync', async () => {
    const start = cueOf(team, 'start').id;
    const curve = cueOf(team, 'curve').id;
    const notes: NoteAt[] = [];
    const days = ['2026-01-04', '2026-01-05', '2026-01-11', '2026-01-12', '2026-01-20', '2026-02-01'];
    for (let i = 0; i < 36; i += 1) {
      notes.push({
        skaterId: i % 2 === 0 ? team.skaterA.id : team.skaterB.id,
        cueId: i % 3 === 0 ? curve : start,
        mark: i % 4 === 0 ? 'good' : 'needs_work',
        // Late on a Sunday and just after midnight on a Monday, local: the weeks' edges.
        createdAt: at(days[i % days.length], ['23:30', '00:00', '07:15'][i % 3]),
      });
    }
    ids = await pushNotes(server.app, team, team.headDevice, notes);
    expect(await keptRows(team.teamId)).toBeGreaterThan(0);
    await agree(team.teamId);

    // Marks changed on a few notes, others deleted (tombstones), in one push each.
    await pushOk(server.app, team.headDevice, team.teamId, ids.slice(0, 6).map((id) => upsert(team.headDevice, 'observations', id, { mark: 'good' })));
    await agree(team.teamId);
    await deleteNotes(server.app, team, team.headDevice, ids.slice(6, 12));
    await agree(team.teamId);
  });

  it('follow notes moved, re-timed, hard-deleted and brought back by any other writer', async () => {
    const db = server.dataSource;
    const exit = cueOf(team, 'exit').id;
    await db.query(`UPDATE observations SET skater_id = $3 WHERE team_id = $1 AND id = ANY($2::uuid[])`, [team.teamId, ids.slice(12, 16), team.skaterB.id]);
    await agree(team.teamId);
    await db.query(`UPDATE observations SET cue_id = $3 WHERE team_id = $1 AND id = ANY($2::uuid[])`, [team.teamId, ids.slice(16, 20), exit]);
    await agree(team.teamId);
    // One minute earlier: the Monday 00:00 notes fall back into the week before.
    await db.query(`UPDATE observations SET created_at = created_at - interval '1 minute' WHERE team_id = $1 AND id = ANY($2::uuid[])`, [team.teamId, ids.slice(20, 30)]);
    await agree(team.teamId);
    await db.query(`DELETE FROM observations WHERE team_id = $1 AND id = ANY($2::uuid[])`, [team.teamId, ids.slice(30, 33)]);
    await agree(team.teamId);
    await db.query(`UPDATE observations SET deleted_at = NULL, deleted_hlc = NULL WHERE team_id = $1 AND id = ANY($2::uuid[])`, [team.teamId, ids.slice(6, 9)]);
    await agree(team.teamId);
    // Every note of a cell deleted: its row goes rather than stay at 0 / 0.
    await db.query(`UPDATE observations SET deleted_at = now() WHERE team_id = $1 AND cue_id = $2`, [team.teamId, exit]);
    await agree(team.teamId);
    const [{ empty }]: { empty: number }[] = await db.query(
      `SELECT count(*)::int AS empty FROM observation_week_counts WHERE team_id = $1 AND (cue_id = $2 OR (needs_work = 0 AND good = 0))`,
      [team.teamId, exit],
    );
    expect(empty).toBe(0);
  });

  it('follow one statement over two teams, and a change of the team zone', async () => {
    const otherIds = await pushNotes(server.app, other, other.headDevice, [
      { skaterId: other.skaterA.id, cueId: cueOf(other, 'start').id, mark: 'good', createdAt: '2026-03-02T07:30:00Z' },
      { skaterId: other.skaterB.id, cueId: cueOf(other, 'start').id, mark: 'needs_work', createdAt: '2026-03-09T06:00:00Z' },
    ]);
    await server.dataSource.query(
      `UPDATE observations SET mark = CASE mark WHEN 'good' THEN 'needs_work' ELSE 'good' END
        WHERE (team_id = $1 AND id = ANY($2::uuid[])) OR (team_id = $3 AND id = ANY($4::uuid[]))`,
      [team.teamId, ids.slice(0, 3), other.teamId, otherIds],
    );
    await agree(team.teamId);
    await agree(other.teamId);

    const before = await keptRows(team.teamId);
    await request(server.app).patch(`/api/teams/${team.teamId}/settings`).set(team.head.auth).send({ timeZone: 'Pacific/Auckland' }).expect(200);
    await agree(team.teamId);
    await request(server.app).patch(`/api/teams/${team.teamId}/settings`).set(team.head.auth).send({ timeZone: 'Europe/Amsterdam' }).expect(200);
    await agree(team.teamId);
    expect(await keptRows(team.teamId)).toBe(before);
  });

  it('follow skaters moved between groups, retired, brought back and deleted', async () => {
    const settings = (path: string) => request(server.app).patch(`/api/teams/${team.teamId}/${path}`).set(team.head.auth);
    const group = await request(server.app).post(`/api/teams/${team.teamId}/groups`).set(team.head.auth).send({ name: 'Juniors' }).expect(201);
    await settings(`skaters/${team.skaterA.id}`).send({ groupId: group.body.id }).expect(200);
    await agree(team.teamId);
    await settings(`skaters/${team.skaterB.id}`).send({ groupId: group.body.id }).expect(200);
    await agree(team.teamId);
    await settings(`skaters/${team.skaterA.id}`).send({ retired: true }).expect(200);
    await agree(team.teamId);
    // A note of a retired skater counts in no group; changed meanwhile, it counts when they are back.
    await server.dataSource.query(`UPDATE observations SET mark = 'good' WHERE team_id = $1 AND skater_id = $2`, [team.teamId, team.skaterA.id]);
    await agree(team.teamId);
    await settings(`skaters/${team.skaterA.id}`).send({ retired: false, groupId: null }).expect(200);
    await agree(team.teamId);
    await server.dataSource.query(`UPDATE skaters SET deleted_at = now() WHERE team_id = $1 AND id = $2`, [team.teamId, team.skaterB.id]);
    await agree(team.teamId);
    await server.dataSource.query(`UPDATE skaters SET deleted_at = NULL WHERE team_id = $1 AND id = $2`, [team.teamId, team.skaterB.id]);
    await agree(team.teamId);
    const none = await review(server.app, team.head, team.teamId, 'groups/none/weeks', { from: '2025-W52', to: '2026-W06' }).expect(200);
    const inGroup = await review(server.app, team.head, team.teamId, `groups/${group.body.id}/weeks`, { from: '2025-W52', to: '2026-W06' }).expect(200);
    const marks = (m: ReviewMatrix) => m.rows.reduce((n, row) => n + row.totalNeedsWork + row.totalGood, 0);
    const [{ a, b }]: { a: number; b: number }[] = await server.dataSource.query(
      `SELECT count(*) FILTER (WHERE skater_id = $2)::int AS a, count(*) FILTER (WHERE skater_id = $3)::int AS b
         FROM observations WHERE team_id = $1 AND deleted_at IS NULL`,
      [team.teamId, team.skaterA.id, team.skaterB.id],
    );
    expect(marks(none.body as ReviewMatrix)).toBe(a);
    expect(marks(inGroup.body as ReviewMatrix)).toBe(b);
  });

  it('the group matrix answers the fresh count of the notes', async () => {
    const res = await review(server.app, team.head, team.teamId, 'groups/all/weeks', { from: '2025-W52', to: '2026-W06' }).expect(200);
    const matrix = res.body as ReviewMatrix;
    const fromRoute = matrix.rows.flatMap((row) => row.counts.map((c) => `${row.cueId} ${c.week} ${c.needsWork}/${c.good}`)).sort();
    const fresh: { line: string }[] = await server.dataSource.query(
      `SELECT o.cue_id || ' ' || to_char(o.created_at AT TIME ZONE 'Europe/Amsterdam', 'IYYY-"W"IW') || ' ' ||
              count(*) FILTER (WHERE o.mark = 'needs_work') || '/' || count(*) FILTER (WHERE o.mark = 'good') AS line
         FROM observations o
        WHERE o.team_id = $1 AND o.deleted_at IS NULL
        GROUP BY o.cue_id, to_char(o.created_at AT TIME ZONE 'Europe/Amsterdam', 'IYYY-"W"IW')`,
      [team.teamId],
    );
    expect(fromRoute.length).toBeGreaterThan(3);
    expect(fromRoute).toEqual(fresh.map((r) => r.line).sort());
  });
});
