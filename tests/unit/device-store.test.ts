/**
 * The device store's real SQL (through sql.js): migrations, the outbox written with every change
 * in the same transaction, per-field clocks, undo that leaves no trace, tombstones for deletes.
 */
import { v7 as uuidv7 } from 'uuid';
import { decodeHlc } from '../../shared/hlc';
import type { Cue } from '../../shared/schemas';
import { DEVICE_SCHEMA_VERSION, migrateDevice } from '../../sync/schema';
import { DeviceStore, localDay, sessionIdFor, StoreError } from '../../sync/store';
import { openMemoryDriver } from './support/sqljs-driver';

const TEAM = '0193a000-0000-7000-8000-00000000aaaa';
const COACH = '0193a000-0000-7000-8000-00000000c0c0';
const skaterIds = [uuidv7(), uuidv7(), uuidv7()];
const cue: Cue = { id: uuidv7(), phase: 'curve', label: 'Lean in from the ankle', sortOrder: 1, archived: false };

async function openStore(now = () => Date.UTC(2026, 11, 2, 9, 0, 0)) {
  const driver = await openMemoryDriver();
  const store = await DeviceStore.open(driver, { now });
  await store.loadTeam(TEAM, {
    groups: [],
    skaters: skaterIds.map((id, i) => ({ id, displayName: `Skater ${i}`, groupId: null, hasAccount: false, retired: false })),
    cues: [cue, { id: uuidv7(), phase: 'curve', label: 'Hug the blocks', sortOrder: 2, archived: false }],
  });
  const session = await store.startSession(TEAM, COACH);
  return { driver, store, session };
}

describe('device schema', () => {
  it('migrates a new database to the latest version and is idempotent', async () => {
    const driver = await openMemoryDriver();
    expect(await migrateDevice(driver)).toBe(DEVICE_SCHEMA_VERSION);
    expect(await migrateDevice(driver)).toBe(DEVICE_SCHEMA_VERSION);
    const [{ user_version }] = await driver.all<{ user_version: number }>('PRAGMA user_version');
    expect(user_version).toBe(DEVICE_SCHEMA_VERSION);
    const tables = (await driver.all<{ name: string }>(`SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name`)).map((t) => t.name);
    expect(tables).toEqual(expect.arrayContaining(['cues', 'groups', 'meta', 'observations', 'outbox', 'sessions', 'skaters']));
  });

  it('refuses a database from a newer app version', async () => {
    const driver = await openMemoryDriver();
    await driver.exec(`PRAGMA user_version = ${DEVICE_SCHEMA_VERSION + 1}`);
    await expect(migrateDevice(driver)).rejects.toThrow(/newer/);
  });
});

describe('DeviceStore', () => {
  it('starts one session per team and day with the same id on every device', async () => {
    const { store, session } = await openStore();
    expect(session.day).toBe(localDay(Date.UTC(2026, 11, 2, 9)));
    expect(session.id).toBe(sessionIdFor(TEAM, session.day));
    expect((await store.startSession(TEAM, COACH)).id).toBe(session.id);
    // Opening the board sends nothing; the first note queues the session once.
    expect((await store.listOutbox()).filter((o) => o.table === 'sessions')).toHaveLength(0);
    for (let i = 0; i < 2; i += 1) {
      await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[0]], cueId: cue.id, mark: 'good' });
    }
    const ops = (await store.listOutbox()).filter((o) => o.table === 'sessions');
    expect(ops).toHaveLength(1);
    expect(ops[0].fields).toMatchObject({ day: session.day, focusCueIds: [] });
    // Starting values carry the oldest clock: any coach's real edit of the session wins over them.
    expect(decodeHlc(ops[0].hlc.title).wall).toBe(0);
    expect(await store.pendingByTable()).toEqual({ observations: 2, sessions: 1, cues: 0, runs: 0, crossings: 0, targets: 0 });
  });

  it('writes one observation and one outbox entry per selected skater (a group cue)', async () => {
    const { store, session } = await openStore();
    const before = (await store.listOutbox()).length;
    const created = await store.recordObservations({
      teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds, cueId: cue.id, mark: 'needs_work',
    });
    expect(created).toHaveLength(3);
    expect(new Set(created.map((o) => o.skaterId))).toEqual(new Set(skaterIds));
    const ops = (await store.listOutbox()).slice(before).filter((o) => o.table === 'observations');
    expect(ops.map((o) => o.recordId)).toEqual(created.map((o) => o.id));
    expect(ops.every((o) => o.kind === 'upsert' && o.fields.cueId === cue.id && o.fields.mark === 'needs_work')).toBe(true);
    // Every changed field carries a clock value.
    expect(Object.keys(ops[0].hlc).sort()).toEqual(Object.keys(ops[0].fields).sort());
    expect(await store.pendingCount()).toBe(before + 3 + 1); // and the session, queued with its first note
  });

  it('rolls back the row when its outbox entry cannot be written (one transaction)', async () => {
    const { store, session, driver } = await openStore();
    await driver.exec(`CREATE TRIGGER break_outbox BEFORE INSERT ON outbox BEGIN SELECT RAISE(ABORT, 'disk full'); END`);
    await expect(
      store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[0]], cueId: cue.id, mark: 'good' }),
    ).rejects.toThrow(/disk full/);
    expect(await store.listObservations(session.id)).toEqual([]);
  });

  it('issues strictly increasing clock values, also when the device clock goes back', async () => {
    let t = Date.UTC(2026, 11, 2, 9);
    const { store, session } = await openStore(() => t);
    const seen: string[] = [];
    for (const step of [0, 0, -60_000, 5, -1]) {
      t += step;
      const [o] = await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[0]], cueId: cue.id, mark: 'good' });
      seen.push((await store.listOutbox()).find((op) => op.recordId === o.id)!.hlc.mark);
    }
    expect([...seen].sort()).toEqual(seen);
    expect(new Set(seen).size).toBe(seen.length);
  });

  it('keeps the clock across a restart of the store', async () => {
    const { store, driver } = await openStore();
    const last = store.lastClock();
    const reopened = await DeviceStore.open(driver, { now: () => Date.UTC(2020, 0, 1) });
    expect(reopened.device).toBe(store.device);
    const next = await reopened.startSession(TEAM, COACH, '2020-01-01');
    await reopened.updateSession(next.id, COACH, { rink: 'Outdoor oval' });
    const op = (await reopened.listOutbox()).find((o) => o.recordId === next.id && o.fields.rink === 'Outdoor oval')!;
    expect(op.hlc.rink > last).toBe(true);
    expect(decodeHlc(op.hlc.rink).node).toBe(store.device);
  });

  it('undo of an unsent observation leaves no row and no outbox entry', async () => {
    const { store, session, driver } = await openStore();
    const [o] = await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[1]], cueId: cue.id, mark: 'needs_work' });
    await store.removeObservations([o.id], COACH);
    expect(await store.listObservations(session.id)).toEqual([]);
    expect((await store.pendingByTable()).observations).toBe(0);
    expect(await driver.all(`SELECT id FROM observations WHERE id = ?`, [o.id])).toEqual([]);
  });

  it('deleting an observation the server may have seen leaves a tombstone and a delete op', async () => {
    const { store, session, driver } = await openStore();
    const [o] = await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[1]], cueId: cue.id, mark: 'needs_work' });
    await driver.run(`UPDATE outbox SET sent_at = '2026-12-02T09:00:01Z' WHERE record_id = ?`, [o.id]);
    await store.removeObservations([o.id], COACH);
    expect(await store.listObservations(session.id)).toEqual([]);
    const [row] = await driver.all<{ deleted: number }>(`SELECT deleted FROM observations WHERE id = ?`, [o.id]);
    expect(row.deleted).toBe(1);
    const ops = (await store.listOutbox()).filter((op) => op.recordId === o.id);
    expect(ops.map((op) => op.kind)).toEqual(['upsert', 'delete']);
  });

  it('edits carry only the changed fields, each with a newer clock', async () => {
    const { store, session } = await openStore();
    const [o] = await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[2]], cueId: cue.id, mark: 'needs_work' });
    const edited = await store.updateObservation(o.id, COACH, { mark: 'good', note: 'Much lower in the curve' });
    expect(edited).toMatchObject({ mark: 'good', note: 'Much lower in the curve', noteShared: false });
    const ops = (await store.listOutbox()).filter((op) => op.recordId === o.id);
    expect(ops).toHaveLength(2);
    expect(ops[1].fields).toEqual({ mark: 'good', note: 'Much lower in the curve' });
    expect(ops[1].hlc.mark > ops[0].hlc.mark).toBe(true);
  });

  it('counts waiting records, not entries: a note edited twice offline is one waiting change', async () => {
    const { store, session } = await openStore();
    const [o] = await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[1]], cueId: cue.id, mark: 'needs_work' });
    await store.updateObservation(o.id, COACH, { note: 'Knee over the toe' });
    await store.updateObservation(o.id, COACH, { mark: 'good' });
    expect(await store.pendingCount(TEAM)).toBe(4); // three entries for the note, one for the session
    expect(await store.pendingRecordCount(TEAM)).toBe(2);
    expect(await store.pendingRecordCount()).toBe(2);
    expect(await store.pendingByTable(TEAM)).toEqual({ observations: 1, sessions: 1, cues: 0, runs: 0, crossings: 0, targets: 0 });
    expect(await store.pendingRecordCount('0193a000-0000-7000-8000-00000000bbbb')).toBe(0);
  });

  it('refuses a note over the limit with a clear message and writes nothing', async () => {
    const { store, session } = await openStore();
    const before = await store.pendingCount();
    await expect(
      store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[0]], cueId: cue.id, mark: 'good', note: 'x'.repeat(281) }),
    ).rejects.toThrow(new StoreError('A note can be at most 280 characters'));
    expect(await store.pendingCount()).toBe(before);
  });

  it('adds, renames, reorders and archives cues, each through the outbox', async () => {
    const { store } = await openStore();
    const added = await store.addCue(TEAM, COACH, 'curve', '  Quiet upper body ');
    expect(added).toMatchObject({ label: 'Quiet upper body', sortOrder: 3 });
    await store.renameCue(added.id, COACH, 'Still upper body');
    await store.moveCue(added.id, COACH, 'up');
    await store.setCueArchived(cue.id, COACH, true);
    const cues = await store.listCues(TEAM);
    const curve = cues.filter((c) => c.phase === 'curve' && !c.archived).map((c) => c.label);
    expect(curve).toEqual(['Still upper body', 'Hug the blocks']);
    expect(cues.find((c) => c.id === cue.id)!.archived).toBe(true);
    await expect(store.renameCue(added.id, COACH, 'x')).rejects.toThrow(StoreError);
    const cueOps = (await store.listOutbox()).filter((o) => o.table === 'cues');
    expect(cueOps.length).toBeGreaterThanOrEqual(4);
  });

  it('a reload of the team from the server keeps cues with local edits waiting', async () => {
    const { store } = await openStore();
    await store.renameCue(cue.id, COACH, 'Ankles lead the lean');
    await store.loadTeam(TEAM, { groups: [], skaters: [], cues: [{ ...cue, label: 'Server wording' }] });
    expect((await store.listCues(TEAM)).find((c) => c.id === cue.id)!.label).toBe('Ankles lead the lean');
  });
});

describe('clock correction', () => {
  it('a device a year ahead moves its clock and its unsent edits back by what the server says', async () => {
    const year = 365 * 86_400_000;
    const realNow = Date.UTC(2026, 11, 2, 9);
    const { store, session } = await openStore(() => realNow + year);
    const [o] = await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skaterIds[0]], cueId: cue.id, mark: 'needs_work' });
    const before = (await store.listOutbox()).find((op) => op.recordId === o.id)!;
    expect(decodeHlc(before.hlc.mark).wall).toBe(realNow + year);

    const offset = await store.correctClock(async () => new Date(realNow).toISOString());
    expect(offset).toBe(-year);
    const after = (await store.listOutbox()).find((op) => op.recordId === o.id)!;
    expect(decodeHlc(after.hlc.mark).wall).toBe(realNow);
    // New edits are stamped with the corrected time, and the correction survives a restart.
    await store.updateObservation(o.id, COACH, { mark: 'good' });
    const edit = (await store.listOutbox()).filter((op) => op.recordId === o.id)[1];
    expect(decodeHlc(edit.hlc.mark).wall).toBeLessThan(realNow + 60_000);
  });

  it('leaves a clock within a minute of the server alone', async () => {
    const realNow = Date.UTC(2026, 11, 2, 9);
    const { store } = await openStore(() => realNow + 30_000);
    expect(await store.correctClock(async () => new Date(realNow).toISOString())).toBe(0);
  });
});
