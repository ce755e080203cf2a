/**
 * Lap-time trends (issue #10 §2, §6) against the real PostgreSQL, the runs pushed through sync as
 * the clock writes them. A team in America/Chicago (CDT until 2026-11-01, then CST, UTC-6), with
 * another team's runs present. Skater A's 1500 m long track (splits at 300, 700, 1100, 1500 m):
 *
 *   R1 Tue 2026-10-06 (W41) finished  25.31 54.02 1:22.90 1:51.45  laps 25310 28710 28880 28550
 *   R2 Tue 2026-10-20 (W43) finished  25.10 53.90 1:23.10 1:52.02  laps 25100 28800 29200 28920
 *   R3 Sun 2026-11-08 23:30 local = Mon 05:30 UTC: W45 in Chicago (W46 in UTC)
 *                           finished  24.90 53.40 1:21.95 1:50.60  laps 24900 28500 28550 28650
 *   R4 Tue 2026-11-10 (W46) finished  24.80 53.00 [1:21.00 deleted] 1:49.00: 3 live crossings
 *                           for 4 splits, so partial: laps 24800 28200 56000, no finish, no best
 *   R5 Tue 2026-11-10 (W46) stopped "Fell in the curve"  25.50 54.80  laps 25500 29300
 *   R6 2026-09-15 finished 1:40.00, the run deleted: never counts
 *   and a 500 m (W45, 10.80 39.90) for the distance list, a 1000 m with two crossings at one
 *   instant (no laps can be read); skater B one 1500 m (1:53.00).
 *
 * Bests over complete runs (R1-R3): finish 110600 (R3); opener 24900 (R3), lap 1 28500 (R3),
 * lap 2 28550 (R3), lap 3 28550 (R1: 28550 < R3's 28650). R4's 24800 opener and R4's finish
 * would beat them, but R4 lost a crossing. Target 1:50.00 even pace: 300 m = 110000 x 300/1500 =
 * 22000; 400 m = 29333.3 -> 29333 twice; the last takes the rest, 110000 - 80666 = 29334.
 */
import request from 'supertest';
import type { LapTrend } from '../../shared/schemas/review-laps';
import { weekOf } from '../../shared/weeks';
import { expectError, startTestServer, type Account, type TestServer } from './helpers';
import { makeReviewTeam, review, type ReviewTeam } from './review-helpers';
import { crossingCreate, runCreate, targetSet } from './support/clock-ops';
import { pushOk, remove, type Device } from './sync-helpers';

let server: TestServer;
let team: ReviewTeam;
let other: ReviewTeam;
const ids: Record<string, string> = {};
let deletedCrossing = '';

interface RunSeed {
  skaterId: string;
  startedAt: string;
  day: string;
  crossings: number[];
  status?: 'finished' | 'stopped' | 'running';
  stopReason?: string;
  distanceM?: number;
}

/** Pushes one run and its crossings; returns the run id and the crossing ids. */
async function pushRun(t: ReviewTeam, dev: Device, seed: RunSeed) {
  const run = runCreate(dev, {
    skaterId: seed.skaterId,
    day: seed.day,
    distanceM: seed.distanceM ?? 1500,
    extra: { startedAt: seed.startedAt, status: seed.status ?? 'finished', stopReason: seed.stopReason ?? '' },
  });
  const crossings = seed.crossings.map((atMs) => crossingCreate(dev, run.recordId, atMs));
  const reply = await pushOk(server.app, dev, t.teamId, [run, ...crossings]);
  expect(reply.results.map((r) => r.status)).toEqual(Array(reply.results.length).fill('applied'));
  return { runId: run.recordId, crossingIds: crossings.map((c) => c.recordId) };
}

const laps = (who: Account, skaterId: string, query: Record<string, string> = {}, t: ReviewTeam = team) =>
  review(server.app, who, t.teamId, `skaters/${skaterId}/laps`, query);
const RANGE = { from: '2026-W38', to: '2026-W49' };

beforeAll(async () => {
  server = await startTestServer();
  team = await makeReviewTeam(server.app, server.dataSource, 'revlaps', { timeZone: 'America/Chicago' });
  other = await makeReviewTeam(server.app, server.dataSource, 'revlapsother', { timeZone: 'America/Chicago' });
  const dev = team.coachDevice;
  const A = team.skaterA.id;
  ids.r1 = (await pushRun(team, dev, { skaterId: A, startedAt: '2026-10-06T16:00:00.000Z', day: '2026-10-06', crossings: [25_310, 54_020, 82_900, 111_450] })).runId;
  ids.r2 = (await pushRun(team, dev, { skaterId: A, startedAt: '2026-10-20T16:00:00.000Z', day: '2026-10-20', crossings: [25_100, 53_900, 83_100, 112_020] })).runId;
  ids.r3 = (await pushRun(team, dev, { skaterId: A, startedAt: '2026-11-09T05:30:00.000Z', day: '2026-11-08', crossings: [24_900, 53_400, 81_950, 110_600] })).runId;
  const r4 = await pushRun(team, dev, { skaterId: A, startedAt: '2026-11-10T17:00:00.000Z', day: '2026-11-10', crossings: [24_800, 53_000, 81_000, 109_000] });
  ids.r4 = r4.runId;
  deletedCrossing = r4.crossingIds[2];
  ids.r5 = (
    await pushRun(team, dev, {
      skaterId: A,
      startedAt: '2026-11-10T18:00:00.000Z',
      day: '2026-11-10',
      crossings: [25_500, 54_800],
      status: 'stopped',
      stopReason: 'Fell in the curve',
    })
  ).runId;
  ids.r6 = (await pushRun(team, dev, { skaterId: A, startedAt: '2026-09-15T16:00:00.000Z', day: '2026-09-15', crossings: [24_000, 49_000, 74_000, 100_000] })).runId;
  ids.r500 = (
    await pushRun(team, team.headDevice, { skaterId: A, startedAt: '2026-11-03T17:00:00.000Z', day: '2026-11-03', crossings: [10_800, 39_900], distanceM: 500 })
  ).runId;
  // A 1000 m (splits 200, 600, 1000) with two crossings at one instant: no laps can be read.
  ids.r1000 = (
    await pushRun(team, dev, { skaterId: A, startedAt: '2026-09-20T16:00:00.000Z', day: '2026-09-20', crossings: [19_000, 19_000, 80_000], distanceM: 1000 })
  ).runId;
  ids.b1 = (await pushRun(team, dev, { skaterId: team.skaterB.id, startedAt: '2026-10-13T16:00:00.000Z', day: '2026-10-13', crossings: [26_000, 55_000, 84_000, 113_000] })).runId;
  await pushOk(server.app, dev, team.teamId, [
    remove(dev, 'crossings', deletedCrossing),
    // The deleted run's crossings go with it, as the clock deletes them.
    remove(dev, 'runs', ids.r6),
    targetSet(dev, { teamId: team.teamId, skaterId: A, targetMs: 110_000 }),
  ]);
  // The other team: the same skater names, faster runs, in the same weeks.
  await pushRun(other, other.coachDevice, { skaterId: other.skaterA.id, startedAt: '2026-10-06T16:00:00.000Z', day: '2026-10-06', crossings: [20_000, 45_000, 70_000, 95_000] });
});

afterAll(() => server.close());

describe("a skater's 1500 m", () => {
  let body: LapTrend;
  beforeAll(async () => {
    body = (await laps(team.head, team.skaterA.id, { ...RANGE, distanceM: '1500', track: 'long' }).expect(200)).body;
  });

  it('lists the live runs in order with their laps, weeks and days in the team zone', () => {
    expect(body.timeZone).toBe('America/Chicago');
    expect([body.distanceM, body.track, body.splitsAtM, body.openerM]).toEqual([1500, 'long', [300, 700, 1100, 1500], 300]);
    expect(body.weeks).toHaveLength(12); // W38..W49
    expect(body.runs.map((r) => [r.id, r.week, r.day, r.state, r.finishMs])).toEqual([
      [ids.r1, '2026-W41', '2026-10-06', 'complete', 111_450],
      [ids.r2, '2026-W43', '2026-10-20', 'complete', 112_020],
      [ids.r3, '2026-W45', '2026-11-08', 'complete', 110_600],
      [ids.r4, '2026-W46', '2026-11-10', 'partial', null],
      [ids.r5, '2026-W46', '2026-11-10', 'stopped', null],
    ]);
    expect(body.runs[0].lapsMs).toEqual([25_310, 28_710, 28_880, 28_550]);
    expect(body.runs[2].lapsMs).toEqual([24_900, 28_500, 28_550, 28_650]);
    expect(body.runs[0].authorName).toBe('Marit Tweede');
    expect(body.runs[4]).toMatchObject({ status: 'stopped', stopReason: 'Fell in the curve', lapsMs: [25_500, 29_300] });
  });

  it('leaves out a deleted crossing (the run becomes partial) and a deleted run', () => {
    const r4 = body.runs.find((r) => r.id === ids.r4)!;
    expect(r4.crossingsMs).toEqual([24_800, 53_000, 109_000]);
    expect(r4.lapsMs).toEqual([24_800, 28_200, 56_000]);
    expect(body.runs.map((r) => r.id)).not.toContain(ids.r6);
  });

  it('marks the bests over complete runs only, ties and partial runs aside', () => {
    expect(body.bests.finish).toEqual({ runId: ids.r3, day: '2026-11-08', ms: 110_600 });
    expect(body.bests.laps.map((b) => b && [b.runId, b.ms])).toEqual([
      [ids.r3, 24_900],
      [ids.r3, 28_500],
      [ids.r3, 28_550],
      [ids.r1, 28_550],
    ]);
  });

  it('gives the target with its even pace schedule', () => {
    expect(body.target).toEqual({ targetMs: 110_000, plan: 'even', openerMs: null, sectionsMs: [22_000, 29_333, 29_333, 29_334], note: '' });
  });

  it('lists the distances the skater has runs of, the latest first, deleted runs not counted', () => {
    expect(body.distances).toEqual([
      { distanceM: 1500, track: 'long', runs: 5, lastDay: '2026-11-10' },
      { distanceM: 500, track: 'long', runs: 1, lastDay: '2026-11-03' },
      { distanceM: 1000, track: 'long', runs: 1, lastDay: '2026-09-20' },
    ]);
  });
});

describe('weeks in the team zone', () => {
  it('counts a Sunday 23:30 run in its local week, though it is Monday in UTC', async () => {
    const w45 = (await laps(team.coach, team.skaterA.id, { distanceM: '1500', from: '2026-W45', to: '2026-W45' }).expect(200)).body as LapTrend;
    expect(w45.runs.map((r) => r.id)).toEqual([ids.r3]);
    const w46 = (await laps(team.coach, team.skaterA.id, { distanceM: '1500', from: '2026-W46', to: '2026-W46' }).expect(200)).body as LapTrend;
    expect(w46.runs.map((r) => r.id)).toEqual([ids.r4, ids.r5]);
    // Bests are all-time, whatever the range.
    expect(w46.bests.finish?.ms).toBe(110_600);
  });

  it('defaults to the distance run last and to the last 26 weeks', async () => {
    const res = (await laps(team.head, team.skaterA.id).expect(200)).body as LapTrend;
    expect([res.distanceM, res.track]).toEqual([1500, 'long']);
    expect(res.to).toBe(weekOf(Date.now(), 'America/Chicago'));
    expect(res.weeks).toHaveLength(26);
  });

  it('shows the 500 m when asked: opener 100 m, then one lap', async () => {
    const res = (await laps(team.head, team.skaterA.id, { ...RANGE, distanceM: '500' }).expect(200)).body as LapTrend;
    expect(res.splitsAtM).toEqual([100, 500]);
    expect(res.runs.map((r) => [r.lapsMs, r.finishMs, r.state])).toEqual([[[10_800, 29_100], 39_900, 'complete']]);
    expect(res.target).toBeNull();
    expect(res.bests.finish).toMatchObject({ ms: 39_900 });
  });

  it('flags a run with two crossings at one instant: no laps, no finish, no best', async () => {
    const res = (await laps(team.head, team.skaterA.id, { ...RANGE, distanceM: '1000' }).expect(200)).body as LapTrend;
    expect(res.runs.map((r) => [r.id, r.state, r.crossingsMs, r.lapsMs, r.finishMs])).toEqual([[ids.r1000, 'unordered', [19_000, 19_000, 80_000], [], null]]);
    expect(res.bests).toEqual({ finish: null, laps: [null, null, null] });
  });

  it('says "nothing yet" for a distance without runs, and for a skater without any', async () => {
    const none = (await laps(team.head, team.skaterA.id, { ...RANGE, distanceM: '3000' }).expect(200)).body as LapTrend;
    expect([none.runs, none.bests.finish, none.bests.laps]).toEqual([[], null, [null, null, null, null, null, null, null, null]]);
    const fresh = (await laps(other.head, other.skaterB.id, RANGE, other).expect(200)).body as LapTrend;
    expect([fresh.distanceM, fresh.distances, fresh.runs]).toEqual([null, [], []]);
  });
});

describe('who may read which skater', () => {
  type Who = 'head' | 'coach' | 'skater' | 'guardian' | 'otherHead' | 'otherSkater';
  const account = (who: Who): Account =>
    ({ head: team.head, coach: team.coach, skater: team.skaterAccount, guardian: team.guardian, otherHead: other.head, otherSkater: other.skaterAccount })[who];
  const cases: [Who, 'A' | 'B', number][] = [
    ['head', 'A', 200],
    ['head', 'B', 200],
    ['coach', 'A', 200],
    ['coach', 'B', 200],
    ['skater', 'A', 200],
    ['skater', 'B', 404],
    ['guardian', 'B', 200],
    ['guardian', 'A', 404],
    ['otherHead', 'A', 404],
    ['otherHead', 'B', 404],
    ['otherSkater', 'A', 404],
  ];
  it.each(cases)('%s on skater %s: %i', async (who, skater, status) => {
    const skaterId = skater === 'A' ? team.skaterA.id : team.skaterB.id;
    const res = await laps(account(who), skaterId, { ...RANGE, distanceM: '1500' });
    if (status !== 200) return expectError(res, status);
    expect(res.status).toBe(200);
    const finishes = (res.body as LapTrend).runs.map((r) => r.finishMs);
    // Only this team's runs: never the other team's 1:35.00.
    expect(finishes).toEqual(skater === 'A' ? [111_450, 112_020, 110_600, null, null] : [113_000]);
  });

  it("answers 404 for another team's skater asked through one's own team, and for a skater id that is not one", async () => {
    expectError(await laps(team.head, other.skaterA.id, RANGE), 404);
    expectError(await laps(team.head, 'not-a-uuid', RANGE), 404);
  });

  it('answers 401 without a sign-in', async () => {
    expectError(await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/${team.skaterA.id}/laps`), 401);
  });
});

describe('bad queries are 400s naming the field', () => {
  it.each([
    [{ distanceM: 'abc' }, 'distanceM', /whole metres/],
    [{ distanceM: '0' }, 'distanceM', /free laps/],
    [{ distanceM: '1550' }, 'distanceM', /multiple of 100 m on long track/],
    [{ distanceM: '1500', track: 'ice' }, 'track', /long or short/],
    [{ track: 'short' }, 'distanceM', /needed with track/],
    [{ from: '2026-W60' }, 'from', /not a week/],
    [{ from: '2026-W46', to: '2026-W40' }, 'from', /must not be after/],
    [{ from: '2024-W01', to: '2026-W40' }, 'to', /at most 104 weeks/],
  ] as [Record<string, string>, string, RegExp][])('%j: %s', async (query, field, message) => {
    const res = await laps(team.head, team.skaterA.id, query);
    expectError(res, 400, 'validation');
    expect(res.body.error.fields[field]).toMatch(message);
  });

  it('refuses a parameter it does not know', async () => {
    const res = await laps(team.head, team.skaterA.id, { distance: '1500' });
    expectError(res, 400, 'validation');
    expect(res.body.error.message).toMatch(/distance/);
  });

  it('takes short-track distances that are whole half laps', async () => {
    const res = (await laps(team.head, team.skaterA.id, { ...RANGE, distanceM: '777', track: 'short' }).expect(200)).body as LapTrend;
    expect(res.splitsAtM).toHaveLength(7);
    expect(res.runs).toEqual([]);
  });
});
