/**
 * End-to-end sync proofs (shared/SYNC.md "How it is proven"): REAL device stores (DeviceStore on
 * sql.js) running the REAL engine (synchronize) against the REAL server (createApp + PostgreSQL)
 * over HTTP on an ephemeral port, through a transport that drops requests, drops replies after
 * the server committed, delivers requests late and delays both legs (support/device-client.ts).
 * fast-check with fixed seeds; fault injection from seeded RNGs.
 *
 *   1. convergence of 20 clients x 500 ops (coaches, skaters, a device shared by a coach and a
 *      skater; the coaches also time heats: runs, crossings, targets, edited on other devices;
 *      SYNC_PROOF_QUICK=1 shrinks it to 8 x 60 for quick local loops)
 *   2. reply lost after commit: every op applied exactly once
 *   3. two coaches edit the same note offline: the newest edit per field stands
 *   4. create + delete before the first sync never appears anywhere
 *   5. a device clock a year ahead wins none of the later conflicts
 *   6. first pull of 50k rows: pages of 1,000, resumes after a kill mid-way
 *   7. authorization over the engine (skater, guardian, another team's coach)
 */
import fc from 'fast-check';
import { v7 as uuidv7 } from 'uuid';
import { decodeHlc } from '../../shared/hlc';
import type { PushBody, PushReply, PullReply } from '../../shared/schemas/sync';
import { setServerTimeSource } from '../../server/services/sync/clock';
import { synchronize } from '../../sync/engine';
import { SyncError } from '../../sync/errors';
import { TransportError } from '../../sync/transport';
import { startTestServer, type Account, type TestServer } from './helpers';
import { makeTeam, seedObservations, userIdOf, type SyncTeam } from './sync-helpers';
import { describeResult, runConvergence, scheduleArb } from './support/convergence';
import { deviceState, diffTable, listen, openDevice, serverState, type Endpoint, type FaultPolicy, type SimDevice } from './support/device-client';

// Full size by default (shared/SYNC.md: proof 1 runs at 20 x 500 in the test command); the quick
// size keeps every kind of client (8 clients: head coach x2, coaches, a skater, the shared device).
const QUICK = process.env.SYNC_PROOF_QUICK === '1';
const SIZE = QUICK ? { clients: 8, ops: 60, batchSize: 8, pageSize: 50, switchPercent: 10 } : { clients: 20, ops: 500, batchSize: 100, pageSize: 1000, switchPercent: 2 };

let server: TestServer;
let endpoint: Endpoint;
let team: SyncTeam;

beforeAll(async () => {
  server = await startTestServer();
  endpoint = await listen(server.app);
  team = await makeTeam(server.app, 'e2e');
});
afterAll(async () => {
  setServerTimeSource();
  await endpoint.close();
  await server.close();
});

const open = (account: Account, label: string, options: Partial<Parameters<typeof openDevice>[2]> = {}) =>
  openDevice(endpoint, account, { label, teamId: team.teamId, ...options });

/** A device that has loaded the team (its first sync, no faults). */
async function loaded(account: Account, label: string, options: Partial<Parameters<typeof openDevice>[2]> = {}): Promise<SimDevice> {
  const device = await open(account, label, options);
  await device.sync();
  return device;
}

const serverRow = async (id: string) =>
  ((await server.dataSource.query(`SELECT * FROM observations WHERE team_id = $1 AND id = $2`, [team.teamId, id])) as Record<string, unknown>[])[0];

async function deviceRow(device: SimDevice, id: string) {
  const state = await deviceState(device.driver, team.teamId);
  return state.observations.get(id);
}

async function tap(device: SimDevice, extra: { note?: string; skaterIds?: string[]; mark?: 'good' | 'needs_work' } = {}) {
  const cues = await device.store.listCues(team.teamId);
  return device.store.recordObservations({
    teamId: team.teamId,
    userId: device.userId,
    sessionId: team.sessionId,
    skaterIds: extra.skaterIds ?? [team.skaterA.id],
    cueId: cues[0].id,
    mark: extra.mark ?? 'needs_work',
    note: extra.note ?? '',
  });
}

describe('1. convergence', () => {
  it(`${SIZE.clients} clients (coaches timing heats too, skaters, one device shared by a coach and a skater) x ${SIZE.ops} ops, 20% requests and 10% replies lost, late and delayed requests, a quarter of the clocks +/-10 min: every client equals what the server lets its user see; 0 lost, 0 duplicated, 0 resurrected, 0 leaked`, async () => {
    await fc.assert(
      fc.asyncProperty(scheduleArb(SIZE.clients, SIZE.ops), fc.integer({ min: 1, max: 2 ** 30 }), async (steps, faultSeed) => {
        const result = await runConvergence({ app: server.app, dataSource: server.dataSource, endpoint }, steps, {
          clients: SIZE.clients,
          faultSeed,
          batchSize: SIZE.batchSize,
          pageSize: SIZE.pageSize,
          switchPercent: SIZE.switchPercent,
        });
        process.stdout.write(`\n[convergence ${SIZE.clients}x${SIZE.ops}]\n${describeResult(result)}\n`);
        expect(result.unexpected).toEqual([]);
        expect(result.lost).toEqual([]);
        expect(result.duplicated).toEqual([]);
        expect(result.resurrected).toEqual([]);
        expect(result.mismatches).toEqual([]);
        expect(result.viewMismatches).toEqual([]);
        expect(result.leaks).toEqual([]);
        expect({ pending: result.pendingLeft, rejected: result.rejectedLeft, reasons: result.rejectedReasons, outboxRows: result.outboxRowsLeft, tombstoneRows: result.tombstoneRowsLeft }).toEqual({
          pending: 0,
          rejected: 0,
          reasons: [],
          outboxRows: 0,
          tombstoneRows: 0,
        });
        expect(result.serverLive).toBe(result.survivors);
        // The run did what it claims: every kind of client, work of every kind, faults of every kind.
        expect(result.ops).toBe(SIZE.clients * SIZE.ops);
        for (const role of ['head', 'coach', 'skater', 'shared']) expect(result.roles).toContain(role);
        expect(result.clock.serverLive).toBe(result.clock.kept);
        // The clock's rarer steps (a tenth of its 14% each) only show up reliably at full size.
        const clockKinds = QUICK ? ['startHeat', 'crossing'] : ['startHeat', 'crossing', 'undoCrossing', 'editCrossing', 'finishRun', 'editRun', 'setTarget'];
        for (const kind of ['record', 'recordGroup', 'editMark', 'editNote', 'editShared', 'editBoth', 'moveNote', 'delete', 'renameCue', 'moveCue', 'editSession', 'acknowledge', ...clockKinds]) {
          expect({ kind, n: result.opsByKind[kind] ?? 0 }).toEqual({ kind, n: expect.any(Number) });
          expect({ kind, done: (result.opsByKind[kind] ?? 0) > 0 }).toEqual({ kind, done: true });
        }
        expect(result.switches).toBeGreaterThan(2);
        expect(result.faults.droppedRequests).toBeGreaterThan(0);
        expect(result.faults.lateRequests).toBeGreaterThan(0);
        expect(result.faults.droppedReplies).toBeGreaterThan(0);
        expect(result.faults.duplicateAnswers).toBeGreaterThan(0);
      }),
      {
        seed: 20260115,
        numRuns: 1,
        endOnFailure: true,
        // The schedule has 10,000 steps: report the failure itself, not the whole counterexample
        // (it is regenerated from the seed).
        reporter: (run) => {
          if (!run.failed) return;
          if (run.errorInstance instanceof Error) throw run.errorInstance;
          throw new Error(`convergence failed (seed ${run.seed}): ${String(run.errorInstance)}`);
        },
      },
    );
  }, QUICK ? 180_000 : 900_000);
});

describe('2. reply lost after commit', () => {
  it('every op is applied exactly once: one op_log row per applied op, one applied answer each, re-sends answered duplicate; a refused op is never applied nor logged (fast-check, fixed seed)', async () => {
    const base = await loaded(team.coach, 'reply-base');
    await fc.assert(
      fc.asyncProperty(
        fc.record({
          first: fc.integer({ min: 1, max: 6 }),
          second: fc.integer({ min: 0, max: 6 }),
          edits: fc.array(fc.nat(), { maxLength: 6 }),
          deletes: fc.array(fc.nat(), { maxLength: 3 }),
          cueEdit: fc.boolean(),
          batchSize: fc.integer({ min: 1, max: 6 }),
          lost: fc.array(fc.boolean(), { minLength: 12, maxLength: 12 }),
        }),
        async ({ first, second, edits, deletes, cueEdit, batchSize, lost }) => {
          // The first reply of this phase is lost, and every later one whose flag is set.
          let pushes = 0;
          const policy: FaultPolicy = ({ kind }) => {
            if (kind !== 'push') return {};
            const index = pushes++;
            return index === 0 || lost[index % lost.length] ? { dropReply: true } : {};
          };
          const dev = await loaded(team.coach, 'reply', { batchSize });
          const synced: string[] = [];
          for (let i = 0; i < first; i += 1) synced.push(...(await tap(dev)).map((o) => o.id));
          await dev.sync();
          const made = [...synced];
          for (let i = 0; i < second; i += 1) made.push(...(await tap(dev, { note: `second ${i}` })).map((o) => o.id));
          for (const [i, pick] of edits.entries()) await dev.store.updateObservation(made[pick % made.length], dev.userId, { note: `edit ${i}` });
          const gone = [...new Set(deletes.map((pick) => synced[pick % synced.length]))];
          await dev.store.removeObservations(gone, dev.userId);
          // A plain coach may not rename cues: the server rejects it (permission), exactly once too.
          if (cueEdit) await dev.store.renameCue(team.cueIds[1], dev.userId, `Renamed ${uuidv7().slice(-6)}`);
          const outbox = await dev.store.listOutbox();
          const opIds = outbox.map((e) => e.opId);

          dev.transport.policy = policy;
          dev.transport.record = true;
          let failures = 0;
          for (let i = 0; (await dev.store.pendingCount()) > 0; i += 1) {
            if (i > 40) throw new Error('the outbox never drained');
            await dev.sync().catch((error) => {
              expect(error).toBeInstanceOf(SyncError);
              expect(error.cause).toBeInstanceOf(TransportError);
              failures += 1;
            });
          }
          expect(failures).toBeGreaterThan(0);

          // Which ops the device holds as refused (only a plain coach's cue rename is).
          const refused = new Set((await dev.store.listRejected()).map((e) => e.opId));
          expect(refused.size).toBe(cueEdit ? 1 : 0);
          for (const entry of await dev.store.listRejected()) expect(entry.rejectReason).toBe('permission');
          const appliedIds = opIds.filter((id) => !refused.has(id));

          // The server's op log: each applied op id once, for this device; refused ones never.
          const log = (await server.dataSource.query(`SELECT op_id, result FROM op_log WHERE team_id = $1 AND client_id = $2 AND op_id = ANY($3::uuid[])`, [
            team.teamId,
            dev.clientId,
            opIds,
          ])) as { op_id: string; result: { status: string; reason?: string } }[];
          expect(log.map((r) => r.op_id).sort()).toEqual([...appliedIds].sort());
          expect(log.every((r) => r.result.status === 'applied')).toBe(true);
          // Every answer the server gave (delivered or lost): exactly one applied per applied op,
          // and only rejections for a refused one.
          const answers = new Map<string, string[]>();
          for (const call of dev.transport.calls) {
            if (call.kind !== 'push' || !call.reply) continue;
            for (const r of (call.reply as PushReply).results) answers.set(r.opId, [...(answers.get(r.opId) ?? []), r.status]);
          }
          for (const opId of appliedIds) {
            const said = answers.get(opId) ?? [];
            expect({ opId, applied: said.filter((s) => s !== 'duplicate').length }).toEqual({ opId, applied: 1 });
          }
          for (const opId of refused) expect(new Set(answers.get(opId))).toEqual(new Set(['rejected']));
          // Every applied op whose first reply was lost was sent again and answered duplicate.
          const lostOps = dev.transport.calls
            .filter((c) => c.kind === 'push' && c.fault.dropReply && c.reply)
            .flatMap((c) => (c.sent as PushBody).ops.map((o) => o.opId))
            .filter((id) => !refused.has(id));
          expect(lostOps.length).toBeGreaterThan(0);
          for (const opId of lostOps) expect(answers.get(opId)).toContain('duplicate');

          // Records: each surviving create once, live; each delete a tombstone; the edits stand.
          const rows = (await server.dataSource.query(`SELECT id, note, deleted_at FROM observations WHERE team_id = $1 AND id = ANY($2::uuid[])`, [team.teamId, made])) as {
            id: string;
            note: string;
            deleted_at: Date | null;
          }[];
          expect(rows.length).toBe(made.length);
          expect(rows.filter((r) => r.deleted_at).map((r) => r.id).sort()).toEqual([...gone].sort());
          const local = await deviceState(dev.driver, team.teamId);
          for (const r of rows) if (!r.deleted_at) expect(local.observations.get(r.id)?.note).toBe(r.note);

          // Replaying every batch once more changes nothing: all duplicate, no new server_seq.
          const [{ seq: before }] = await server.dataSource.query(`SELECT seq FROM team_counters WHERE team_id = $1`, [team.teamId]);
          dev.transport.policy = () => ({});
          for (const call of dev.transport.calls.filter((c) => c.kind === 'push' && c.sent)) {
            const reply = await dev.transport.push(call.sent as PushBody);
            expect(reply.results.every((r) => r.status === (refused.has(r.opId) ? 'rejected' : 'duplicate'))).toBe(true);
          }
          const [{ seq: after }] = await server.dataSource.query(`SELECT seq FROM team_counters WHERE team_id = $1`, [team.teamId]);
          expect(after).toBe(before);
          await base.sync();
        },
      ),
      { seed: 1717, numRuns: 6, endOnFailure: true },
    );
  }, 60_000);
});

describe('3. two coaches edit the same note offline', () => {
  // Both devices and the server on one clock, moved by hand (from real time: the server's clock
  // has already seen real-time values).
  let virtual = 0;
  beforeAll(() => {
    virtual = Date.now() + 1000;
    setServerTimeSource(() => virtual);
  });
  afterAll(() => setServerTimeSource());

  type Editor = 'head' | 'coach';
  interface Plan {
    firstEditor: Editor;
    first: { markFlips: number; note: boolean };
    second: { markFlips: number; note: boolean };
    syncFirst: Editor;
  }

  // The coach's note: the coach edits it as its author, the head coach as the head coach.
  async function play(head: SimDevice, coach: SimDevice, plan: Plan) {
    const [obs] = await tap(coach, { note: 'base' });
    await coach.sync();
    await head.sync();
    const devices = { head, coach };
    const later: Editor = plan.firstEditor === 'head' ? 'coach' : 'head';
    const expected: Record<string, unknown> = { mark: 'needs_work', note: 'base' };
    const winner: Record<string, string> = {};
    for (const [who, edits, label] of [
      [plan.firstEditor, plan.first, 'earlier'],
      [later, plan.second, 'later'],
    ] as const) {
      virtual += 5_000;
      const dev = devices[who];
      const role = who === 'head' ? 'head_coach' : 'coach';
      for (let i = 0; i < edits.markFlips; i += 1) {
        const mark = (await deviceRow(dev, obs.id))!.mark === 'good' ? 'needs_work' : 'good';
        await dev.store.updateObservation(obs.id, dev.userId, { mark }, role);
      }
      if (edits.note) await dev.store.updateObservation(obs.id, dev.userId, { note: `${label} by ${who}` }, role);
      const row = (await deviceRow(dev, obs.id))!;
      const outbox = (await dev.store.listOutbox()).filter((e) => e.recordId === obs.id);
      for (const field of ['mark', 'note']) {
        const last = outbox.filter((e) => field in e.fields).pop();
        if (!last) continue;
        expected[field] = row[field];
        winner[field] = last.hlc[field];
      }
    }
    const other: Editor = plan.syncFirst === 'head' ? 'coach' : 'head';
    await devices[plan.syncFirst].sync();
    await devices[other].sync();
    await devices[plan.syncFirst].sync();

    const stored = await serverRow(obs.id);
    expect({ mark: stored.mark, note: stored.note }).toEqual(expected);
    for (const [field, hlc] of Object.entries(winner)) expect((stored.field_hlc as Record<string, string>)[field]).toBe(hlc);
    expect(await deviceRow(head, obs.id)).toMatchObject(expected);
    expect(await deviceRow(coach, obs.id)).toMatchObject(expected);
  }

  it.each([['head coach'], ['coach']])(
    'one edits the mark, later the other edits mark and note; %s syncs first: the later edit stands for both fields everywhere',
    async (order) => {
      const head = await loaded(team.head, 'edit-head', { now: () => virtual });
      const coach = await loaded(team.coach, 'edit-coach', { now: () => virtual });
      await play(head, coach, {
        firstEditor: 'head',
        first: { markFlips: 2, note: false },
        second: { markFlips: 1, note: true },
        syncFirst: order === 'coach' ? 'coach' : 'head',
      });
    },
  );

  it('per field, the newest edit stands whoever edits first and whoever syncs first (fast-check, fixed seed)', async () => {
    const head = await loaded(team.head, 'edit-head', { now: () => virtual });
    const coach = await loaded(team.coach, 'edit-coach', { now: () => virtual });
    const edits = fc.record({ markFlips: fc.integer({ min: 0, max: 2 }), note: fc.boolean() });
    await fc.assert(
      fc.asyncProperty(
        fc.record({ firstEditor: fc.constantFrom<Editor>('head', 'coach'), first: edits, second: edits, syncFirst: fc.constantFrom<Editor>('head', 'coach') }),
        (plan) => play(head, coach, plan),
      ),
      { seed: 3030, numRuns: 12, endOnFailure: true },
    );
  });
});

describe('4. create + delete before the first sync', () => {
  it('never appears on another device or the server, nor in any request (fast-check, fixed seed)', async () => {
    const other = await loaded(team.head, 'watcher');
    await fc.assert(
      fc.asyncProperty(fc.array(fc.record({ group: fc.boolean(), drop: fc.boolean() }), { minLength: 1, maxLength: 5 }), async (taps) => {
        const dev = await loaded(team.coach, 'undo');
        dev.transport.record = true;
        const dropped: string[] = [];
        const kept: string[] = [];
        for (const t of taps) {
          const made = await tap(dev, { skaterIds: t.group ? [team.skaterA.id, team.skaterB.id] : [team.skaterB.id] });
          (t.drop ? dropped : kept).push(...made.map((o) => o.id));
        }
        await dev.store.removeObservations(dropped, dev.userId);
        await dev.sync();
        await other.sync();
        const sent = JSON.stringify(dev.transport.calls.map((c) => c.sent));
        for (const id of dropped) {
          expect(sent).not.toContain(id);
          expect(await serverRow(id)).toBeUndefined();
          expect(await deviceRow(other, id)).toBeUndefined();
          expect(await deviceRow(dev, id)).toBeUndefined();
        }
        for (const id of kept) {
          expect(await serverRow(id)).toMatchObject({ deleted_at: null });
          expect(await deviceRow(other, id)).toBeDefined();
        }
        expect(await dev.store.pendingCount()).toBe(0);
        const log = await server.dataSource.query(`SELECT count(*)::int AS n FROM op_log WHERE team_id = $1 AND client_id = $2`, [team.teamId, dev.clientId]);
        // Only the kept notes (and nothing for the undone ones) reached the op log.
        expect(log[0].n).toBe(kept.length);
      }),
      { seed: 44, numRuns: 6, endOnFailure: true },
    );
  });

  it('after a send that never arrived, the create + delete reach the server as a tombstone and never live', async () => {
    const other = await loaded(team.head, 'watcher2');
    const dev = await loaded(team.coach, 'undo2');
    const [obs] = await tap(dev, { note: 'oops' });
    dev.transport.policy = ({ kind }) => (kind === 'push' ? { dropRequest: true } : {});
    await expect(dev.sync()).rejects.toMatchObject({ step: 'push' });
    // The device cannot know the request was lost: the undo becomes a delete.
    await dev.store.removeObservations([obs.id], dev.userId);
    dev.transport.policy = () => ({});
    dev.transport.record = true;
    await dev.sync();
    await other.sync();
    expect(await serverRow(obs.id)).toMatchObject({ deleted_at: expect.any(Date) });
    expect(await deviceRow(other, obs.id)).toBeUndefined();
    expect(await deviceRow(dev, obs.id)).toBeUndefined();
    const pulled = dev.transport.calls.filter((c) => c.kind === 'pull' && c.reply).flatMap((c) => (c.reply as PullReply).changes.map((ch) => ch.id));
    expect(pulled).not.toContain(obs.id);
  });
});

describe('5. a device clock one year ahead', () => {
  const YEAR = 365 * 86_400_000;
  let serverTime = 0;
  beforeAll(() => {
    serverTime = Date.now() + 1000;
    setServerTimeSource(() => serverTime);
  });
  afterAll(() => setServerTimeSource());

  type When = 'once edited' | 'after the honest edit';

  /** Rounds of: the fast device edits, two minutes later the honest one edits the same fields. */
  const conflicts = (when: fc.Arbitrary<When>) =>
    fc.asyncProperty(fc.array(fc.record({ mark: fc.boolean(), note: fc.boolean(), fastSyncsAt: when }), { minLength: 1, maxLength: 3 }), async (rounds) => {
      const fast = await loaded(team.head, 'year-ahead', { now: () => serverTime + YEAR });
      const honest = await loaded(team.coach, 'honest', { now: () => serverTime });
      const [obs] = await tap(honest, { note: 'start' });
      await honest.sync();
      await fast.sync();
      for (const [i, round] of rounds.entries()) {
        const fields = round.mark || round.note ? round : { ...round, note: true };
        const flip = async (dev: SimDevice, label: string) => {
          const row = (await deviceRow(dev, obs.id))!;
          // The fast device is the head coach's (it may change the honest coach's note).
          await dev.store.updateObservation(
            obs.id,
            dev.userId,
            {
              ...(fields.mark ? { mark: row.mark === 'good' ? 'needs_work' : 'good' } : {}),
              ...(fields.note ? { note: `${label} ${i}` } : {}),
            },
            dev === fast ? 'head_coach' : 'coach',
          );
        };
        await flip(fast, 'future');
        if (round.fastSyncsAt === 'once edited') await fast.sync();
        serverTime += 120_000;
        await flip(honest, 'honest');
        await honest.sync();
        await fast.sync();
        await honest.sync();
        const stored = await serverRow(obs.id);
        const hlc = stored.field_hlc as Record<string, string>;
        for (const field of ['mark', 'note'] as const) {
          if (!fields[field]) continue;
          // The honest device's edit holds the field (its clock value, its node), ...
          expect({ field, node: decodeHlc(hlc[field]).node }).toEqual({ field, node: honest.store.device });
        }
        // ... with the same values on the server and on both devices.
        const want = await deviceRow(honest, obs.id);
        expect({ mark: stored.mark, note: stored.note }).toEqual({ mark: want!.mark, note: want!.note });
        expect(await deviceRow(fast, obs.id)).toEqual(want);
        if (fields.note) expect(stored.note).toBe(`honest ${i}`);
      }
    });

  it("wins none of the later conflicts when it syncs its edit before the other device's later edit (fast-check, fixed seed)", async () => {
    await fc.assert(conflicts(fc.constant<When>('once edited')), { seed: 5150, numRuns: 4, endOnFailure: true });
  });

  // The fast device asks the server's time before it pushes, finds its clock a year ahead, and
  // moves the clock values of its unsent edits back by that much: its offline edit keeps its real
  // place in time and loses to the honest edit made after it.
  it("also wins none when its offline edit arrives after the other device's later edit", async () => {
    await fc.assert(conflicts(fc.constant<When>('after the honest edit')), { seed: 5151, numRuns: 1, endOnFailure: true });
  });
});

describe('6. first pull of 50,000 rows into a fresh device', () => {
  const ROWS = 50_000;
  let big: SyncTeam;

  beforeAll(async () => {
    big = await makeTeam(server.app, 'e2efifty', { people: false });
    await seedObservations(server.dataSource, big, ROWS);
  }, 60_000);

  const openBig = (options: Partial<Parameters<typeof openDevice>[2]> = {}) => openDevice(endpoint, big.head, { label: 'fifty', teamId: big.teamId, ...options });

  it('pages of 1,000; killed after page k, a new run on the restarted app continues from the saved cursor and ends equal to a straight pull (fast-check, fixed seed)', async () => {
    // The straight pull, timed on the device side.
    const straight = await openBig();
    straight.transport.record = true;
    const progress: { done: number; total: number }[] = [];
    const t0 = performance.now();
    const result = await synchronize({ store: straight.store, transport: straight.transport, teamId: big.teamId, onProgress: (p) => progress.push(p) });
    const ms = performance.now() - t0;
    process.stdout.write(`\n[50k first pull] ${result.pull.pages} pages, ${result.pull.changes} changes, device side ${(ms / 1000).toFixed(2)} s\n`);
    const pulls = straight.transport.calls.filter((c) => c.kind === 'pull');
    expect(pulls.every((c) => (c.sent as { limit: number }).limit === 1000)).toBe(true);
    const sizes = pulls.map((c) => (c.reply as PullReply).changes.length + (c.reply as PullReply).tombstones.length);
    expect(sizes.slice(0, -1).every((n) => n === 1000)).toBe(true);
    expect(result.pull.changes).toBeGreaterThanOrEqual(ROWS);
    expect(pulls.length).toBe(Math.ceil(result.pull.changes / 1000));
    expect(progress.every((p) => p.total === result.pull.changes)).toBe(true);
    const want = await deviceState(straight.driver, big.teamId);
    expect(want.observations.size).toBe(ROWS);

    await fc.assert(
      fc.asyncProperty(fc.integer({ min: 1, max: pulls.length - 2 }), fc.constantFrom('request', 'reply'), async (k, how) => {
        const first = await openBig({
          // The app dies while fetching page k + 1 (before it is sent, or with its reply in the air).
          policy: ({ kind, index }) => (kind === 'pull' && index >= k ? (how === 'request' ? { dropRequest: true } : { dropReply: true }) : {}),
        });
        await expect(first.sync()).rejects.toMatchObject({ step: 'pull' });
        const cursor = await first.store.cursor(big.teamId);
        expect(cursor).toBe((pulls[k - 1].reply as PullReply).nextCursor);
        // Exactly the observations of the k applied pages are on the device.
        const applied = pulls.slice(0, k).reduce((n, c) => n + (c.reply as PullReply).changes.filter((ch) => ch.table === 'observations').length, 0);
        expect(await first.store.countObservations(big.teamId)).toBe(applied);
        // The restarted app: a new store on the same database, a new transport.
        const again = await openBig({ driver: first.driver });
        again.transport.record = true;
        const rest = await again.sync();
        expect((again.transport.calls[0].sent as { cursor: number }).cursor).toBe(cursor);
        expect(rest.pull.pages).toBe(pulls.length - k);
        const got = await deviceState(again.driver, big.teamId);
        expect(diffTable('observations', want.observations, got.observations)).toEqual([]);
        expect(diffTable('sessions', want.sessions, got.sessions)).toEqual([]);
        expect(diffTable('cues', want.cues, got.cues)).toEqual([]);
      }),
      { seed: 6006, numRuns: 1, endOnFailure: true },
    );
  }, 180_000);
});

describe('7. authorization over the engine', () => {
  const PRIVATE_A = 'private: A drops the shoulder';
  const PRIVATE_B = 'private: B sits too high';
  let made: { id: string; skaterId: string; note: string; shared: boolean }[];

  beforeAll(async () => {
    const coach = await loaded(team.coach, 'auth-coach');
    made = [];
    for (const [skaterId, note, shared] of [
      [team.skaterA.id, PRIVATE_A, false],
      [team.skaterA.id, 'shared with A', true],
      [team.skaterB.id, PRIVATE_B, false],
      [team.skaterB.id, 'shared with B', true],
    ] as const) {
      const cues = await coach.store.listCues(team.teamId);
      const [o] = await coach.store.recordObservations({
        teamId: team.teamId, userId: coach.userId, sessionId: team.sessionId, skaterIds: [skaterId], cueId: cues[0].id, mark: 'good', note, noteShared: shared,
      });
      made.push({ id: o.id, skaterId, note, shared });
    }
    await coach.sync();
  }, 60_000);

  it.each([
    ['skater A', () => team.skaterAccount, () => team.skaterA.id],
    ['the guardian of skater B', () => team.guardian, () => team.skaterB.id],
  ])('%s pulls only their own observations and no private note text', async (_who, account, skater) => {
    const dev = await loaded(account(), 'own');
    const state = await deviceState(dev.driver, team.teamId);
    const rows = [...state.observations.entries()];
    expect(rows.length).toBeGreaterThan(0);
    expect(rows.every(([, o]) => o.skaterId === skater())).toBe(true);
    const text = JSON.stringify(await dev.driver.all(`SELECT * FROM observations`));
    expect(text).not.toContain(PRIVATE_A);
    expect(text).not.toContain(PRIVATE_B);
    for (const m of made.filter((x) => x.skaterId === skater())) {
      expect(state.observations.get(m.id)).toMatchObject({ note: m.shared ? m.note : '' });
    }
    const skaters = await dev.store.listSkaters(team.teamId);
    expect(skaters.map((s) => s.id)).toEqual([skater()]);
    // The store refuses an edit from this device; a tampered app that claims to be the head coach
    // gets it queued, and the server refuses it (permission), kept as rejected; the server is unchanged.
    const own = made.find((m) => m.skaterId === skater())!;
    await expect(dev.store.updateObservation(own.id, dev.userId, { mark: 'needs_work' })).rejects.toThrow(/Only the coach who wrote/);
    await dev.store.updateObservation(own.id, dev.userId, { mark: 'needs_work' }, 'head_coach');
    const result = await dev.sync();
    expect(result.push.rejected).toBe(1);
    const [rejected] = await dev.store.listRejected(team.teamId);
    expect(rejected).toMatchObject({ recordId: own.id, rejectReason: 'permission' });
    expect((await serverRow(own.id)).mark).toBe('good');
  });

  it('a coach of another team cannot push into this team: the run fails at push, nothing is written, nothing is pulled', async () => {
    const other = await makeTeam(server.app, 'e2eforeign', { people: false });
    const dev = await open(other.head, 'foreign');
    // The foreign device writes "into" team A locally (it knows the ids) and tries to sync them.
    const session = await dev.store.startSession(team.teamId, dev.userId, '2026-01-20');
    const forged = await dev.store.recordObservations({
      teamId: team.teamId, userId: dev.userId, sessionId: session.id, skaterIds: [team.skaterA.id], cueId: team.cueIds[0], mark: 'good', note: 'foreign',
    });
    const error = await dev.sync().catch((e) => e);
    expect(error).toBeInstanceOf(SyncError);
    expect(error).toMatchObject({ step: 'push', cause: { status: 404 } });
    expect(await serverRow(forged[0].id)).toBeUndefined();
    const sessions = await server.dataSource.query(`SELECT id FROM sessions WHERE team_id = $1 AND id = $2`, [team.teamId, session.id]);
    expect(sessions).toEqual([]);
    // Nothing of team A reached the device; its changes stay queued on it.
    expect(await dev.store.listSkaters(team.teamId)).toEqual([]);
    expect(await dev.store.pendingCount(team.teamId)).toBe(2);

    // Its own team's push naming team A's record is refused (unknown there) and changes nothing.
    const mine = await open(other.head, 'foreign-own', { teamId: other.teamId });
    await mine.sync();
    const target = made[0];
    await mine.driver.run(
      `INSERT INTO observations (id, team_id, session_id, skater_id, cue_id, mark, note, created_at, created_by, synced) VALUES (?, ?, ?, ?, ?, 'good', 'x', ?, ?, 1)`,
      [target.id, other.teamId, other.sessionId, other.skaterA.id, other.cueIds[0], new Date().toISOString(), userIdOf(other.head)],
    );
    await mine.store.updateObservation(target.id, mine.userId, { note: 'hijack' });
    const result = await mine.sync();
    expect(result.push.rejected).toBe(1);
    expect((await mine.store.listRejected(other.teamId))[0]).toMatchObject({ rejectReason: 'unknown_record' });
    expect((await serverRow(target.id)).note).toBe(target.note);
  });
});
