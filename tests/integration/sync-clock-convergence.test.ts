/**
 * The clock's convergence proof (issue #9, "a run timed offline, synced once, edited on a second
 * device, converges"): REAL device stores on sql.js running the REAL engine against the REAL
 * server over HTTP (support/device-client.ts), fast-check with a fixed seed.
 *
 * Each case: the coach's phone times a pair with the network gone (every request dropped), then
 * syncs once; the head coach's tablet pulls the heat; both then edit it offline at interleaved
 * moments (move a crossing, mark it hand-timed, delete one, add a hand-timed one, note, finish or
 * stop a run); they sync in a generated order, with the first attempt's reply lost. At the end the
 * phone, the tablet, a fresh device and the server hold the same runs and crossings, and they are
 * what a model of the contract says (shared/SYNC.md "Conflicts": per field the newest clock
 * wins; a delete wins over any edit). Devices and server share one clock moved by hand, so "newest"
 * is the order the edits were made in.
 */
import fc from 'fast-check';
import { v7 as uuidv7 } from 'uuid';
import { setServerTimeSource } from '../../server/services/sync/clock';
import { StoreError } from '../../sync/store';
import { startTestServer, type Account, type TestServer } from './helpers';
import { makeTeam, type SyncTeam } from './sync-helpers';
import { deviceState, diffTable, listen, openDevice, serverState, type Endpoint, type Fields, type SimDevice, type TableState } from './support/device-client';

let server: TestServer;
let endpoint: Endpoint;
let team: SyncTeam;
let virtual = 0;

beforeAll(async () => {
  server = await startTestServer();
  endpoint = await listen(server.app);
  team = await makeTeam(server.app, 'clkconv');
  // One clock for the devices and the server, moved by hand (from real time: the server's clock
  // has already seen real-time values).
  virtual = Date.now() + 1000;
  setServerTimeSource(() => virtual);
});
afterAll(async () => {
  setServerTimeSource();
  await endpoint.close();
  await server.close();
});

const open = (account: Account, label: string) => openDevice(endpoint, account, { label, teamId: team.teamId, now: () => virtual });

type Who = 'phone' | 'tablet';
type Edit =
  | { kind: 'move'; pick: number; by: number }
  | { kind: 'hand'; pick: number }
  | { kind: 'delete'; pick: number }
  | { kind: 'add'; pick: number; atMs: number }
  | { kind: 'note'; pick: number }
  | { kind: 'end'; pick: number; stopped: boolean };

const editArb: fc.Arbitrary<Edit> = fc.oneof(
  fc.record({ kind: fc.constant('move' as const), pick: fc.nat(), by: fc.integer({ min: -400, max: 400 }) }),
  fc.record({ kind: fc.constant('hand' as const), pick: fc.nat() }),
  fc.record({ kind: fc.constant('delete' as const), pick: fc.nat() }),
  fc.record({ kind: fc.constant('add' as const), pick: fc.nat(), atMs: fc.integer({ min: 1_000, max: 200_000 }) }),
  fc.record({ kind: fc.constant('note' as const), pick: fc.nat() }),
  fc.record({ kind: fc.constant('end' as const), pick: fc.nat(), stopped: fc.boolean() }),
);

const planArb = fc.record({
  laps: fc.tuple(fc.integer({ min: 1, max: 5 }), fc.integer({ min: 1, max: 5 })),
  undoOffline: fc.boolean(),
  edits: fc.array(fc.record({ who: fc.constantFrom<Who>('phone', 'tablet'), edit: editArb }), { minLength: 1, maxLength: 12 }),
  firstToSync: fc.constantFrom<Who>('phone', 'tablet'),
});

/** What the contract says the heat must end as: values per field with the moment they were set. */
class Model {
  readonly rows = new Map<string, { table: 'runs' | 'crossings'; fields: Fields; at: Record<string, number> }>();
  readonly deleted = new Set<string>();

  put(table: 'runs' | 'crossings', id: string, fields: Fields, at: number) {
    this.rows.set(id, { table, fields: { ...fields }, at: Object.fromEntries(Object.keys(fields).map((f) => [f, at])) });
  }

  edit(id: string, fields: Fields, at: number) {
    const row = this.rows.get(id);
    if (!row) return; // an edit of a record the other device made: it has it already
    for (const [field, value] of Object.entries(fields)) {
      if ((row.at[field] ?? -1) > at) continue;
      row.fields[field] = value;
      row.at[field] = at;
    }
  }

  remove(id: string) {
    this.deleted.add(id);
  }

  table(table: 'runs' | 'crossings'): TableState {
    return new Map([...this.rows].filter(([id, r]) => r.table === table && !this.deleted.has(id)).map(([id, r]) => [id, r.fields]));
  }
}

const onlyHeat = (state: TableState, keep: (fields: Fields, id: string) => boolean): TableState => new Map([...state].filter(([id, f]) => keep(f, id)));

async function heatState(device: SimDevice | 'server', runIds: Set<string>) {
  const state = device === 'server' ? await serverState(endpoint, team.head.session.accessToken, team.teamId) : await deviceState(device.driver, team.teamId);
  return {
    runs: onlyHeat(state.runs, (_f, id) => runIds.has(id)),
    crossings: onlyHeat(state.crossings, (f) => runIds.has(f.runId as string)),
  };
}

describe('a run timed offline, synced once, edited on a second device', () => {
  it('converges on the phone, the tablet, a fresh device and the server, as the contract says (fast-check, fixed seed)', async () => {
    let cases = 0;
    let lostReplies = 0;
    await fc.assert(
      fc.asyncProperty(planArb, async (plan) => {
        cases += 1;
        const phone = await open(team.coach, 'phone');
        const tablet = await open(team.head, 'tablet');
        await phone.sync();
        await tablet.sync();
        const model = new Model();
        const devices = { phone, tablet };
        const roles = { phone: 'coach', tablet: 'head_coach' } as const;

        // Timed with the network gone: nothing of it leaves the phone.
        phone.transport.policy = ({ kind }) => (kind === 'push' ? { dropRequest: true } : {});
        virtual += 1_000;
        const startedAt = new Date(virtual).toISOString();
        const runs = await phone.store.startHeat({
          teamId: team.teamId,
          userId: phone.userId,
          heatId: uuidv7(),
          startedAt,
          runs: [
            { skaterId: team.skaterA.id, distanceM: 1500, track: 'long', lane: 'inner' },
            { skaterId: team.skaterB.id, distanceM: 1500, track: 'long', lane: 'outer' },
          ],
        });
        for (const run of runs) {
          const { id, teamId: _t, ...fields } = run;
          model.put('runs', id, { ...fields, authorName: team.coach.session.user.displayName }, virtual);
        }
        const runIds = new Set(runs.map((r) => r.id));
        for (const [lane, laps] of plan.laps.entries()) {
          for (let lap = 0; lap < laps; lap += 1) {
            virtual += 30_000;
            const c = await phone.store.recordCrossing({ runId: runs[lane].id, userId: phone.userId, atMs: 25_000 + lap * 29_000 + lane * 300, role: 'coach' });
            const { id, teamId: _t, ...fields } = c;
            model.put('crossings', id, fields, virtual);
          }
        }
        if (plan.undoOffline) {
          // The last tap was a bounce: undone before any sync, it never reaches anyone.
          virtual += 100;
          const bounce = await phone.store.recordCrossing({ runId: runs[0].id, userId: phone.userId, atMs: 190_000, role: 'coach' });
          await phone.store.removeCrossings([bounce.id], phone.userId, 'coach');
        }
        await expect(phone.sync()).rejects.toMatchObject({ step: 'push' });
        expect(await server.dataSource.query(`SELECT id FROM runs WHERE team_id = $1 AND id = ANY($2::uuid[])`, [team.teamId, [...runIds]])).toEqual([]);

        // Synced once; the tablet pulls the heat.
        phone.transport.policy = () => ({});
        await phone.sync();
        await tablet.sync();

        // Both edit offline, at interleaved moments.
        for (const [index, { who, edit }] of plan.edits.entries()) {
          virtual += 1_000;
          const dev = devices[who];
          const role = roles[who];
          const mine = await heatState(dev, runIds);
          const crossings = [...mine.crossings.entries()].sort(([a], [b]) => a.localeCompare(b));
          const heat = [...mine.runs.keys()].sort();
          const crossing = crossings.length > 0 ? crossings[edit.pick % crossings.length] : undefined;
          const runId = heat[edit.pick % heat.length];
          try {
            if (edit.kind === 'move' && crossing && Math.max(0, (crossing[1].atMs as number) + edit.by) !== crossing[1].atMs) {
              const atMs = Math.max(0, (crossing[1].atMs as number) + edit.by);
              await dev.store.updateCrossing(crossing[0], dev.userId, { atMs }, role);
              model.edit(crossing[0], { atMs }, virtual);
            } else if (edit.kind === 'hand' && crossing) {
              const handTimed = !crossing[1].handTimed;
              await dev.store.updateCrossing(crossing[0], dev.userId, { handTimed }, role);
              model.edit(crossing[0], { handTimed }, virtual);
            } else if (edit.kind === 'delete' && crossing) {
              await dev.store.removeCrossings([crossing[0]], dev.userId, role);
              model.remove(crossing[0]);
            } else if (edit.kind === 'add') {
              const c = await dev.store.recordCrossing({ runId, userId: dev.userId, atMs: edit.atMs, handTimed: true, role });
              const { id, teamId: _t, ...fields } = c;
              model.put('crossings', id, fields, virtual);
            } else if (edit.kind === 'note') {
              const note = `${who} ${index}`;
              await dev.store.updateRun(runId, dev.userId, { note }, role);
              model.edit(runId, { note }, virtual);
            } else if (edit.kind === 'end') {
              const end = edit.stopped ? { status: 'stopped' as const, stopReason: `${who} ${index}` } : { status: 'finished' as const };
              await dev.store.finishRun(runId, dev.userId, end, role);
              model.edit(runId, { status: end.status, stopReason: end.status === 'stopped' ? end.stopReason : '' }, virtual);
            }
          } catch (error) {
            // Nothing to edit (every crossing deleted here): the coach's tap finds nothing.
            if (!(error instanceof StoreError)) throw error;
          }
        }

        // They sync in the generated order; the first attempt's reply is lost (sent again: duplicate).
        const order: Who[] = plan.firstToSync === 'phone' ? ['phone', 'tablet'] : ['tablet', 'phone'];
        let lost = false;
        const first = devices[order[0]];
        first.transport.policy = ({ kind }) => (kind === 'push' && !lost ? ((lost = true), { dropReply: true }) : {});
        if ((await first.store.pendingCount()) > 0) {
          await expect(first.sync()).rejects.toMatchObject({ step: 'push' });
          lostReplies += 1;
        } else await first.sync();
        first.transport.policy = () => ({});
        for (const who of [...order, ...order]) await devices[who].sync();
        for (const dev of [phone, tablet]) {
          expect(await dev.store.pendingCount()).toBe(0);
          expect(await dev.store.rejectedCount()).toBe(0);
        }

        const fresh = await open(team.head, 'fresh');
        await fresh.sync();
        const want = { runs: model.table('runs'), crossings: model.table('crossings') };
        for (const [label, got] of [
          ['server', await heatState('server', runIds)],
          ['phone', await heatState(phone, runIds)],
          ['tablet', await heatState(tablet, runIds)],
          ['fresh', await heatState(fresh, runIds)],
        ] as const) {
          expect({ label, diff: [...diffTable('runs', want.runs, got.runs), ...diffTable('crossings', want.crossings, got.crossings)] }).toEqual({ label, diff: [] });
        }
      }),
      { seed: 909, numRuns: 40, endOnFailure: true },
    );
    expect(cases).toBe(40);
    expect(lostReplies).toBeGreaterThan(10);
  }, 240_000);
});
