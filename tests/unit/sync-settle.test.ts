/**
 * The push's pure settle step (server/services/sync/settle.ts) with plain values, no PostgreSQL:
 * permissions per table and field, values, authors, instants, merge by clock, delete wins, and
 * tombstones for unknown ids. fast-check (fixed seed) checks that the order of arrival of edits
 * with distinct clocks does not change the outcome.
 */
import fc from 'fast-check';
import { encodeHlc, HybridClock } from '../../shared/hlc';
import type { Op } from '../../shared/schemas/sync';
import { emptyRecord, recordKey, settleBatch, type BatchState, type Caller, type SettleContext } from '../../server/services/sync/settle';

const TEAM_CREATED = Date.parse('2026-01-01T00:00:00Z');
const NOW = Date.parse('2026-11-20T18:00:00Z');
const head: Caller = { userId: '0190f2c4-0000-7000-8000-000000000001', role: 'head_coach', skaterId: null, displayName: 'Marit Oosterhof' };
const coach: Caller = { userId: '0190f2c4-0000-7000-8000-000000000002', role: 'coach', skaterId: null, displayName: 'Anouk Brink' };
const otherCoach: Caller = { userId: '0190f2c4-0000-7000-8000-000000000004', role: 'coach', skaterId: null, displayName: 'Jelle Vink' };
const skaterA = '0190f2c4-0000-7000-8000-00000000000a';
const skater: Caller = { userId: '0190f2c4-0000-7000-8000-000000000003', role: 'skater', skaterId: skaterA, displayName: 'Fenna Dijk' };
const guardian: Caller = { userId: '0190f2c4-0000-7000-8000-000000000005', role: 'guardian', skaterId: skaterA, displayName: 'Rob Dijk' };
const SESSION = '0190f2c4-0000-7000-8000-0000000000f1';
const CUE = '0190f2c4-0000-7000-8000-0000000000c1';

const context = (caller: Caller): SettleContext => ({ caller, now: NOW, teamCreatedAt: TEAM_CREATED, maxLeadMs: 60_000 });

function state(): BatchState {
  const s: BatchState = { records: new Map(), live: new Map([['skaters', new Set([skaterA])]]) };
  s.records.set(recordKey('sessions', SESSION), { ...emptyRecord('sessions', SESSION), exists: true, values: { day: '2026-11-20' } });
  s.records.set(recordKey('cues', CUE), { ...emptyRecord('cues', CUE), exists: true, values: { phase: 'start', label: 'Sit low' } });
  return s;
}

let n = 0;
const id = () => `0190f2c4-0000-7000-8000-${String(++n).padStart(12, '0')}`;
const hlc = (wall: number, counter = 0, node = 'dev') => encodeHlc({ wall, counter, node });

function upsert(recordId: string, fields: Record<string, unknown>, clock: string, table: Op['table'] = 'observations'): Op {
  return { opId: id(), table, recordId, kind: 'upsert', fields, hlc: Object.fromEntries(Object.keys(fields).map((f) => [f, clock])) };
}

const create = (recordId: string, by: Caller, extra: Record<string, unknown> = {}) =>
  upsert(recordId, { sessionId: SESSION, skaterId: skaterA, cueId: CUE, mark: 'needs_work', createdAt: new Date(NOW - 1000).toISOString(), createdBy: by.userId, ...extra }, hlc(NOW - 1000));

describe('settleBatch', () => {
  it('creates with the author from the caller and the initial values', () => {
    const s = state();
    const rec = id();
    const { createdBy: _ignored, ...fields } = create(rec, coach).fields;
    const op = upsert(rec, fields, hlc(NOW - 10));
    const { results } = settleBatch([op], s, context(coach));
    expect(results.get(op.opId)?.status).toBe('applied');
    expect(s.records.get(recordKey('observations', rec))?.values).toMatchObject({ createdBy: coach.userId, note: '', noteShared: false, acknowledgedAt: null });
  });

  it.each([
    ['a forged author', coach, () => create(id(), head), 'permission'],
    ['a plain coach editing the cue library', coach, () => upsert(CUE, { label: 'Sit lower' }, hlc(NOW), 'cues'), 'permission'],
    ['a coach acknowledging', coach, () => upsert(id(), { acknowledgedAt: new Date(NOW).toISOString() }, hlc(NOW)), 'permission'],
    ['a skater creating a note', skater, () => create(id(), skater), 'permission'],
    ['a field named constructor', head, () => upsert(id(), { constructor: 1 }, hlc(NOW)), 'validation'],
    ['a clock value for a field not sent', head, () => ({ ...create(id(), head), hlc: { ...create(id(), head).hlc, colour: hlc(NOW) } }), 'validation'],
    ['an instant past the allowed lead', head, () => create(id(), head, { createdAt: new Date(NOW + 120_000).toISOString() }), 'validation'],
    ['an instant before the team', head, () => create(id(), head, { createdAt: '2025-06-01T00:00:00.000Z' }), 'validation'],
    ['an edit of an unknown record', head, () => upsert(id(), { mark: 'good' }, hlc(NOW)), 'unknown_record'],
    ['a note for a skater of another team', head, () => create(id(), head, { skaterId: id() }), 'validation'],
  ])('refuses %s', (_name, caller, makeOp, reason) => {
    const s = state();
    const op = makeOp();
    const { results } = settleBatch([op], s, context(caller));
    expect(results.get(op.opId)).toMatchObject({ status: 'rejected', reason });
    expect(s.records.get(recordKey(op.table, op.recordId))?.dirty ?? false).toBe(false);
  });

  it("lets a skater acknowledge only their own skater's note", () => {
    const s = state();
    const mine = id();
    const theirs = id();
    settleBatch([create(mine, head), create(theirs, head, { skaterId: skaterA })], s, context(head));
    s.records.get(recordKey('observations', theirs))!.values.skaterId = id();
    const ack = (rec: string) => upsert(rec, { acknowledgedAt: new Date(NOW).toISOString() }, hlc(NOW));
    const a = ack(mine);
    const b = ack(theirs);
    const { results } = settleBatch([a, b], s, context(skater));
    expect(results.get(a.opId)?.status).toBe('applied');
    expect(results.get(b.opId)).toMatchObject({ status: 'rejected', reason: 'permission' });
  });

  it("writes the author's name from the caller, never from the op, and keeps it fixed", () => {
    const s = state();
    const rec = id();
    const made = create(rec, coach, { authorName: 'Someone Else' });
    expect(settleBatch([made], s, context(coach)).results.get(made.opId)?.status).toBe('applied');
    expect(s.records.get(recordKey('observations', rec))?.values.authorName).toBe('Anouk Brink');
    const rename = upsert(rec, { authorName: 'Renamed', mark: 'good' }, hlc(NOW));
    settleBatch([rename], s, context(coach));
    expect(s.records.get(recordKey('observations', rec))?.values).toMatchObject({ authorName: 'Anouk Brink', mark: 'good' });
  });

  describe('a note is changed by its author or the head coach only', () => {
    const del = (rec: string): Op => ({ opId: id(), table: 'observations', recordId: rec, kind: 'delete', fields: {}, hlc: { deleted: hlc(NOW) } });
    const edit = (rec: string) => upsert(rec, { note: 'seen from the far side', mark: 'good' }, hlc(NOW));
    it.each([
      ['the author edits', coach, edit, 'applied'],
      ['the author deletes', coach, del, 'applied'],
      ['the head coach edits', head, edit, 'applied'],
      ['the head coach deletes', head, del, 'applied'],
      ['another coach edits', otherCoach, edit, 'rejected'],
      ['another coach deletes', otherCoach, del, 'rejected'],
    ] as const)('%s', (_name, caller, makeOp, status) => {
      const s = state();
      const rec = id();
      settleBatch([create(rec, coach)], s, context(coach));
      s.records.get(recordKey('observations', rec))!.dirty = false;
      const op = makeOp(rec);
      const { results } = settleBatch([op], s, context(caller));
      expect(results.get(op.opId)).toMatchObject(status === 'applied' ? { status } : { status, reason: 'permission' });
      const record = s.records.get(recordKey('observations', rec))!;
      if (status === 'rejected') expect(record).toMatchObject({ dirty: false, deletedAt: null, values: { note: '', mark: 'needs_work' } });
    });

    it('another coach cannot delete a note the author already deleted either (the same answer)', () => {
      const s = state();
      const rec = id();
      settleBatch([create(rec, coach), del(rec)], s, context(coach));
      const op = del(rec);
      expect(settleBatch([op], s, context(otherCoach)).results.get(op.opId)).toMatchObject({ status: 'rejected', reason: 'permission' });
    });

    it("session and cue changes keep their own rules (any coach edits a session's title)", () => {
      const s = state();
      const op = upsert(SESSION, { title: 'Evening ice' }, hlc(NOW), 'sessions');
      expect(settleBatch([op], s, context(otherCoach)).results.get(op.opId)?.status).toBe('applied');
    });
  });

  it('a guardian cannot acknowledge for the skater', () => {
    const s = state();
    const rec = id();
    settleBatch([create(rec, head)], s, context(head));
    const ack = upsert(rec, { acknowledgedAt: new Date(NOW).toISOString() }, hlc(NOW));
    expect(settleBatch([ack], s, context(guardian)).results.get(ack.opId)).toMatchObject({ status: 'rejected', reason: 'permission' });
    expect(s.records.get(recordKey('observations', rec))?.values.acknowledgedAt).toBeNull();
  });

  it('a delete wins over a later-clocked edit, and a delete of an unknown id leaves a tombstone that a create cannot undo', () => {
    const s = state();
    const rec = id();
    settleBatch([create(rec, head)], s, context(head));
    const del: Op = { opId: id(), table: 'observations', recordId: rec, kind: 'delete', fields: {}, hlc: { deleted: hlc(NOW - 500) } };
    const edit = upsert(rec, { note: 'later' }, hlc(NOW));
    settleBatch([del, edit], s, context(head));
    expect(s.records.get(recordKey('observations', rec))?.deletedAt).not.toBeNull();
    expect(s.records.get(recordKey('observations', rec))?.values.note).toBe('');

    const ghost = id();
    const del2: Op = { opId: id(), table: 'observations', recordId: ghost, kind: 'delete', fields: {}, hlc: { deleted: hlc(NOW) } };
    const late = create(ghost, head);
    const { results } = settleBatch([del2, late], s, context(head));
    expect(s.records.get(recordKey('observations', ghost))).toMatchObject({ ghost: true, exists: false });
    expect(results.get(late.opId)).toMatchObject({ status: 'applied', message: expect.stringMatching(/deleted/) });
  });

  it('fixed fields never change after the create', () => {
    const s = state();
    const rec = id();
    settleBatch([create(rec, head)], s, context(head));
    const move = upsert(rec, { createdAt: new Date(NOW).toISOString(), mark: 'good' }, hlc(NOW));
    settleBatch([move], s, context(head));
    expect(s.records.get(recordKey('observations', rec))?.values).toMatchObject({ createdAt: new Date(NOW - 1000).toISOString(), mark: 'good' });
  });

  it('edits with distinct clocks end the same whatever order they arrive in (fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ wall: fc.integer({ min: 0, max: 50 }), counter: fc.integer({ min: 0, max: 3 }), node: fc.constantFrom('a', 'b', 'c'), note: fc.string({ maxLength: 5 }) }), { minLength: 1, maxLength: 12 }),
        fc.integer(),
        (edits, shuffleSeed) => {
          const unique = [...new Map(edits.map((e) => [hlc(NOW - 100 + e.wall, e.counter, e.node), e])).entries()];
          const run = (order: typeof unique) => {
            const s = state();
            const rec = '0190f2c4-0000-7000-8000-0000000000aa';
            settleBatch([create(rec, head)], s, context(head));
            settleBatch(order.map(([clock, e]) => upsert(rec, { note: e.note }, clock)), s, context(head));
            return s.records.get(recordKey('observations', rec))!.values.note;
          };
          const shuffled = [...unique].sort((x, y) => ((x[0].charCodeAt(18) * 31 + shuffleSeed) % 7) - ((y[0].charCodeAt(18) * 31 + shuffleSeed) % 7));
          const newest = [...unique].sort(([a], [b]) => (a < b ? -1 : 1)).at(-1)![1].note.trim();
          expect(run(unique)).toBe(newest);
          expect(run(shuffled)).toBe(newest);
        },
      ),
      { seed: 2026, numRuns: 200 },
    );
  });
});

describe('HybridClock', () => {
  it('a remote value with the largest counter never leaves a clock that cannot tick', () => {
    const clock = new HybridClock('server', () => 1_000);
    clock.receive(encodeHlc({ wall: 5_000, counter: 999_999, node: 'hostile' }));
    const next = clock.now();
    expect(next > encodeHlc({ wall: 5_000, counter: 999_999, node: 'hostile' })).toBe(true);
    expect(() => clock.now()).not.toThrow();
  });
});
