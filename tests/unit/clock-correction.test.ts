/**
 * Clock correction on a device whose clock runs ahead: the instants it wrote while offline
 * (a note's createdAt, the session's createdAt, a skater's acknowledgedAt) move back with the
 * clock values of the unsent ops, in the ops and in the rows they created, so the server (which
 * refuses instants more than 60 s after its own clock) accepts them. Values the device did not
 * make, and ops already sent, stay as they are.
 */
import { v7 as uuidv7 } from 'uuid';
import { DeviceStore } from '../../sync/store';
import { openMemoryDriver } from './support/sqljs-driver';

const TEAM = '0193c000-0000-7000-8000-00000000aaaa';
const COACH = '0193c000-0000-7000-8000-00000000c0c0';
const SKATER_USER = '0193c000-0000-7000-8000-00000000d0d0';
const SKATER = '0193c000-0000-7000-8000-0000000000f1';
const CUE = { id: '0193c000-0000-7000-8000-0000000000c1', phase: 'curve' as const, label: 'Lean in from the ankle', sortOrder: 1, archived: false };

const REAL_NOW = Date.UTC(2026, 11, 2, 9);
const AHEAD = 10 * 60_000;
const iso = (ms: number) => new Date(ms).toISOString();

async function openAhead() {
  const driver = await openMemoryDriver();
  const store = await DeviceStore.open(driver, { now: () => REAL_NOW + AHEAD });
  await store.loadTeam(TEAM, { groups: [], skaters: [{ id: SKATER, displayName: 'Fenna', groupId: null, hasAccount: true, retired: false }], cues: [CUE] });
  return { driver, store };
}

const serverSays = async () => iso(REAL_NOW);

describe('clock correction of instants', () => {
  it('a note recorded offline 10 minutes ahead gets its createdAt moved back, in the op and in the row', async () => {
    const { driver, store } = await openAhead();
    const session = await store.startSession(TEAM, COACH);
    const [note] = await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [SKATER], cueId: CUE.id, mark: 'good' });
    expect(note.createdAt).toBe(iso(REAL_NOW + AHEAD));

    expect(await store.correctClock(serverSays)).toBe(-AHEAD);

    const ops = await store.listOutbox();
    const noteOp = ops.find((op) => op.recordId === note.id)!;
    const sessionOp = ops.find((op) => op.recordId === session.id)!;
    expect(noteOp.fields.createdAt).toBe(iso(REAL_NOW));
    expect(sessionOp.fields.createdAt).toBe(iso(REAL_NOW));
    const [row] = await store.listObservations(session.id);
    expect(row.createdAt).toBe(iso(REAL_NOW));
    expect((await store.getSession(session.id))!.createdAt).toBe(iso(REAL_NOW));
    // Everything else the op carries is as it was.
    expect(noteOp.fields).toMatchObject({ sessionId: session.id, skaterId: SKATER, cueId: CUE.id, mark: 'good', createdBy: COACH });
    expect(await driver.all(`SELECT id FROM observations WHERE created_at = ?`, [iso(REAL_NOW + AHEAD)])).toEqual([]);
  });

  it("a skater's acknowledgement moves back; the note's createdAt from the coach's device stays", async () => {
    const { driver, store } = await openAhead();
    const coachCreatedAt = '2026-12-02T08:30:00.000Z';
    const noteId = uuidv7();
    // A note pulled from the server: its values were made elsewhere.
    await driver.run(
      `INSERT INTO observations (id, team_id, session_id, skater_id, cue_id, mark, note, note_shared, created_at, created_by, hlc, synced)
       VALUES (?, ?, ?, ?, ?, 'good', '', 0, ?, ?, '{}', 1)`,
      [noteId, TEAM, uuidv7(), SKATER, CUE.id, coachCreatedAt, COACH],
    );
    const acknowledgedAt = await store.acknowledgeObservation(noteId, SKATER_USER);
    expect(acknowledgedAt).toBe(iso(REAL_NOW + AHEAD));

    await store.correctClock(serverSays);

    const [op] = await store.listOutbox();
    expect(op.fields).toEqual({ acknowledgedAt: iso(REAL_NOW) });
    const [row] = await driver.all<{ created_at: string; acknowledged_at: string }>(`SELECT created_at, acknowledged_at FROM observations WHERE id = ?`, [noteId]);
    expect(row).toEqual({ created_at: coachCreatedAt, acknowledged_at: iso(REAL_NOW) });
  });

  it('leaves the instants of ops already sent, and of ops another device made, as they are', async () => {
    const { driver, store } = await openAhead();
    const session = await store.startSession(TEAM, COACH);
    const tap = () => store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [SKATER], cueId: CUE.id, mark: 'good' });
    const [sent] = await tap();
    await driver.run(`UPDATE outbox SET sent_at = ? WHERE record_id IN (?, ?)`, [iso(REAL_NOW), sent.id, session.id]);
    const [foreign] = await tap();
    const [{ hlc }] = await driver.all<{ hlc: string }>(`SELECT hlc FROM outbox WHERE record_id = ?`, [foreign.id]);
    const otherNode = hlc.replace(new RegExp(store.device, 'g'), 'another-device');
    await driver.run(`UPDATE outbox SET hlc = ? WHERE record_id = ?`, [otherNode, foreign.id]);

    await store.correctClock(serverSays);

    const ops = await store.listOutbox();
    expect(ops.find((op) => op.recordId === sent.id)!.fields.createdAt).toBe(iso(REAL_NOW + AHEAD));
    expect(ops.find((op) => op.recordId === foreign.id)!.fields.createdAt).toBe(iso(REAL_NOW + AHEAD));
    expect((await store.listObservations(session.id)).map((o) => o.createdAt)).toEqual([iso(REAL_NOW + AHEAD), iso(REAL_NOW + AHEAD)]);
  });
});
