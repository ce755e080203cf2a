/**
 * The clock's tables through the real push and pull (PostgreSQL): runs, crossings and targets
 * round-trip; the authorization matrix for them (a skater sees only their own runs, crossings and
 * targets, a guardian the linked skater's, another team nothing; a skater or guardian writes none
 * of them; a coach cannot change another coach's run or its crossings, the head coach can);
 * hostile values refused per op with the rest of the batch applied; two coaches timing the two
 * sides of a pair without a conflict; deterministic target ids merging per field; tombstones of
 * runs and crossings purged and remembered.
 */
import { v7 as uuidv7 } from 'uuid';
import { targetIdFor } from '../../shared/schemas/clock';
import type { Op, PullReply } from '../../shared/schemas/sync';
import { purgeTombstones } from '../../server/services/sync/purge';
import { expectError, startTestServer, type TestServer } from './helpers';
import { crossingCreate, runCreate, targetSet } from './support/clock-ops';
import { device, latest, makeTeam, pull, pullAll, pushOk, remove, upsert, userIdOf, type SyncTeam } from './sync-helpers';

let server: TestServer;
let a: SyncTeam;
let b: SyncTeam;
/** Team A: the coach's pair (skater A inner, skater B outer) with crossings, and a target per skater. */
let runA: Op;
let runB: Op;
let crossingsA: Op[];
let crossingsB: Op[];
let targetA: Op;
let targetB: Op;

beforeAll(async () => {
  server = await startTestServer();
  [a, b] = await Promise.all([makeTeam(server.app, 'clkA'), makeTeam(server.app, 'clkB', { people: false })]);
  const coach = device(a.coach);
  const heatId = uuidv7();
  runA = runCreate(coach, { heatId, skaterId: a.skaterA.id, lane: 'inner' });
  runB = runCreate(coach, { heatId, skaterId: a.skaterB.id, lane: 'outer' });
  crossingsA = [25_310, 54_020, 82_900, 111_450].map((atMs) => crossingCreate(coach, runA.recordId, atMs));
  crossingsB = [25_610, 54_500].map((atMs) => crossingCreate(coach, runB.recordId, atMs));
  targetA = targetSet(coach, { teamId: a.teamId, skaterId: a.skaterA.id, targetMs: 112_000 });
  targetB = targetSet(coach, { teamId: a.teamId, skaterId: a.skaterB.id, targetMs: 118_000 });
  const reply = await pushOk(server.app, coach, a.teamId, [runA, runB, ...crossingsA, ...crossingsB, targetA, targetB]);
  expect(reply.results.map((r) => r.status)).toEqual(Array(reply.results.length).fill('applied'));
});
afterAll(() => server.close());

const row = async (table: string, id: string) =>
  ((await server.dataSource.query(`SELECT * FROM ${table} WHERE team_id = $1 AND id = $2`, [a.teamId, id])) as Record<string, unknown>[])[0];
const ids = (p: { changes: PullReply['changes'] }, table: string) => p.changes.filter((c) => c.table === table).map((c) => c.id).sort();
const sorted = (ops: Op[]) => ops.map((o) => o.recordId).sort();
const outcome = (r: { status: string; reason?: string }) => (r.status === 'applied' ? 'applied' : r.reason);

describe('push and pull', () => {
  it('a coach pulls the runs, crossings and targets as pushed, with the server’s author and name', async () => {
    const all = await pullAll(server.app, a.head, a.teamId);
    expect(ids(all, 'runs')).toEqual(sorted([runA, runB]));
    expect(ids(all, 'crossings')).toEqual(sorted([...crossingsA, ...crossingsB]));
    expect(ids(all, 'targets')).toEqual(sorted([targetA, targetB]));
    const state = latest(all);
    expect(state.get(`runs:${runA.recordId}`)).toEqual({
      ...runA.fields,
      // The server writes the author's name from the account, whatever the device sent.
      authorName: a.coach.session.user.displayName,
    });
    expect(state.get(`crossings:${crossingsA[2].recordId}`)).toEqual(crossingsA[2].fields);
    expect(state.get(`targets:${targetA.recordId}`)).toEqual(targetA.fields);
    const stored = await row('runs', runA.recordId);
    expect(stored).toMatchObject({ created_by: userIdOf(a.coach), status: 'running', distance_m: 1500, server_seq: expect.any(String) });
  });

  it('a run’s later edits merge per field and come down to the other devices', async () => {
    const coach = device(a.coach);
    const head = device(a.head);
    const run = runCreate(coach, { skaterId: a.skaterA.id, distanceM: 500 });
    await pushOk(server.app, coach, a.teamId, [run]);
    const before = await pullAll(server.app, a.head, a.teamId);
    await pushOk(server.app, coach, a.teamId, [upsert(coach, 'runs', run.recordId, { status: 'finished' })]);
    await pushOk(server.app, head, a.teamId, [upsert(head, 'runs', run.recordId, { note: 'Strong last lap' })]);
    const since = await pullAll(server.app, a.head, a.teamId, before.cursor);
    expect(latest(since).get(`runs:${run.recordId}`)).toMatchObject({ status: 'finished', note: 'Strong last lap', distanceM: 500 });
  });
});

describe('who may read', () => {
  it('skater A gets only their own runs, crossings and targets', async () => {
    const mine = await pullAll(server.app, a.skaterAccount, a.teamId);
    const own = (await server.dataSource.query(`SELECT id FROM runs WHERE team_id = $1 AND skater_id = $2`, [a.teamId, a.skaterA.id])) as { id: string }[];
    expect(ids(mine, 'runs')).toEqual(own.map((r) => r.id).sort());
    expect(ids(mine, 'runs')).toContain(runA.recordId);
    expect(ids(mine, 'crossings')).toEqual(sorted(crossingsA));
    expect(ids(mine, 'targets')).toEqual([targetA.recordId]);
    const text = JSON.stringify(mine.pages);
    for (const leak of [runB.recordId, targetB.recordId, ...crossingsB.map((c) => c.recordId), a.skaterB.id]) expect(text).not.toContain(leak);
  });

  it("the guardian of skater B gets the linked skater's, nothing of A's", async () => {
    const theirs = await pullAll(server.app, a.guardian, a.teamId);
    expect(ids(theirs, 'runs')).toEqual([runB.recordId]);
    expect(ids(theirs, 'crossings')).toEqual(sorted(crossingsB));
    expect(ids(theirs, 'targets')).toEqual([targetB.recordId]);
    const text = JSON.stringify(theirs.pages);
    for (const leak of [runA.recordId, targetA.recordId, ...crossingsA.map((c) => c.recordId)]) expect(text).not.toContain(leak);
  });

  it('another team gets nothing: 404 on team A, and its own pull holds none of A’s clock rows', async () => {
    expectError(await pull(server.app, b.head, a.teamId), 404, 'not_found');
    const own = await pullAll(server.app, b.head, b.teamId);
    const text = JSON.stringify(own.pages);
    for (const op of [runA, runB, ...crossingsA, targetA]) expect(text).not.toContain(op.recordId);
  });

  it("a crossing deleted on another skater's run is not even a tombstone for skater A", async () => {
    const start = await pullAll(server.app, a.skaterAccount, a.teamId);
    const coach = device(a.coach);
    const extra = crossingCreate(coach, runB.recordId, 83_000);
    await pushOk(server.app, coach, a.teamId, [extra]);
    await pushOk(server.app, coach, a.teamId, [remove(coach, 'crossings', extra.recordId)]);
    const since = await pullAll(server.app, a.skaterAccount, a.teamId, start.cursor);
    expect(JSON.stringify(since.pages)).not.toContain(extra.recordId);
    const guardian = await pullAll(server.app, a.guardian, a.teamId);
    expect(guardian.tombstones.map((t) => t.id)).toContain(extra.recordId);
  });
});

describe('who may write', () => {
  it('the matrix: skaters and guardians write none of it; a coach only their own runs and crossings; the head coach any', async () => {
    const head = device(a.head);
    const coach = device(a.coach);
    const skater = device(a.skaterAccount);
    const guardian = device(a.guardian);
    const headRun = runCreate(head, { skaterId: a.skaterA.id });
    await pushOk(server.app, head, a.teamId, [headRun, crossingCreate(head, headRun.recordId, 30_000)]);
    const headCrossing = crossingCreate(head, headRun.recordId, 60_000);
    await pushOk(server.app, head, a.teamId, [headCrossing]);
    const cases: { who: typeof head; op: Op; expected: string }[] = [
      // Skaters and guardians: nothing of the clock, not even for their own skater.
      { who: skater, op: runCreate(skater, { skaterId: a.skaterA.id }), expected: 'permission' },
      { who: skater, op: crossingCreate(skater, runA.recordId, 140_000), expected: 'permission' },
      { who: skater, op: upsert(skater, 'runs', runA.recordId, { note: 'felt good' }), expected: 'permission' },
      { who: skater, op: upsert(skater, 'crossings', crossingsA[0].recordId, { atMs: 25_000 }), expected: 'permission' },
      { who: skater, op: remove(skater, 'crossings', crossingsA[1].recordId), expected: 'permission' },
      { who: skater, op: targetSet(skater, { teamId: a.teamId, skaterId: a.skaterA.id, targetMs: 100_000 }), expected: 'permission' },
      { who: guardian, op: runCreate(guardian, { skaterId: a.skaterB.id }), expected: 'permission' },
      { who: guardian, op: upsert(guardian, 'runs', runB.recordId, { status: 'stopped' }), expected: 'permission' },
      { who: guardian, op: targetSet(guardian, { teamId: a.teamId, skaterId: a.skaterB.id, targetMs: 100_000 }), expected: 'permission' },
      // A coach and the head coach's run: no edit, no crossing added, changed or deleted.
      { who: coach, op: upsert(coach, 'runs', headRun.recordId, { status: 'finished' }), expected: 'permission' },
      { who: coach, op: remove(coach, 'runs', headRun.recordId), expected: 'permission' },
      { who: coach, op: crossingCreate(coach, headRun.recordId, 90_000), expected: 'permission' },
      { who: coach, op: upsert(coach, 'crossings', headCrossing.recordId, { atMs: 59_000 }), expected: 'permission' },
      { who: coach, op: remove(coach, 'crossings', headCrossing.recordId), expected: 'permission' },
      // A run in someone else's name is refused.
      { who: coach, op: runCreate(coach, { skaterId: a.skaterA.id, extra: { createdBy: userIdOf(a.head) } }), expected: 'permission' },
      // The coach's own, and the head coach on the coach's run.
      { who: coach, op: upsert(coach, 'runs', runA.recordId, { note: 'Opener too fast' }), expected: 'applied' },
      { who: coach, op: upsert(coach, 'crossings', crossingsA[3].recordId, { handTimed: true }), expected: 'applied' },
      { who: head, op: upsert(head, 'runs', runB.recordId, { status: 'stopped', stopReason: 'Fell in the last curve' }), expected: 'applied' },
      { who: head, op: crossingCreate(head, runB.recordId, 83_200, { handTimed: true }), expected: 'applied' },
      { who: head, op: upsert(head, 'crossings', crossingsB[1].recordId, { atMs: 54_480 }), expected: 'applied' },
      // Any coach sets targets (one record per skater, track and distance).
      { who: coach, op: targetSet(coach, { teamId: a.teamId, skaterId: a.skaterA.id, distanceM: 500, targetMs: 41_000 }), expected: 'applied' },
    ];
    const snapshot = async () =>
      JSON.stringify([
        await server.dataSource.query(`SELECT id, status, note, deleted_at FROM runs WHERE team_id = $1 AND id = $2`, [a.teamId, headRun.recordId]),
        await server.dataSource.query(`SELECT id, at_ms, deleted_at FROM crossings WHERE team_id = $1 AND run_id = $2 ORDER BY id`, [a.teamId, headRun.recordId]),
      ]);
    const before = await snapshot();
    for (const [index, c] of cases.entries()) {
      const reply = await pushOk(server.app, c.who, a.teamId, [c.op]);
      expect({ index, outcome: outcome(reply.results[0]), message: reply.results[0].message ?? '' }).toEqual({ index, outcome: c.expected, message: expect.any(String) });
    }
    // Nothing a refused op named changed; the applied ones stand.
    expect(await snapshot()).toBe(before);
    expect(await row('runs', runA.recordId)).toMatchObject({ note: 'Opener too fast' });
    expect(await row('runs', runB.recordId)).toMatchObject({ status: 'stopped', stop_reason: 'Fell in the last curve' });
    expect(await row('crossings', crossingsB[1].recordId)).toMatchObject({ at_ms: 54_480 });
    const refusedRuns = await server.dataSource.query(`SELECT count(*)::int AS n FROM runs WHERE team_id = $1 AND created_by <> ALL($2::uuid[])`, [
      a.teamId,
      [userIdOf(a.head), userIdOf(a.coach)],
    ]);
    expect(refusedRuns[0].n).toBe(0);
  });

  it('says who may change a crossing, in words', async () => {
    const head = device(a.head);
    const coach = device(a.coach);
    const headRun = runCreate(head, { skaterId: a.skaterB.id });
    await pushOk(server.app, head, a.teamId, [headRun]);
    const reply = await pushOk(server.app, coach, a.teamId, [crossingCreate(coach, headRun.recordId, 30_000)]);
    expect(reply.results[0].message).toBe('Only the coach who timed this run or the head coach may add its crossings');
  });
});

describe('hostile values', () => {
  it('each bad op is refused with its reason; the rest of the batch is applied', async () => {
    const coach = device(a.coach);
    const run = runCreate(coach, { skaterId: a.skaterA.id });
    const good = [run, crossingCreate(coach, run.recordId, 30_000), crossingCreate(coach, run.recordId, 86_400_000)];
    const bad: [string, Op, RegExp][] = [
      ['NUL in a run note', upsert(coach, 'runs', runA.recordId, { note: 'late\u0000start' }), /control characters/],
      ['NUL in a stop reason', upsert(coach, 'runs', runA.recordId, { stopReason: 'fell\u0000' }), /control characters/],
      ['a field named constructor', upsert(coach, 'runs', runA.recordId, { constructor: 'x' }), /constructor is not a field of runs/],
      ['a field named toString on a crossing', upsert(coach, 'crossings', crossingsA[0].recordId, { toString: 1 }), /toString is not a field of crossings/],
      ['atMs -1', crossingCreate(coach, run.recordId, -1), /atMs must be at least 0/],
      ['atMs one day and a ms', crossingCreate(coach, run.recordId, 86_400_001), /atMs must be at most 86400000/],
      ['atMs 1.5', crossingCreate(coach, run.recordId, 1.5), /whole milliseconds/],
      ['atMs as text', crossingCreate(coach, run.recordId, '30000' as unknown as number), /atMs/],
      ['a start offset of 5001 ms', upsert(coach, 'runs', runA.recordId, { startOffsetMs: 5001 }), /startOffsetMs must be at most 5000/],
      ['450 m on long track', runCreate(coach, { skaterId: a.skaterA.id, distanceM: 450 }), /multiple of 100 m on long track/],
      ['101 km', runCreate(coach, { skaterId: a.skaterA.id, distanceM: 100_100 }), /at most 100000/],
      ['an unknown lane', runCreate(coach, { skaterId: a.skaterA.id, lane: 'middle' as 'inner' }), /lane must be inner, outer or group/],
      ['a run of a skater of another team', runCreate(coach, { skaterId: b.skaterA.id }), /no such skater/],
      ['a crossing of a run that does not exist', crossingCreate(coach, uuidv7(), 30_000), /no such run/],
      ['the year 0 as a start', runCreate(coach, { skaterId: a.skaterA.id, extra: { startedAt: '0000-01-01T00:00:00.000Z' } }), /startedAt must be between 2000 and 2100/],
      [
        'shares summing to 99',
        targetSet(coach, { teamId: a.teamId, skaterId: a.skaterB.id, extra: { plan: 'shares', sharesPct: [24, 25, 25, 25] } }),
        /sharesPct must sum to 100/,
      ],
      [
        'two shares for four sections',
        targetSet(coach, { teamId: a.teamId, skaterId: a.skaterB.id, extra: { plan: 'shares', sharesPct: [50, 50] } }),
        /one share per section: 4 for 1500 m long track/,
      ],
      ['a share over 100', targetSet(coach, { teamId: a.teamId, skaterId: a.skaterB.id, extra: { plan: 'shares', sharesPct: [101, -1, 0, 0] } }), /0 to 100 percent/],
      ['an even plan with shares', targetSet(coach, { teamId: a.teamId, skaterId: a.skaterB.id, extra: { sharesPct: [25, 25, 25, 25] } }), /even plan has no sharesPct/],
      ['a target under another id', targetSet(coach, { teamId: a.teamId, skaterId: a.skaterB.id, id: uuidv7() }), /derived from its team, skater, track and distance/],
      ['a delete of a target', remove(coach, 'targets', targetA.recordId), /targets are never deleted/],
    ];
    const reply = await pushOk(server.app, coach, a.teamId, [good[0], ...bad.map(([, op]) => op), ...good.slice(1)]);
    const byId = new Map(reply.results.map((r) => [r.opId, r]));
    for (const [what, op, message] of bad) {
      const result = byId.get(op.opId)!;
      expect({ what, status: result.status, reason: result.reason }).toEqual({ what, status: 'rejected', reason: 'validation' });
      expect({ what, message: result.message }).toEqual({ what, message: expect.stringMatching(message) });
    }
    for (const op of good) expect(byId.get(op.opId)!.status).toBe('applied');
    // The refused values never reached a row; the good ones did.
    expect(await row('runs', runA.recordId)).toMatchObject({ start_offset_ms: 0 });
    expect(String((await row('runs', runA.recordId)).note)).not.toContain('\u0000');
    expect((await row('targets', targetA.recordId)).deleted_at).toBeNull();
    const crossings = (await server.dataSource.query(`SELECT at_ms FROM crossings WHERE team_id = $1 AND run_id = $2 ORDER BY at_ms`, [a.teamId, run.recordId])) as {
      at_ms: number;
    }[];
    expect(crossings.map((c) => c.at_ms)).toEqual([30_000, 86_400_000]);
    // The next sync of the same device goes on as usual.
    expect((await pushOk(server.app, coach, a.teamId, [upsert(coach, 'runs', run.recordId, { status: 'finished' })])).results[0].status).toBe('applied');
  });

  it('a value that slips past the rules is refused by the database for its op alone (the CHECKs mirror the rules)', async () => {
    // Straight SQL, as a broken writer would: every CHECK answers with its name.
    const attempts: [string, string][] = [
      ['ck_crossings_at', `UPDATE crossings SET at_ms = 86400001 WHERE team_id = $1 AND id = '${crossingsA[0].recordId}'`],
      ['ck_runs_start_offset', `UPDATE runs SET start_offset_ms = -1 WHERE team_id = $1 AND id = '${runA.recordId}'`],
      ['ck_runs_distance', `UPDATE runs SET distance_m = 450 WHERE team_id = $1 AND id = '${runA.recordId}'`],
      ['ck_targets_shares', `UPDATE targets SET plan = 'shares', shares_pct = '[24, 25, 25, 25]' WHERE team_id = $1 AND id = '${targetA.recordId}'`],
      ['ck_targets_shares', `UPDATE targets SET plan = 'shares', shares_pct = '["25", 25, 25, 25]' WHERE team_id = $1 AND id = '${targetA.recordId}'`],
      ['ck_targets_plan_fields', `UPDATE targets SET plan = 'shares' WHERE team_id = $1 AND id = '${targetA.recordId}'`],
      ['uq_targets_skater_distance', `INSERT INTO targets (team_id, id, skater_id, distance_m, track, target_ms, updated_by, server_seq) SELECT team_id, gen_random_uuid(), skater_id, distance_m, track, 1, updated_by, 0 FROM targets WHERE team_id = $1 AND id = '${targetA.recordId}'`],
    ];
    for (const [constraint, sql] of attempts) {
      const error = await server.dataSource.query(sql, [a.teamId]).then(() => null, (e: { driverError?: { constraint?: string } }) => e);
      expect({ sql, constraint: error?.driverError?.constraint }).toEqual({ sql, constraint });
    }
    await server.dataSource.query(`UPDATE targets SET plan = 'shares', shares_pct = '[22.1, 24.6, 26.2, 27.1]' WHERE team_id = $1 AND id = $2`, [a.teamId, targetA.recordId]);
    await server.dataSource.query(`UPDATE targets SET plan = 'even', shares_pct = NULL WHERE team_id = $1 AND id = $2`, [a.teamId, targetA.recordId]);
  });
});

describe('two coaches at the boards', () => {
  it('each times one side of the pair: both runs and every crossing are applied, no conflict, each device pulls the other’s', async () => {
    const head = device(a.head);
    const coach = device(a.coach);
    const heatId = uuidv7();
    const inner = runCreate(head, { heatId, skaterId: a.skaterA.id, lane: 'inner' });
    const outer = runCreate(coach, { heatId, skaterId: a.skaterB.id, lane: 'outer' });
    const innerTimes = [25_310, 54_020, 82_900, 111_450];
    const outerTimes = [25_610, 54_500, 83_700, 112_300];
    const innerOps = innerTimes.map((t) => crossingCreate(head, inner.recordId, t));
    const outerOps = outerTimes.map((t) => crossingCreate(coach, outer.recordId, t));
    const cursor = (await pullAll(server.app, a.head, a.teamId)).cursor;
    // Offline on both sides, then both push, interleaved, and finish their own runs.
    await pushOk(server.app, coach, a.teamId, [outer, ...outerOps.slice(0, 2)]);
    await pushOk(server.app, head, a.teamId, [inner, ...innerOps]);
    await pushOk(server.app, coach, a.teamId, [...outerOps.slice(2), upsert(coach, 'runs', outer.recordId, { status: 'finished' })]);
    const finish = await pushOk(server.app, head, a.teamId, [upsert(head, 'runs', inner.recordId, { status: 'finished' })]);
    expect(finish.results[0].status).toBe('applied');
    for (const who of [a.head, a.coach]) {
      const seen = latest(await pullAll(server.app, who, a.teamId, cursor));
      expect(seen.get(`runs:${inner.recordId}`)).toMatchObject({ heatId, status: 'finished', createdBy: userIdOf(a.head) });
      expect(seen.get(`runs:${outer.recordId}`)).toMatchObject({ heatId, status: 'finished', createdBy: userIdOf(a.coach) });
      const times = (run: Op) =>
        [...seen.entries()]
          .filter(([key, value]) => key.startsWith('crossings:') && value !== 'deleted' && value.runId === run.recordId)
          .map(([, value]) => (value as { atMs: number }).atMs)
          .sort((x, y) => x - y);
      expect(times(inner)).toEqual(innerTimes);
      expect(times(outer)).toEqual(outerTimes);
    }
  });

  it('both set the same target offline: one record, the newer value per field wins', async () => {
    // The coach sets it a second before the head coach (device clocks pinned).
    const t = Date.now();
    const head = device(a.head, () => t);
    const coach = device(a.coach, () => t - 1000);
    const id = targetIdFor(a.teamId, a.skaterB.id, 'long', 3000);
    const first = targetSet(coach, { teamId: a.teamId, skaterId: a.skaterB.id, distanceM: 3000, targetMs: 250_000, extra: { note: 'coach' } });
    const second = targetSet(head, { teamId: a.teamId, skaterId: a.skaterB.id, distanceM: 3000, targetMs: 245_000 });
    expect(first.recordId).toBe(id);
    expect(second.recordId).toBe(id);
    // The later setting arrives first; the earlier one loses every field it carries.
    await pushOk(server.app, head, a.teamId, [second]);
    await pushOk(server.app, coach, a.teamId, [first]);
    const rows = await server.dataSource.query(`SELECT id, target_ms, note, updated_by FROM targets WHERE team_id = $1 AND skater_id = $2 AND distance_m = 3000`, [
      a.teamId,
      a.skaterB.id,
    ]);
    expect(rows).toEqual([{ id, target_ms: 245_000, note: '', updated_by: userIdOf(a.head) }]);
  });
});

describe('tombstone retention', () => {
  it('purges old crossing and run tombstones (a run once no crossing row points at it) and remembers them', async () => {
    const team = await makeTeam(server.app, 'clkPurge', { people: false });
    const head = device(team.head);
    const run = runCreate(head, { skaterId: team.skaterA.id });
    const crossing = crossingCreate(head, run.recordId, 30_000);
    await pushOk(server.app, head, team.teamId, [run, crossing]);
    await pushOk(server.app, head, team.teamId, [remove(head, 'crossings', crossing.recordId), remove(head, 'runs', run.recordId)]);
    const future = new Date(Date.now() + 1000);
    const first = await purgeTombstones(server.dataSource, team.teamId, future);
    expect(first.purged).toBe(1); // the crossing; its run still had a row pointing at it
    const second = await purgeTombstones(server.dataSource, team.teamId, future);
    expect(second.purged).toBe(1);
    const left = await server.dataSource.query(`SELECT (SELECT count(*)::int FROM runs WHERE team_id = $1) AS runs, (SELECT count(*)::int FROM crossings WHERE team_id = $1) AS crossings`, [team.teamId]);
    expect(left).toEqual([{ runs: 0, crossings: 0 }]);
    const remembered = await server.dataSource.query(`SELECT tbl FROM sync_tombstones WHERE team_id = $1 ORDER BY tbl`, [team.teamId]);
    expect(remembered.map((r: { tbl: string }) => r.tbl)).toEqual(['crossings', 'runs']);
    // The create sent again (its op id long gone) stays deleted.
    const again = await pushOk(server.app, head, team.teamId, [{ ...run, opId: uuidv7() }]);
    expect(again.results[0].status).toBe('applied');
    expect(await server.dataSource.query(`SELECT id FROM runs WHERE team_id = $1`, [team.teamId])).toEqual([]);
  });
});
