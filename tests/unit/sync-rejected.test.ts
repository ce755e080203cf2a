/**
 * Step 6, rejected changes: listed with their reason, retried by hand, or discarded (a refused
 * create takes its local record along; a refused edit puts the previous value back; a refused
 * delete shows the record again).
 */
import { pushOutbox } from '../../sync/push';
import { StoreError } from '../../sync/store';
import { COACH, CUES, FakeSyncServer, SKATERS, TEAM, openDevice, seedServer } from './sync-fake-server';

async function setup() {
  const server = new FakeSyncServer();
  seedServer(server);
  const device = await openDevice();
  const push = () => pushOutbox(device.store, server.transport, { teamId: TEAM, clientId: device.store.clientId });
  return { server, ...device, push };
}

describe('rejected changes', () => {
  it('retry sends a rejected change again', async () => {
    const { server, store, push } = await setup();
    await store.renameCue(CUES[0].id, COACH, 'Ankles first');
    server.judge = () => 'permission';
    await push();
    const [entry] = await store.listRejected(TEAM);
    server.judge = () => null;
    await store.retryRejected(entry.opId);
    expect(await store.listOutbox()).toMatchObject([{ status: 'pending', attempts: 0, lastError: null, rejectReason: null }]);
    await push();
    expect(await store.listOutbox()).toEqual([]);
    expect(server.table('cues').get(CUES[0].id)!.label).toBe('Ankles first');
    await expect(store.retryRejected(entry.opId)).rejects.toBeInstanceOf(StoreError);
  });

  it('discarding a rejected create removes the local record and its queued edits', async () => {
    const { server, store, tap, push, session } = await setup();
    server.judge = (op) => (op.table === 'observations' ? 'validation' : null);
    const [o] = await tap();
    await store.updateObservation(o.id, COACH, { note: 'later edit' });
    await push();
    const rejected = await store.listRejected(TEAM);
    expect(rejected).toHaveLength(2);
    await store.discardRejected(rejected[0].opId);
    expect(await store.listObservations(session.id)).toEqual([]);
    expect(await store.listOutbox()).toEqual([]);
  });

  it('discarding a rejected edit puts the server’s value back', async () => {
    const { server, store, push } = await setup();
    await store.renameCue(CUES[0].id, COACH, 'First try');
    await store.renameCue(CUES[0].id, COACH, 'Second try');
    server.judge = (op) => (op.fields.label === 'Second try' ? 'validation' : null);
    await push();
    const [rejected] = await store.listRejected(TEAM);
    await store.discardRejected(rejected.opId);
    // The first rename was accepted: it is the server's value now.
    expect((await store.listCues(TEAM)).find((c) => c.id === CUES[0].id)!.label).toBe('First try');

    await store.renameCue(CUES[0].id, COACH, 'Third try');
    server.judge = () => 'permission';
    await push();
    await store.discardRejected((await store.listRejected(TEAM))[0].opId);
    expect((await store.listCues(TEAM)).find((c) => c.id === CUES[0].id)!.label).toBe('First try');
  });

  it('discarding a rejected delete shows the record again', async () => {
    const { server, store, tap, push, session } = await setup();
    const [o] = await tap([SKATERS[1]]);
    await push();
    await store.removeObservations([o.id], COACH);
    server.judge = (op) => (op.kind === 'delete' ? 'permission' : null);
    await push();
    expect(await store.listObservations(session.id)).toEqual([]);
    await store.discardRejected((await store.listRejected(TEAM))[0].opId);
    expect((await store.listObservations(session.id)).map((x) => x.id)).toEqual([o.id]);
  });
});
