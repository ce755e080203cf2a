/**
 * Cue follow-up and runs by week through the real routes and PostgreSQL (issue #10 §3, §6). Notes
 * and runs are pushed through sync into a team in America/Toronto (UTC-5 in February) beside
 * another team holding the same notes; the figures below were worked out by hand:
 *
 * Skater A, weeks 2026-W06..W10 asked for (W06 = Mon 2 Feb):
 * - cue X: W06 3 needs work (one on Sunday 8 Feb 23:30 local = Monday 04:30 UTC) + 1 good;
 *   W07 1 nw 2 good; W08 nothing; W09 2 good; W10 1 nw.  Stressed in W06 at N = 3, after: 4 good
 *   of 6 marks (66.7 %, from 25 %: +41.7 points) -> fading. Counted in UTC, W06 would hold 2 nw.
 * - cue Y: W08 4 nw; W09 2 nw 1 good; W10 1 nw 1 good -> 2 good of 5 (40 %) -> persisting.
 * - cue Z: W10 3 nw; W11 1 good -> 1 mark after -> not enough data.
 * Runs of A (1500 m long track, finished): W06 laps after the opener 28710 28880 28550 (mean
 * 28713), W07 28000 28500 28500 (28333), W09 29000 29500 29500 (29333); a 500 m in W07 and a
 * stopped 1500 m in W07 do not count. X's follow-up laps: W07 + W09 pooled 173000 / 6 = 28833,
 * change +120 ms.
 */
import request from 'supertest';
import type { FollowUpReply, GroupFollowUpReply, RunsByWeekReply } from '../../shared/schemas/review-follow-up';
import { expectError, startTestServer, type Account, type TestServer } from './helpers';
import { cueOf, makeReviewTeam, pushNotes, review, type NoteAt, type ReviewTeam } from './review-helpers';
import { crossingCreate, runCreate } from './support/clock-ops';
import { pushOk, remove, type Device } from './sync-helpers';

let server: TestServer;
let team: ReviewTeam;
let other: ReviewTeam;
let cueX: string;
let cueY: string;
let cueZ: string;

const range = { from: '2026-W06', to: '2026-W10' };

function notesFor(skaterId: string, x: string, y: string, z: string): NoteAt[] {
  const nw = (cueId: string, createdAt: string, note = ''): NoteAt => ({ skaterId, cueId, mark: 'needs_work', createdAt, note });
  const good = (cueId: string, createdAt: string): NoteAt => ({ skaterId, cueId, mark: 'good', createdAt });
  return [
    // cue X
    nw(x, '2026-02-03T17:00:00.000Z'),
    nw(x, '2026-02-04T17:00:00.000Z'),
    nw(x, '2026-02-09T04:30:00.000Z', 'Sunday late session'), // Sunday 8 Feb 23:30 in Toronto: W06
    good(x, '2026-02-05T17:00:00.000Z'),
    nw(x, '2026-02-10T17:00:00.000Z'),
    good(x, '2026-02-11T17:00:00.000Z'),
    good(x, '2026-02-12T17:00:00.000Z'),
    good(x, '2026-02-24T17:00:00.000Z'),
    good(x, '2026-02-25T17:00:00.000Z'),
    nw(x, '2026-03-03T17:00:00.000Z'),
    // cue Y
    ...['16', '17', '18', '19'].map((d) => nw(y, `2026-02-${d}T17:00:00.000Z`)),
    nw(y, '2026-02-23T17:00:00.000Z'),
    nw(y, '2026-02-24T18:00:00.000Z'),
    good(y, '2026-02-26T17:00:00.000Z'),
    nw(y, '2026-03-02T17:00:00.000Z'),
    good(y, '2026-03-04T17:00:00.000Z'),
    // cue Z
    ...['03', '04', '05'].map((d) => nw(z, `2026-03-${d}T17:00:00.000Z`)),
    good(z, '2026-03-10T16:00:00.000Z'),
  ];
}

async function pushRuns(t: ReviewTeam, dev: Device, skaterId: string) {
  const finished = { status: 'finished' };
  const runs = [
    { day: '2026-02-04', distanceM: 1500, crossings: [25_310, 54_020, 82_900, 111_450], extra: finished },
    { day: '2026-02-11', distanceM: 1500, crossings: [25_000, 53_000, 81_500, 110_000], extra: finished },
    { day: '2026-02-25', distanceM: 1500, crossings: [26_000, 55_000, 84_500, 114_000], extra: finished },
    { day: '2026-02-12', distanceM: 500, crossings: [10_000, 38_000], extra: finished },
    { day: '2026-02-13', distanceM: 1500, crossings: [24_000, 52_000], extra: { status: 'stopped', stopReason: 'Fell' } },
  ];
  const ops = runs.flatMap((r) => {
    const run = runCreate(dev, { skaterId, day: r.day, distanceM: r.distanceM, extra: r.extra });
    return [run, ...r.crossings.map((atMs) => crossingCreate(dev, run.recordId, atMs))];
  });
  const reply = await pushOk(server.app, dev, t.teamId, ops);
  expect(reply.results.filter((r) => r.status !== 'applied')).toEqual([]);
}

beforeAll(async () => {
  server = await startTestServer();
  [team, other] = await Promise.all([
    makeReviewTeam(server.app, server.dataSource, 'fu', { timeZone: 'America/Toronto' }),
    makeReviewTeam(server.app, server.dataSource, 'fuother', { timeZone: 'America/Toronto' }),
  ]);
  [cueX, cueY, cueZ] = [cueOf(team, 'straight', 0).id, cueOf(team, 'straight', 1).id, cueOf(team, 'curve', 0).id];
  await pushNotes(server.app, team, team.headDevice, notesFor(team.skaterA.id, cueX, cueY, cueZ));
  await pushRuns(team, team.headDevice, team.skaterA.id);
  // The other team: the same notes and runs for its skater A, and for its skater B.
  const [ox, oy, oz] = [cueOf(other, 'straight', 0).id, cueOf(other, 'straight', 1).id, cueOf(other, 'curve', 0).id];
  await pushNotes(server.app, other, other.headDevice, [...notesFor(other.skaterA.id, ox, oy, oz), ...notesFor(other.skaterB.id, ox, oy, oz)]);
  await pushRuns(other, other.headDevice, other.skaterA.id);
  // Skater B of this team: cue X stressed in W07 only (3 nw), nothing after.
  const b = team.skaterB.id;
  await pushNotes(
    server.app,
    team,
    team.coachDevice,
    ['10', '11', '12'].map((d) => ({ skaterId: b, cueId: cueX, mark: 'needs_work' as const, createdAt: `2026-02-${d}T15:00:00.000Z` })),
  );
});

afterAll(() => server.close());

const followUp = (who: Account, skaterId: string, query: Record<string, string> = {}, teamId = team.teamId) =>
  review(server.app, who, teamId, `skaters/${skaterId}/follow-up`, { ...range, ...query });

describe('follow-up figures', () => {
  it('finds the three stressed cues of skater A at N = 3, newest week first, with their counts and verdicts', async () => {
    const res = await followUp(team.head, team.skaterA.id).expect(200);
    const body = res.body as FollowUpReply;
    expect(body).toMatchObject({ timeZone: 'America/Toronto', from: '2026-W06', to: '2026-W10', threshold: 3 });
    expect(body.lapBasis).toEqual({ distanceM: 1500, track: 'long', runs: 3 });
    expect(body.items.map((i) => [i.cueId, i.week, i.needsWork, i.good, i.verdict])).toEqual([
      [cueZ, '2026-W10', 3, 0, 'not enough data'],
      [cueY, '2026-W08', 4, 0, 'persisting'],
      [cueX, '2026-W06', 3, 1, 'fading'],
    ]);
    const x = body.items[2];
    expect(x.after.map((a) => [a.week, a.needsWork, a.good, a.counted])).toEqual([
      ['2026-W07', 1, 2, true],
      ['2026-W08', 0, 0, true],
      ['2026-W09', 0, 2, true],
      ['2026-W10', 1, 0, true],
    ]);
    expect(x).toMatchObject({ stressedGood: 1, stressedMarks: 4, afterGood: 4, afterMarks: 6, weeksCounted: 4, changePoints: 41.7 });
    expect(x.laps).toEqual({ runs: 1, laps: 3, meanLapMs: 28_713 });
    expect(x.after.map((a) => a.laps.meanLapMs)).toEqual([28_333, null, 29_333, null]);
    expect(x.afterLaps).toEqual({ runs: 2, laps: 6, meanLapMs: 28_833 });
    expect(x.lapChangeMs).toBe(120);
    const y = body.items[1];
    expect(y).toMatchObject({ afterGood: 2, afterMarks: 5, changePoints: 40 });
    expect(y.after.map((a) => [a.week, a.needsWork, a.good])).toEqual([
      ['2026-W09', 2, 1],
      ['2026-W10', 1, 1],
      ['2026-W11', 0, 0],
      ['2026-W12', 0, 0],
    ]);
    const z = body.items[0];
    expect(z).toMatchObject({ afterGood: 1, afterMarks: 1, changePoints: 100 });
  });

  it('counts the week in the team’s zone: Sunday 23:30 in Toronto (Monday in UTC) stays in W06', async () => {
    // At N = 3, cue X is stressed in W06 only because the Sunday-night note counts there.
    const res = await followUp(team.head, team.skaterA.id, { from: '2026-W06', to: '2026-W06' }).expect(200);
    expect((res.body as FollowUpReply).items.map((i) => [i.cueId, i.week, i.needsWork])).toEqual([[cueX, '2026-W06', 3]]);
    // And the week after holds one "needs work", not two.
    expect((res.body as FollowUpReply).items[0].after[0]).toMatchObject({ week: '2026-W07', needsWork: 1, good: 2 });
  });

  it('a higher threshold keeps only the cue that reached it; threshold 1 finds every week with a "needs work"', async () => {
    const four = (await followUp(team.head, team.skaterA.id, { threshold: '4' }).expect(200)).body as FollowUpReply;
    expect(four.items.map((i) => [i.cueId, i.week])).toEqual([[cueY, '2026-W08']]);
    const one = (await followUp(team.head, team.skaterA.id, { threshold: '1' }).expect(200)).body as FollowUpReply;
    // X: W06, W07, W10; Y: W08, W09, W10; Z: W10.
    expect(one.items.map((i) => `${i.week} ${i.cueId === cueX ? 'X' : i.cueId === cueY ? 'Y' : 'Z'}`)).toEqual([
      '2026-W10 X',
      '2026-W10 Y',
      '2026-W10 Z',
      '2026-W09 Y',
      '2026-W08 Y',
      '2026-W07 X',
      '2026-W06 X',
    ]);
  });

  it('skater B: stressed in W07 with nothing after is not enough data, and no lap basis', async () => {
    const body = (await followUp(team.coach, team.skaterB.id).expect(200)).body as FollowUpReply;
    expect(body.lapBasis).toBeNull();
    expect(body.items).toHaveLength(1);
    expect(body.items[0]).toMatchObject({ cueId: cueX, week: '2026-W07', needsWork: 3, verdict: 'not enough data', afterMarks: 0, changePoints: null });
    expect(body.items[0].laps).toEqual({ runs: 0, laps: 0, meanLapMs: null });
  });
});

describe('the whole group (coaches only)', () => {
  it('lists every skater with a stressed cue, by name, each with the figures of their own view', async () => {
    const body = (await review(server.app, team.coach, team.teamId, 'groups/all/follow-up', range).expect(200)).body as GroupFollowUpReply;
    expect(body).toMatchObject({ group: 'all', threshold: 3, from: '2026-W06', to: '2026-W10', timeZone: 'America/Toronto' });
    expect(body.skaters.map((s) => [s.displayName, s.items.map((i) => `${i.week} ${i.verdict}`)])).toEqual([
      ['Hidde Vlakijs', ['2026-W07 not enough data']],
      ['Wietske Rondbaan', ['2026-W10 not enough data', '2026-W08 persisting', '2026-W06 fading']],
    ]);
    const own = (await followUp(team.head, team.skaterA.id).expect(200)).body as FollowUpReply;
    const a = body.skaters[1];
    expect(a.lapBasis).toEqual(own.lapBasis);
    expect(a.items).toEqual(own.items);
    // 'none' (skaters in no group) is everyone here; at N = 4 only Wietske's W08 is left.
    const none = (await review(server.app, team.head, team.teamId, 'groups/none/follow-up', { ...range, threshold: '4' }).expect(200))
      .body as GroupFollowUpReply;
    expect(none.skaters.map((s) => [s.displayName, s.items.map((i) => i.week)])).toEqual([['Wietske Rondbaan', ['2026-W08']]]);
  });

  it.each([
    ['skater', 403],
    ['guardian', 403],
    ['otherHead', 404],
  ] as const)('%s: %i', async (who, status) => {
    const as = { skater: team.skaterAccount, guardian: team.guardian, otherHead: other.head }[who];
    expectError(await review(server.app, as, team.teamId, 'groups/all/follow-up', range), status);
  });

  it('a group that is not the team’s is 404; a bad threshold 400', async () => {
    expectError(await review(server.app, team.head, team.teamId, 'groups/0190a0b0-0000-7000-8000-0000000000d1/follow-up', range), 404);
    expectError(await review(server.app, team.head, team.teamId, 'groups/some/follow-up', range), 404);
    const bad = await review(server.app, team.head, team.teamId, 'groups/all/follow-up', { threshold: '99' });
    expectError(bad, 400, 'validation');
    expect(Object.keys(bad.body.error.fields)).toEqual(['threshold']);
  });
});

describe('bad input', () => {
  it.each([
    [{ threshold: '0' }, 'threshold'],
    [{ threshold: '21' }, 'threshold'],
    [{ threshold: 'lots' }, 'threshold'],
    [{ from: '2026-W54' }, 'from'],
    [{ from: '2026-W10', to: '2026-W06' }, 'from'],
    [{ colour: 'red' }, ''],
  ])('%j is a 400 naming %s', async (query, field) => {
    const res = await followUp(team.head, team.skaterA.id, query);
    expectError(res, 400, 'validation');
    if (field) expect(Object.keys(res.body.error.fields ?? {})).toEqual([field]);
    expect(res.body.error.message).toMatch(field || /colour/);
  });

  it('weeks at the end of the years the server counts (2100) answer, their follow-up still to come', async () => {
    const body = (await followUp(team.head, team.skaterA.id, { from: '2100-W40', to: '2100-W52' }).expect(200)).body as FollowUpReply;
    expect(body).toMatchObject({ from: '2100-W40', to: '2100-W52', items: [], lapBasis: null });
    // The same weeks in the other views (server/services/review/range.ts), and a range asked for by its start alone.
    const weeks = await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/weeks`, { from: '2100-W40', to: '2100-W52' }).expect(200);
    expect(weeks.body.weeks).toHaveLength(13);
    const fromOnly = await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/runs-by-week`, { from: '2100-W50' }).expect(200);
    expect(fromOnly.body.weeks).toEqual(['2100-W50', '2100-W51', '2100-W52']);
  });

  it('a skater id that is not a UUID is 404', async () => {
    expectError(await review(server.app, team.head, team.teamId, 'skaters/nobody/follow-up'), 404);
  });
});

type Who = 'head' | 'coach' | 'skater' | 'guardian' | 'otherHead' | 'otherSkater';
const account = (who: Who): Account =>
  ({ head: team.head, coach: team.coach, skater: team.skaterAccount, guardian: team.guardian, otherHead: other.head, otherSkater: other.skaterAccount })[who];
type Route = 'follow-up A' | 'follow-up B' | 'runs A' | 'runs B';
const get = (who: Who, route: Route) => {
  const skater = route.endsWith('A') ? team.skaterA.id : team.skaterB.id;
  const path = route.startsWith('follow-up') ? 'follow-up' : 'runs-by-week';
  return review(server.app, account(who), team.teamId, `skaters/${skater}/${path}`, range);
};

describe('who sees what', () => {
  const table: [Who, Route, number][] = [
    ...(['head', 'coach'] as const).flatMap((who) => (['follow-up A', 'follow-up B', 'runs A', 'runs B'] as const).map((r): [Who, Route, number] => [who, r, 200])),
    ['skater', 'follow-up A', 200],
    ['skater', 'runs A', 200],
    ['skater', 'follow-up B', 404],
    ['skater', 'runs B', 404],
    ['guardian', 'follow-up B', 200],
    ['guardian', 'runs B', 200],
    ['guardian', 'follow-up A', 404],
    ['guardian', 'runs A', 404],
    ...(['otherHead', 'otherSkater'] as const).flatMap((who) => (['follow-up A', 'follow-up B', 'runs A', 'runs B'] as const).map((r): [Who, Route, number] => [who, r, 404])),
  ];
  it.each(table)('%s, %s: %i', async (who, route, status) => {
    const res = await get(who, route);
    if (status === 200) expect(res.status).toBe(200);
    else expectError(res, status);
  });

  it('another team’s skater id is 404 even for a coach, and no sign-in is 401', async () => {
    expectError(await followUp(team.head, other.skaterA.id), 404);
    expectError(await followUp(other.head, other.skaterA.id, {}, team.teamId), 404);
    const res = await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/${team.skaterA.id}/follow-up`);
    expectError(res, 401);
  });

  it('the skater reads the same figures as the coach for their own weeks', async () => {
    const coach = (await followUp(team.head, team.skaterA.id).expect(200)).body;
    const own = (await followUp(team.skaterAccount, team.skaterA.id).expect(200)).body;
    expect(own).toEqual(coach);
  });
});

describe('runs by week', () => {
  it('lists the skater’s finished runs in the weeks with their crossings, newest first, not the stopped one', async () => {
    const body = (await review(server.app, team.skaterAccount, team.teamId, `skaters/${team.skaterA.id}/runs-by-week`, range).expect(200))
      .body as RunsByWeekReply;
    expect(body.weeks).toEqual(['2026-W06', '2026-W07', '2026-W08', '2026-W09', '2026-W10']);
    expect(body.runs.map((r) => [r.day, r.week, r.distanceM, r.status, r.crossings.length])).toEqual([
      ['2026-02-25', '2026-W09', 1500, 'finished', 4],
      ['2026-02-12', '2026-W07', 500, 'finished', 2],
      ['2026-02-11', '2026-W07', 1500, 'finished', 4],
      ['2026-02-04', '2026-W06', 1500, 'finished', 4],
    ]);
    expect(body.runs[3].crossings.map((c) => c.atMs)).toEqual([25_310, 54_020, 82_900, 111_450]);
    // The guardian of B sees B's (none), never A's.
    const b = (await review(server.app, team.guardian, team.teamId, `skaters/${team.skaterB.id}/runs-by-week`, range).expect(200)).body;
    expect(b.runs).toEqual([]);
  });

  it('a deleted crossing is left out', async () => {
    const dev = team.headDevice;
    const run = runCreate(dev, { skaterId: team.skaterB.id, day: '2026-03-04', distanceM: 500, extra: { status: 'finished' } });
    const keep = crossingCreate(dev, run.recordId, 10_500);
    const gone = crossingCreate(dev, run.recordId, 12_000);
    const last = crossingCreate(dev, run.recordId, 39_000);
    await pushOk(server.app, dev, team.teamId, [run, keep, gone, last]);
    await pushOk(server.app, dev, team.teamId, [remove(dev, 'crossings', gone.recordId)]);
    const body = (await review(server.app, team.head, team.teamId, `skaters/${team.skaterB.id}/runs-by-week`, range).expect(200)).body as RunsByWeekReply;
    expect(body.runs.map((r) => r.crossings.map((c) => c.atMs))).toEqual([[10_500, 39_000]]);
  });
});
