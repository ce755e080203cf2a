/**
 * ISO weeks through PostgreSQL and through the review routes (issue #10 §1): PostgreSQL's own
 * ISO fields (to_char 'IYYY-"W"IW' of created_at AT TIME ZONE the team's zone) agree with
 * date-fns (shared/weeks.ts) on every day of 2000-2100 and on instants around the clock in three
 * zones; the standard's examples (2026-01-01 in 2026-W01, 2027-01-01 in 2026-W53, 2024-12-30 in
 * 2025-W01) and notes made at 23:30 on a local Sunday that is Monday in UTC (Los Angeles), or on
 * a local Monday that is Sunday in UTC (Auckland), land in the team's local week.
 */
import { v7 as uuidv7 } from 'uuid';
import type { ReviewMatrix } from '../../shared/schemas/review';
import { weekOf } from '../../shared/weeks';
import { startTestServer, type TestServer } from './helpers';
import { cueOf, makeReviewTeam, pushNotes, review, type ReviewTeam } from './review-helpers';
import { userIdOf } from './sync-helpers';

let server: TestServer;
let la: ReviewTeam;
let auckland: ReviewTeam;
let utc: ReviewTeam;

beforeAll(async () => {
  server = await startTestServer();
  la = await makeReviewTeam(server.app, server.dataSource, 'revwkla', { people: false, timeZone: 'America/Los_Angeles' });
  auckland = await makeReviewTeam(server.app, server.dataSource, 'revwkakl', { people: false, timeZone: 'Pacific/Auckland' });
  utc = await makeReviewTeam(server.app, server.dataSource, 'revwkutc', { people: false });
});

afterAll(() => server.close());

describe('PostgreSQL and date-fns agree', () => {
  it('on the ISO week of every day from 2000 to 2100', async () => {
    const rows: { day: string; week: string }[] = await server.dataSource.query(
      `SELECT to_char(d, 'YYYY-MM-DD') AS day, to_char(d, 'IYYY-"W"IW') AS week
         FROM generate_series('2000-01-01'::timestamp, '2100-12-31'::timestamp, interval '1 day') AS d`,
    );
    expect(rows.length).toBe(36890);
    const differ = rows.filter((r) => weekOf(`${r.day}T12:00:00Z`, 'UTC') !== r.week);
    expect(differ).toEqual([]);
    // About 13 s on a busy 2-core machine: 36,890 conversions through date-fns.
  }, 90_000);

  it('on instants every 293 minutes of 2026-2027 in Los Angeles, Auckland and Amsterdam', async () => {
    const rows: { at: string; zone: string; week: string }[] = await server.dataSource.query(
      `SELECT to_char(t AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS"Z"') AS at, z AS zone,
              to_char(t AT TIME ZONE z, 'IYYY-"W"IW') AS week
         FROM generate_series('2026-01-01T00:00:00Z'::timestamptz, '2027-12-31T00:00:00Z'::timestamptz, interval '293 minutes') AS t,
              unnest($1::text[]) AS z`,
      [['America/Los_Angeles', 'Pacific/Auckland', 'Europe/Amsterdam']],
    );
    expect(rows.length).toBeGreaterThan(10000);
    expect(rows.filter((r) => weekOf(r.at, r.zone) !== r.week)).toEqual([]);
  }, 60_000);
});

/** A week's counts for one cue from a matrix. */
const countsOf = (matrix: ReviewMatrix, cueId: string) => matrix.rows.find((r) => r.cueId === cueId)?.counts ?? [];

describe('week boundaries through the review routes', () => {
  it('the examples of the standard, in the team zone (Los Angeles, noon local)', async () => {
    const cue = cueOf(la, 'straight').id;
    // 2026-01-01 and 2024-12-30 at local noon are in the past: pushed through sync.
    await pushNotes(server.app, la, la.headDevice, [
      { skaterId: la.skaterA.id, cueId: cue, mark: 'needs_work', createdAt: '2026-01-01T20:00:00.000Z' },
      { skaterId: la.skaterA.id, cueId: cue, mark: 'good', createdAt: '2024-12-30T20:00:00.000Z' },
    ]);
    // 2027-01-01 is after today, which a push refuses: written straight into the table.
    await server.dataSource.query(
      `INSERT INTO observations (team_id, id, session_id, skater_id, cue_id, mark, created_at, created_by)
       VALUES ($1, $2, $3, $4, $5, 'needs_work', '2027-01-01T20:00:00Z', $6)`,
      [la.teamId, uuidv7(), la.sessionId, la.skaterA.id, cue, userIdOf(la.head)],
    );
    const path = `skaters/${la.skaterA.id}/weeks`;
    const early = await review(server.app, la.head, la.teamId, path, { from: '2024-W52', to: '2026-W01' }).expect(200);
    expect(early.body.timeZone).toBe('America/Los_Angeles');
    expect(early.body.weeks).toHaveLength(1 + 52 + 1);
    expect(countsOf(early.body, cue)).toEqual([
      { week: '2025-W01', needsWork: 0, good: 1 },
      { week: '2026-W01', needsWork: 1, good: 0 },
    ]);
    const late = await review(server.app, la.head, la.teamId, path, { from: '2026-W50', to: '2027-W01' }).expect(200);
    expect(late.body.weeks).toEqual(['2026-W50', '2026-W51', '2026-W52', '2026-W53', '2027-W01']);
    expect(countsOf(late.body, cue)).toEqual([{ week: '2026-W53', needsWork: 1, good: 0 }]);
    const next = await review(server.app, la.head, la.teamId, `skaters/${la.skaterA.id}/weeks`, { from: '2027-W01', to: '2027-W02' }).expect(200);
    expect(next.body.rows).toEqual([]);
  });

  it('23:30 on a Sunday in Los Angeles (Monday 06:30 UTC, the night clocks go forward) counts in that week', async () => {
    const cue = cueOf(la, 'curve').id;
    await pushNotes(server.app, la, la.headDevice, [
      { skaterId: la.skaterB.id, cueId: cue, mark: 'needs_work', createdAt: '2026-03-09T06:30:00.000Z', note: 'Sunday late' },
      { skaterId: la.skaterB.id, cueId: cue, mark: 'good', createdAt: '2026-03-09T07:30:00.000Z', note: 'Monday early' },
    ]);
    const res = await review(server.app, la.head, la.teamId, `skaters/${la.skaterB.id}/weeks`, { from: '2026-W10', to: '2026-W11' }).expect(200);
    expect(countsOf(res.body, cue)).toEqual([
      { week: '2026-W10', needsWork: 1, good: 0 },
      { week: '2026-W11', needsWork: 0, good: 1 },
    ]);
    const sunday = await review(server.app, la.head, la.teamId, `skaters/${la.skaterB.id}/cells`, { cueId: cue, week: '2026-W10' }).expect(200);
    expect(sunday.body.notes).toEqual([expect.objectContaining({ note: 'Sunday late', day: '2026-03-08', createdAt: '2026-03-09T06:30:00.000Z' })]);
    const week = await review(server.app, la.head, la.teamId, 'week/2026-W10').expect(200);
    expect(week.body.cells).toEqual([{ skaterId: la.skaterB.id, cueId: cue, needsWork: 1, good: 0 }]);
    expect((await review(server.app, la.head, la.teamId, 'groups/all/weeks', { from: '2026-W10', to: '2026-W10' }).expect(200)).body.rows).toEqual([
      expect.objectContaining({ cueId: cue, counts: [{ week: '2026-W10', needsWork: 1, good: 0 }] }),
    ]);
  });

  it('the same instant in a UTC team is Monday: the next week', async () => {
    const cue = cueOf(utc, 'curve').id;
    await pushNotes(server.app, utc, utc.headDevice, [{ skaterId: utc.skaterA.id, cueId: cue, mark: 'needs_work', createdAt: '2026-03-09T06:30:00.000Z' }]);
    const res = await review(server.app, utc.head, utc.teamId, `skaters/${utc.skaterA.id}/weeks`, { from: '2026-W10', to: '2026-W11' }).expect(200);
    expect(countsOf(res.body, cue)).toEqual([{ week: '2026-W11', needsWork: 1, good: 0 }]);
  });

  it('Auckland: 08:00 on a Monday (Sunday 19:00 UTC) is the new week; 23:30 on a Sunday stays in its week', async () => {
    const cue = cueOf(auckland, 'exit').id;
    await pushNotes(server.app, auckland, auckland.headDevice, [
      { skaterId: auckland.skaterA.id, cueId: cue, mark: 'good', createdAt: '2026-01-04T19:00:00.000Z' },
      { skaterId: auckland.skaterA.id, cueId: cue, mark: 'needs_work', createdAt: '2026-01-04T10:30:00.000Z' },
      { skaterId: auckland.skaterA.id, cueId: cue, mark: 'needs_work', createdAt: '2026-03-08T10:30:00.000Z' },
    ]);
    const res = await review(server.app, auckland.head, auckland.teamId, `skaters/${auckland.skaterA.id}/weeks`, { from: '2026-W01', to: '2026-W11' }).expect(200);
    expect(countsOf(res.body, cue)).toEqual([
      { week: '2026-W01', needsWork: 1, good: 0 },
      { week: '2026-W02', needsWork: 0, good: 1 },
      { week: '2026-W10', needsWork: 1, good: 0 },
    ]);
    const monday = await review(server.app, auckland.head, auckland.teamId, `skaters/${auckland.skaterA.id}/cells`, { cueId: cue, week: '2026-W02' }).expect(200);
    expect(monday.body.notes).toEqual([expect.objectContaining({ mark: 'good', day: '2026-01-05' })]);
  });

  it('a change of the team zone moves the same notes to their new local weeks', async () => {
    const cue = cueOf(utc, 'pacing').id;
    await pushNotes(server.app, utc, utc.headDevice, [{ skaterId: utc.skaterB.id, cueId: cue, mark: 'good', createdAt: '2026-01-12T07:30:00.000Z' }]);
    const path = `skaters/${utc.skaterB.id}/weeks`;
    const query = { from: '2026-W02', to: '2026-W03' };
    expect(countsOf((await review(server.app, utc.head, utc.teamId, path, query).expect(200)).body, cue)).toEqual([{ week: '2026-W03', needsWork: 0, good: 1 }]);
    const { default: request } = await import('supertest');
    await request(server.app).patch(`/api/teams/${utc.teamId}/settings`).set(utc.head.auth).send({ timeZone: 'America/Los_Angeles' }).expect(200);
    const moved = (await review(server.app, utc.head, utc.teamId, path, query).expect(200)).body as ReviewMatrix;
    expect(moved.timeZone).toBe('America/Los_Angeles');
    expect(countsOf(moved, cue)).toEqual([{ week: '2026-W02', needsWork: 0, good: 1 }]);
    await request(server.app).patch(`/api/teams/${utc.teamId}/settings`).set(utc.head.auth).send({ timeZone: 'UTC' }).expect(200);
  });
});
