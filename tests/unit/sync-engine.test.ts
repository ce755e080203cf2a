/**
 * Step 5, the sync run: push then pull, one run at a time, errors naming the step, and a property
 * test (fixed seeds) that devices converge with the server whatever requests and replies are lost.
 */
import fc from 'fast-check';
import { synchronize } from '../../sync/engine';
import { SyncBusy, SyncError } from '../../sync/errors';
import { ServerUnavailable, TransportError } from '../../sync/transport';
import { COACH, FakeSyncServer, SKATERS, TEAM, deviceObservations, openDevice, seedServer } from './sync-fake-server';

async function setup() {
  const server = new FakeSyncServer();
  seedServer(server);
  const device = await openDevice();
  const sync = () => synchronize({ store: device.store, transport: server.transport, teamId: TEAM });
  return { server, ...device, sync };
}

describe('synchronize', () => {
  it('pushes, then pulls, and records the server time as lastSyncAt', async () => {
    const { server, store, tap, sync } = await setup();
    await tap(SKATERS);
    server.time = Date.UTC(2026, 11, 2, 9, 45);
    const result = await sync();
    expect(result.push.acknowledged).toBe(4);
    expect(result.pull.changes).toBeGreaterThanOrEqual(4);
    expect(result.lastSyncAt).toBe('2026-12-02T09:45:00.000Z');
    expect(await store.lastSyncAt(TEAM)).toBe('2026-12-02T09:45:00.000Z');
    expect(await store.pendingCount()).toBe(0);
    expect((await store.listSkaters(TEAM)).length).toBe(3);
  });

  it('refuses a second run while one is going, then runs again once it is done', async () => {
    const { sync, tap } = await setup();
    await tap();
    const first = sync();
    await expect(sync()).rejects.toBeInstanceOf(SyncBusy);
    await expect(sync()).rejects.toThrow(/already running/);
    await first;
    await expect(sync()).resolves.toMatchObject({ push: { sent: 0 } });
  });

  it('names the step that failed: push', async () => {
    const { server, sync, tap, store } = await setup();
    await tap();
    server.dropPushRequest = () => true;
    const error = await sync().catch((e) => e);
    expect(error).toBeInstanceOf(SyncError);
    expect(error.step).toBe('push');
    expect(error.cause).toBeInstanceOf(TransportError);
    expect(error.message).toMatch(/\(push\): request lost/);
    expect(server.pullCalls).toBe(0); // no pull after a failed push
    expect(await store.lastSyncAt(TEAM)).toBeNull();
  });

  it('still pulls when the server answered the push with an error, then reports the push error', async () => {
    const { server, sync, tap, store } = await setup();
    await tap();
    server.put(TEAM, 'skaters', '0193a000-0000-7000-8000-0000000000a9', { displayName: 'New skater', groupId: null, hasAccount: false });
    const failures = [new ServerUnavailable(), new TransportError('The server answered 409.', 409), new Error('reply could not be settled')];
    for (const failure of failures) {
      server.transport.push = async () => {
        throw failure;
      };
      const pullsBefore = server.pullCalls;
      const error = await sync().catch((e) => e);
      expect(error).toBeInstanceOf(SyncError);
      expect(error).toMatchObject({ step: 'push', cause: failure });
      expect(server.pullCalls).toBeGreaterThan(pullsBefore);
    }
    expect((await store.listSkaters(TEAM)).map((s) => s.displayName)).toContain('New skater');
    expect(await store.lastSyncAt(TEAM)).not.toBeNull();
    expect(await store.pendingCount()).toBe(2);
  });

  it("sends nothing while the server's time cannot be checked (the clock may be off), but still pulls", async () => {
    const { server, sync, tap, store } = await setup();
    await tap();
    let pushes = 0;
    const push = server.transport.push;
    server.transport.push = (body) => ((pushes += 1), push(body));
    server.transport.time = async () => {
      throw new ServerUnavailable();
    };
    const error = await sync().catch((e) => e);
    expect(error).toMatchObject({ step: 'push' });
    expect(pushes).toBe(0);
    expect(server.pullCalls).toBe(1);
    expect((await store.listOutbox()).every((e) => e.sentAt === null)).toBe(true);
    // Once the time answers, the changes go.
    server.transport.time = async () => new Date(server.time).toISOString();
    await sync();
    expect(pushes).toBe(1);
    expect(await store.pendingCount()).toBe(0);
  });

  it('never sends a rejected op again by itself, and keeps pulling', async () => {
    const { server, sync, tap, store } = await setup();
    const [bad] = await tap();
    server.judge = (op) => (op.recordId === bad.id ? 'permission' : null);
    const sent: string[] = [];
    const push = server.transport.push;
    server.transport.push = (body) => (sent.push(...body.ops.map((op) => op.recordId)), push(body));
    for (let i = 0; i < 3; i += 1) await sync();
    expect(sent.filter((id) => id === bad.id)).toHaveLength(1);
    expect(await store.rejectedCount()).toBe(1);
    expect(server.pullCalls).toBe(3);
  });

  it('names the step that failed: pull', async () => {
    const { server, sync } = await setup();
    const unavailable = new ServerUnavailable();
    server.transport.pull = async () => {
      throw unavailable;
    };
    await expect(sync()).rejects.toMatchObject({ step: 'pull', cause: unavailable });
  });

  it('names the step that failed: apply', async () => {
    const { sync, driver } = await setup();
    await driver.exec(`CREATE TRIGGER boom BEFORE INSERT ON skaters BEGIN SELECT RAISE(ABORT, 'disk full'); END`);
    await driver.exec(`DELETE FROM skaters`);
    const error = await sync().catch((e) => e);
    expect(error).toMatchObject({ step: 'apply' });
    expect(error.message).toMatch(/disk full/);
  });

  it('uses the device id as the client id', async () => {
    const { server, store, tap } = await setup();
    await tap();
    const seen: string[] = [];
    const push = server.transport.push;
    server.transport.push = (body) => (seen.push(body.clientId), push(body));
    await synchronize({ store, transport: server.transport, teamId: TEAM });
    expect(seen).toEqual([store.device]);
  });
});

type Command =
  | { kind: 'tap'; device: number; skater: number; note: string }
  | { kind: 'edit'; device: number; pick: number; note: string; mark: boolean }
  | { kind: 'delete'; device: number; pick: number }
  | { kind: 'sync'; device: number; dropRequest: boolean; dropReply: boolean; dropPull: boolean };

const DEVICES = 3;
const device = fc.integer({ min: 0, max: DEVICES - 1 });
/** Commands for a network losing `request`/`reply`/`pull` tenths of its requests, replies and pulls. */
const commands = (rates: { request: number; reply: number; pull: number }): fc.Arbitrary<Command[]> => fc.array(fc.oneof(
  { weight: 4, arbitrary: fc.record({ kind: fc.constant('tap' as const), device, skater: fc.integer({ min: 0, max: 2 }), note: fc.string({ maxLength: 12 }) }) },
  { weight: 3, arbitrary: fc.record({ kind: fc.constant('edit' as const), device, pick: fc.nat(), note: fc.string({ maxLength: 12 }), mark: fc.boolean() }) },
  { weight: 2, arbitrary: fc.record({ kind: fc.constant('delete' as const), device, pick: fc.nat() }) },
  {
    weight: 3,
    arbitrary: fc.record({
      kind: fc.constant('sync' as const),
      device,
      dropRequest: fc.integer({ min: 0, max: 9 }).map((n) => n < rates.request),
      dropReply: fc.integer({ min: 0, max: 9 }).map((n) => n < rates.reply),
      dropPull: fc.integer({ min: 0, max: 9 }).map((n) => n < rates.pull),
    }),
  },
), { minLength: 20, maxLength: 60, size: 'max' });

describe('convergence (property, fixed seeds)', () => {
  const converges = (rates: { request: number; reply: number; pull: number }, seed: number, numRuns: number) =>
    fc.assert(
      fc.asyncProperty(commands(rates), async (commands) => {
        const server = new FakeSyncServer();
        seedServer(server);
        let tick = 0;
        // Device 2 runs ten minutes fast.
        const devices = await Promise.all(
          Array.from({ length: DEVICES }, (_, i) => openDevice(() => Date.UTC(2026, 11, 2, 9) + (i === 2 ? 600_000 : 0) + tick)),
        );
        const created = new Set<string>();
        const deleted = new Set<string>();
        let dropRequest = false;
        let dropReply = false;
        let dropPull = false;
        server.dropPushRequest = () => dropRequest;
        server.dropPushReply = () => dropReply;
        server.dropPull = () => dropPull;

        for (const c of commands) {
          tick += 1000;
          const d = devices[c.device];
          const live = [...(await deviceObservations(d.driver)).keys()];
          if (c.kind === 'tap') {
            const [o] = await d.tap([SKATERS[c.skater]], 'needs_work', c.note);
            created.add(o.id);
          } else if (c.kind === 'edit' && live.length > 0) {
            await d.store.updateObservation(live[c.pick % live.length], COACH, { note: c.note, mark: c.mark ? 'good' : 'needs_work' });
          } else if (c.kind === 'delete' && live.length > 0) {
            const id = live[c.pick % live.length];
            await d.store.removeObservations([id], COACH);
            deleted.add(id);
          } else if (c.kind === 'sync') {
            ({ dropRequest, dropReply, dropPull } = c);
            await synchronize({ store: d.store, transport: server.transport, teamId: TEAM, batchSize: 3, pageSize: 4 }).catch((e) => {
              if (!(e instanceof SyncError) || !(e.cause instanceof TransportError)) throw e;
            });
          }
        }

        // The network heals: everyone syncs until quiet.
        dropRequest = dropReply = dropPull = false;
        for (let round = 0; round < 2; round += 1) {
          for (const d of devices) await synchronize({ store: d.store, transport: server.transport, teamId: TEAM });
        }

        const onServer = new Map(
          [...server.table('observations')].map(([id, f]) => [id, { mark: f.mark, note: f.note, noteShared: f.noteShared, skaterId: f.skaterId }]),
        );
        const expected = [...created].filter((id) => !deleted.has(id)).sort();
        expect([...onServer.keys()].sort()).toEqual(expected); // 0 lost, 0 duplicated, 0 resurrected
        expect(new Set(server.appliedOps).size).toBe(server.appliedOps.length);
        for (const d of devices) {
          expect(await deviceObservations(d.driver)).toEqual(onServer);
          expect(await d.store.pendingCount()).toBe(0);
          expect(await d.store.rejectedCount()).toBe(0);
        }
      }),
      { seed, numRuns },
    );

  it('every device ends equal to the server: nothing lost, duplicated or resurrected (20% requests, 10% replies lost)', () =>
    converges({ request: 2, reply: 1, pull: 2 }, 20261202, 40));

  it('the same on a very bad network (30% requests, 40% replies, 30% pulls lost)', () => converges({ request: 3, reply: 4, pull: 3 }, 7, 25));
});
