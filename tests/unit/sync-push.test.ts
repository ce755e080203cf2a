/**
 * Step 2, push: acknowledged ops leave the outbox and mark their records synced; a lost request or
 * reply leaves them pending and a retry is answered `duplicate` (applied once); rejected ops stay,
 * with their reason, and are not sent again; batches respect the op and size limits.
 */
import type { PushBody } from '../../shared/schemas/sync';
import { pushOutbox, utf8Length } from '../../sync/push';
import { RequestRefused, TransportError, type SyncTransport } from '../../sync/transport';
import { COACH, CUES, FakeSyncServer, OTHER_TEAM, SKATERS, TEAM, openDevice, seedServer } from './sync-fake-server';

async function setup() {
  const server = new FakeSyncServer();
  seedServer(server);
  const device = await openDevice();
  return { server, ...device, push: (extra: Partial<Parameters<typeof pushOutbox>[2]> = {}) => pushOutbox(device.store, server.transport, { teamId: TEAM, clientId: device.store.clientId, ...extra }) };
}

describe('pushOutbox', () => {
  it('acknowledged ops leave the outbox and their records become synced', async () => {
    const { server, store, driver, tap, push, session } = await setup();
    const created = await tap(SKATERS, 'needs_work', 'Knee over toe');
    expect(await store.pendingCount(TEAM)).toBe(4); // session + 3 observations

    const summary = await push();
    expect(summary).toMatchObject({ batches: 1, sent: 4, acknowledged: 4, rejected: 0 });
    expect(await store.listOutbox()).toEqual([]);
    const synced = await driver.all<{ synced: number }>(`SELECT synced FROM observations`);
    expect(synced.map((r) => r.synced)).toEqual([1, 1, 1]);
    expect((await driver.all<{ synced: number }>(`SELECT synced FROM sessions WHERE id = ?`, [session.id]))[0].synced).toBe(1);
    const onServer = server.table('observations');
    expect([...onServer.keys()].sort()).toEqual(created.map((o) => o.id).sort());
    expect(onServer.get(created[0].id)).toMatchObject({ note: 'Knee over toe', mark: 'needs_work', sessionId: session.id });
  });

  it('marks entries sent before the request leaves, so undo turns into a delete', async () => {
    const { server, store, driver, tap } = await setup();
    const [o] = await tap();
    let sentAtDuringRequest: (string | null)[] = [];
    const transport: SyncTransport = {
      push: async (body) => {
        sentAtDuringRequest = (await driver.all<{ sent_at: string | null }>(`SELECT sent_at FROM outbox`)).map((r) => r.sent_at);
        throw new TransportError('reply lost');
      },
      pull: server.transport.pull,
    };
    await expect(pushOutbox(store, transport, { teamId: TEAM, clientId: store.clientId })).rejects.toThrow('reply lost');
    expect(sentAtDuringRequest.length).toBe(2);
    expect(sentAtDuringRequest.every((s) => s !== null)).toBe(true);
    await store.removeObservations([o.id], COACH);
    expect((await store.listOutbox()).map((e) => e.kind)).toEqual(['upsert', 'upsert', 'delete']);
  });

  it('a lost reply keeps the entries pending; the retry is answered duplicate and applies nothing twice', async () => {
    const { server, store, tap, push } = await setup();
    await tap(SKATERS);
    let drop = true;
    server.dropPushReply = () => drop;
    await expect(push()).rejects.toBeInstanceOf(TransportError);
    const waiting = await store.listOutbox();
    expect(waiting).toHaveLength(4);
    expect(waiting.every((e) => e.status === 'pending' && e.attempts === 1 && e.lastError === 'reply lost' && e.sentAt)).toBe(true);
    expect(server.table('observations').size).toBe(3); // the server did apply them

    drop = false;
    const summary = await push();
    expect(summary.acknowledged).toBe(4);
    expect(await store.pendingCount()).toBe(0);
    expect(server.appliedOps).toHaveLength(4);
    expect(new Set(server.appliedOps).size).toBe(4);
    expect(server.table('observations').size).toBe(3);
  });

  it('a lost request applies nothing and the retry applies everything once', async () => {
    const { server, store, tap, push } = await setup();
    await tap();
    server.dropPushRequest = () => true;
    await expect(push()).rejects.toThrow('request lost');
    expect(server.table('observations').size).toBe(0);
    server.dropPushRequest = () => false;
    await push();
    expect(server.table('observations').size).toBe(1);
    expect(await store.pendingCount()).toBe(0);
  });

  it('keeps a rejected op with its reason and does not send it again', async () => {
    const { server, store, push } = await setup();
    await store.renameCue(CUES[0].id, COACH, 'Ankles first');
    server.judge = (op) => (op.table === 'cues' ? 'permission' : null);
    const first = await push();
    expect(first).toMatchObject({ sent: 1, rejected: 1, acknowledged: 0 });
    const [rejected] = await store.listRejected(TEAM);
    expect(rejected).toMatchObject({ status: 'rejected', rejectReason: 'permission', lastError: 'refused: permission', attempts: 1 });
    expect(await store.pendingCount(TEAM)).toBe(0);
    expect(await store.rejectedCount(TEAM)).toBe(1);

    const calls = server.pushCalls;
    const again = await push();
    expect(again.sent).toBe(0);
    expect(server.pushCalls).toBe(calls);
    expect((await store.listRejected(TEAM))[0].attempts).toBe(1);
    // The local value stays, for the coach to retry or discard.
    expect((await store.listCues(TEAM)).find((c) => c.id === CUES[0].id)!.label).toBe('Ankles first');
  });

  it('splits batches by op count and by size, in outbox order', async () => {
    const { server, store, tap } = await setup();
    for (let i = 0; i < 40; i += 1) await tap(SKATERS, 'good', `Note ${i} ${'é'.repeat(200)}`);
    const bodies: PushBody[] = [];
    const transport: SyncTransport = {
      push: (body) => {
        bodies.push(body);
        return server.transport.push(body);
      },
      pull: server.transport.pull,
    };
    const maxBytes = 8_000;
    await pushOutbox(store, transport, { teamId: TEAM, clientId: store.clientId, batchSize: 25, maxBytes });
    expect(bodies.length).toBeGreaterThan(121 / 25);
    for (const body of bodies) {
      expect(body.ops.length).toBeLessThanOrEqual(25);
      expect(utf8Length(JSON.stringify(body))).toBeLessThanOrEqual(maxBytes);
    }
    const seqOrder = bodies.flatMap((b) => b.ops.map((o) => o.opId));
    expect(new Set(seqOrder).size).toBe(121);
    expect(server.table('observations').size).toBe(120);
    expect(await store.pendingCount()).toBe(0);
  });

  it('never sends more than 500 ops per request', async () => {
    const { server, store, driver } = await setup();
    // 1,100 cue edits straight into the outbox (as if made over a long offline week).
    await driver.exec('BEGIN');
    for (let i = 0; i < 1100; i += 1) {
      await driver.run(
        `INSERT INTO outbox (op_id, team_id, user_id, tbl, record_id, kind, fields, hlc, created_at)
         VALUES (?, ?, ?, 'cues', ?, 'upsert', ?, ?, '2026-12-02T09:00:00Z')`,
        [`0193a000-0000-7000-8000-${String(i).padStart(12, '0')}`, TEAM, COACH, CUES[0].id, JSON.stringify({ sortOrder: i }), JSON.stringify({ sortOrder: store.lastClock() })],
      );
    }
    await driver.exec('COMMIT');
    const sizes: number[] = [];
    const transport: SyncTransport = { push: (b) => (sizes.push(b.ops.length), server.transport.push(b)), pull: server.transport.pull };
    await pushOutbox(store, transport, { teamId: TEAM, clientId: store.clientId, batchSize: 10_000 });
    expect(sizes).toEqual([500, 500, 100]);
  });

  it('pushes only the given team’s entries', async () => {
    const { store, push, tap } = await setup();
    await tap();
    await store.addCue(OTHER_TEAM, COACH, 'curve', 'Other team cue');
    await push();
    const left = await store.listOutbox();
    expect(left).toHaveLength(1);
    expect(left[0].teamId).toBe(OTHER_TEAM);
  });

  it('a request refused as malformed is split until only the bad op is rejected', async () => {
    const { server, store, tap } = await setup();
    const created = await tap(SKATERS);
    const bad = (await store.listOutbox()).find((e) => e.recordId === created[1].id)!.opId;
    const transport: SyncTransport = {
      push: async (body) => {
        if (body.ops.some((o) => o.opId === bad)) throw new RequestRefused('note is not valid', 400, 'validation');
        return server.transport.push(body);
      },
      pull: server.transport.pull,
    };
    const summary = await pushOutbox(store, transport, { teamId: TEAM, clientId: store.clientId });
    expect(summary).toMatchObject({ acknowledged: 3, rejected: 1 });
    const [rejected] = await store.listRejected();
    expect(rejected).toMatchObject({ opId: bad, rejectReason: 'validation', lastError: 'note is not valid' });
    expect(server.table('observations').size).toBe(2);
  });

  it('folds the server clock into the device clock', async () => {
    const { server, store, tap, push } = await setup();
    await tap();
    server.time = Date.UTC(2026, 11, 2, 9, 30); // the server is half an hour ahead
    await push();
    expect(store.lastClock() > `${String(Date.UTC(2026, 11, 2, 9, 29)).padStart(15, '0')}`).toBe(true);
  });
});
