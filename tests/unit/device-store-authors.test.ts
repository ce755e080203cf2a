/**
 * Who wrote a note and who may change it, on the device (sync/tables/observations.ts over sql.js):
 * a note carries its author's name from the tap on; a coach changes and deletes only their own
 * notes, the head coach any; only the skater says "got it", never a guardian.
 */
import { v7 as uuidv7 } from 'uuid';
import { coachShortName, mayChangeNote } from '../../shared/authors';
import type { Cue } from '../../shared/schemas';
import { DeviceStore, StoreError } from '../../sync/store';
import { openMemoryDriver } from './support/sqljs-driver';

const TEAM = '0193a000-0000-7000-8000-00000000aaaa';
const ANOUK = '0193a000-0000-7000-8000-00000000c0c1';
const JELLE = '0193a000-0000-7000-8000-00000000c0c2';
const skaterId = uuidv7();
const cue: Cue = { id: uuidv7(), phase: 'curve', label: 'Lean in from the ankle', sortOrder: 1, archived: false };

async function openStore() {
  const store = await DeviceStore.open(await openMemoryDriver(), { now: () => Date.UTC(2026, 11, 2, 9, 0, 0) });
  await store.loadTeam(TEAM, { groups: [], skaters: [{ id: skaterId, displayName: 'Fenna Dijk', groupId: null, hasAccount: true, retired: false }], cues: [cue] });
  const session = await store.startSession(TEAM, ANOUK);
  const [note] = await store.recordObservations({
    teamId: TEAM, userId: ANOUK, authorName: 'Anouk Brink', sessionId: session.id, skaterIds: [skaterId], cueId: cue.id, mark: 'needs_work',
  });
  return { store, session, note };
}

describe('the author of a note on the device', () => {
  it('is written with the tap, shown at once and sent with the note', async () => {
    const { store, session, note } = await openStore();
    expect(note.authorName).toBe('Anouk Brink');
    expect((await store.listObservations(session.id))[0]).toMatchObject({ id: note.id, authorName: 'Anouk Brink' });
    const [op] = (await store.listOutbox()).filter((o) => o.table === 'observations');
    expect(op.fields).toMatchObject({ createdBy: ANOUK, authorName: 'Anouk Brink' });
  });

  it.each([
    ['Anouk Brink', 'Coach Anouk'],
    ['  Jelle   van Vink ', 'Coach Jelle'],
    ['Marit', 'Coach Marit'],
    ['', ''],
    [undefined, ''],
  ])('%j is shown as %j', (name, short) => {
    expect(coachShortName(name)).toBe(short);
  });
});

describe('who may change a note on the device', () => {
  it('another coach may neither edit nor delete it; nothing is queued', async () => {
    const { store, session, note } = await openStore();
    const before = (await store.listOutbox()).length;
    await expect(store.updateObservation(note.id, JELLE, { note: 'mine now' }, 'coach')).rejects.toThrow(StoreError);
    await expect(store.removeObservations([note.id], JELLE, 'coach')).rejects.toThrow(/Only the coach who wrote this note or the head coach/);
    // Without a role the store assumes the narrower one.
    await expect(store.updateObservation(note.id, JELLE, { mark: 'good' })).rejects.toThrow(StoreError);
    expect((await store.listOutbox()).length).toBe(before);
    expect((await store.listObservations(session.id))[0]).toMatchObject({ note: '', mark: 'needs_work' });
  });

  it('its author and the head coach may', async () => {
    const { store, session, note } = await openStore();
    await store.updateObservation(note.id, ANOUK, { note: 'knee over toe' }, 'coach');
    await store.updateObservation(note.id, JELLE, { mark: 'good' }, 'head_coach');
    expect((await store.listObservations(session.id))[0]).toMatchObject({ note: 'knee over toe', mark: 'good' });
    await store.removeObservations([note.id], JELLE, 'head_coach');
    expect(await store.listObservations(session.id)).toEqual([]);
  });

  it.each([
    ['its author, a coach', ANOUK, 'coach', true],
    ['the head coach', JELLE, 'head_coach', true],
    ['another coach', JELLE, 'coach', false],
    ['a skater', ANOUK, 'skater', false],
    ['a guardian', ANOUK, 'guardian', false],
  ] as const)('%s', (_who, userId, role, may) => {
    expect(mayChangeNote({ createdBy: ANOUK }, userId, role)).toBe(may);
  });
});

describe('"got it" on the device', () => {
  it('is refused to a guardian and taken from the skater', async () => {
    const { store, note } = await openStore();
    await expect(store.acknowledgeObservation(note.id, uuidv7(), 'guardian')).rejects.toThrow(/Only the skater/);
    expect((await store.listOutbox()).filter((o) => 'acknowledgedAt' in o.fields)).toHaveLength(0);
    await expect(store.acknowledgeObservation(note.id, uuidv7(), 'skater')).resolves.toEqual(expect.any(String));
  });
});
