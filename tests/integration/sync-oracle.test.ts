/**
 * A merge oracle for push (shared/SYNC.md "Conflicts"): random histories of ops from several
 * devices go to the real server (real PostgreSQL), and the same histories go through a small model
 * written from the contract alone - a plain Map of record -> field -> { clock, value } and a
 * deleted flag. After each history the server's records must equal the model's.
 *
 * The model's rules, as the contract states them (not as the server's code does them):
 * - per field, the newest clock wins; a clock equal to the one held loses (the held value stays);
 *   clocks order by wall time, then counter, then the device id;
 * - a delete wins over any edit, earlier or later, whatever their clocks;
 * - a delete of a record the server never saw leaves a tombstone: a later create stays deleted;
 * - an edit of a record that does not exist changes nothing;
 * - fixed fields (createdAt, createdBy; a session's day) never change after the create; a note's
 *   session, skater and cue are edited like any other field (tidy-up moves and merges notes);
 * - a session still holding live notes is not deleted (a merge moves them first);
 * - a value naming a session must name a live one (created, not deleted): otherwise the whole op
 *   is refused and changes nothing (a note moved into a session merged away meanwhile);
 * - the server clamps a clock value more than 60 s ahead of its own clock to that limit, keeping
 *   the order the clamped values of one batch had among themselves, and after every value it
 *   clamped before for the team (shared/SYNC.md "Conflicts"; server/services/sync/clock.ts header).
 *   The server's clock is pinned here, so the model computes the same clamped values.
 *
 * Clock values are drawn from a few walls around the pinned time (behind, within the lead, exactly
 * at the limit, just past it, an hour and a year ahead), a few counters, three device ids, and
 * "the very same value again" to make exact ties. fast-check, fixed seed.
 */
import fc from 'fast-check';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';
import type { Op, PushReply } from '../../shared/schemas/sync';
import { setServerTimeSource } from '../../server/services/sync/clock';
import { startTestServer, type Account, type TestServer } from './helpers';
import { makeTeam, push, sessionCreate, device, userIdOf, type SyncTeam } from './sync-helpers';

// ---- the model -----------------------------------------------------------------------------------

/** A clock value as the contract describes it. */
interface Clock {
  wall: number;
  counter: number;
  node: string;
}

const compareClocks = (a: Clock, b: Clock): number =>
  a.wall !== b.wall ? a.wall - b.wall : a.counter !== b.counter ? a.counter - b.counter : a.node < b.node ? -1 : a.node > b.node ? 1 : 0;

/** The wire form (fixed-width wall and counter, then the device id). */
const encode = (c: Clock) => `${String(c.wall).padStart(15, '0')}-${String(c.counter).padStart(6, '0')}-${c.node}`;
const decode = (value: string): Clock => {
  const [, wall, counter, node] = /^(\d{15})-(\d{6})-(.+)$/.exec(value)!;
  return { wall: Number(wall), counter: Number(counter), node };
};

type Table = 'observations' | 'sessions';

const EDITABLE: Record<Table, string[]> = {
  observations: ['mark', 'note', 'noteShared', 'sessionId', 'skaterId', 'cueId'],
  sessions: ['rink', 'title', 'focusCueIds'],
};
const FIXED: Record<Table, string[]> = {
  observations: ['createdAt', 'createdBy'],
  sessions: ['day', 'createdAt', 'createdBy'],
};

interface ModelRecord {
  table: Table;
  fields: Map<string, { clock: Clock; value: unknown }>;
  deleted: boolean;
  /** Created (a live or deleted record with values), as opposed to a bare tombstone. */
  created: boolean;
}

const LEAD_MS = 60_000;

class Model {
  readonly records = new Map<string, ModelRecord>();
  /** The last clamped value given out for the team (clamps continue after it). */
  private lastClamp: { wall: number; counter: number } | null = null;

  constructor(
    private readonly serverTime: number,
    /** Sessions that exist for the whole file (never deleted): every other must be live in the model. */
    private readonly standing: ReadonlySet<string> = new Set(),
  ) {}

  private holdsNotes(sessionId: string): boolean {
    for (const r of this.records.values()) {
      if (r.table === 'observations' && r.created && !r.deleted && r.fields.get('sessionId')?.value === sessionId) return true;
    }
    return false;
  }

  private liveSession(id: unknown): boolean {
    if (typeof id !== 'string') return false;
    if (this.standing.has(id)) return true;
    const record = this.records.get(id);
    return Boolean(record?.created && !record.deleted && record.table === 'sessions');
  }

  /** The documented clamp for one batch: distinct values past the limit, in order, from the limit (or after the last clamp) on. */
  clamp(values: string[]): Map<string, string> {
    const limit = this.serverTime + LEAD_MS;
    const out = new Map<string, string>();
    const ahead = [...new Set(values)].filter((v) => decode(v).wall > limit).sort((a, b) => compareClocks(decode(a), decode(b)));
    let next = this.lastClamp && this.lastClamp.wall >= limit ? { wall: this.lastClamp.wall, counter: this.lastClamp.counter + 1 } : { wall: limit, counter: 0 };
    for (const v of ahead) {
      out.set(v, encode({ ...next, node: decode(v).node }));
      this.lastClamp = next;
      next = { wall: next.wall, counter: next.counter + 1 };
    }
    return out;
  }

  /** One pushed batch, op by op, from `by` (a plain coach changes only the notes they wrote). */
  apply(ops: Op[], by: { userId: string; head: boolean }) {
    const clamped = this.clamp(ops.flatMap((op) => Object.values(op.hlc)));
    for (const op of ops) {
      const table = op.table as Table;
      const clockOf = (field: string) => decode(clamped.get(op.hlc[field]) ?? op.hlc[field]);
      const record = this.records.get(op.recordId);
      // PRODUCT.md: a coach changes their own notes, the head coach any (refused, nothing changes).
      if (table === 'observations' && !by.head && record?.created && record.fields.get('createdBy')?.value !== by.userId) continue;
      // A note moved (or made) into a session that is not live is refused whole.
      if (table === 'observations' && 'sessionId' in op.fields && !this.liveSession(op.fields.sessionId)) continue;
      if (op.kind === 'delete') {
        // A session still holding live notes is not deleted (the notes move first in a merge).
        if (table === 'sessions' && this.holdsNotes(op.recordId)) continue;
        // A session the server never held is not deleted (no tombstone for a future id), and a
        // live one only by its author or the head coach (shared/sync-tables.ts, deleteGuard).
        if (table === 'sessions' && !record?.created && !record?.deleted) continue;
        if (table === 'sessions' && record && !record.deleted && !by.head && record.fields.get('createdBy')?.value !== by.userId) continue;
        if (record) record.deleted = true;
        else this.records.set(op.recordId, { table, fields: new Map(), deleted: true, created: false });
        continue;
      }
      const isCreate = FIXED[table].filter((f) => f !== 'createdBy').every((f) => f in op.fields);
      if (!record || !record.created) {
        // Unknown (or only a tombstone): only a create makes the record; an edit changes nothing.
        if (!isCreate) continue;
        const fields = new Map<string, { clock: Clock; value: unknown }>();
        for (const [field, value] of Object.entries(op.fields)) fields.set(field, { clock: clockOf(field), value });
        this.records.set(op.recordId, { table, fields, deleted: record?.deleted ?? false, created: true });
        continue;
      }
      for (const [field, value] of Object.entries(op.fields)) {
        if (FIXED[table].includes(field)) continue;
        const held = record.fields.get(field);
        const clock = clockOf(field);
        if (!held || compareClocks(clock, held.clock) > 0) record.fields.set(field, { clock, value });
      }
    }
  }
}

// ---- histories ---------------------------------------------------------------------------------

const NODES = ['devA', 'devB', 'devC'];
/** Walls relative to the pinned server time. */
const WALLS = [-5_000, -1, 0, 30_000, LEAD_MS, LEAD_MS + 1, 3_600_000, 365 * 86_400_000];

interface OpPlan {
  kind: 'create' | 'edit' | 'delete';
  table: Table;
  record: number;
  /** Which fields an edit changes (bits over EDITABLE[table]). */
  fieldBits: number;
  /** Picks values (and, for a create, which fixed values). */
  variant: number;
  /** A new clock value, or the very value this device used last (an exact tie). */
  clock: { wall: number; counter: number } | 'same';
}

interface BatchPlan {
  device: number;
  ops: OpPlan[];
}

const opArb: fc.Arbitrary<OpPlan> = fc.record({
  kind: fc.constantFrom<OpPlan['kind']>('create', 'create', 'edit', 'edit', 'edit', 'delete'),
  table: fc.constantFrom<Table>('observations', 'observations', 'sessions'),
  record: fc.nat(2),
  fieldBits: fc.integer({ min: 1, max: 63 }),
  variant: fc.nat(5),
  clock: fc.oneof(
    { weight: 4, arbitrary: fc.record({ wall: fc.nat(WALLS.length - 1), counter: fc.nat(2) }) },
    { weight: 1, arbitrary: fc.constant<'same'>('same') },
  ),
});
const historyArb = fc.array(fc.record({ device: fc.nat(NODES.length - 1), ops: fc.array(opArb, { minLength: 1, maxLength: 6 }) }), { minLength: 1, maxLength: 8 });

let server: TestServer;
let team: SyncTeam;
let serverTime = 0;
let otherSession = '';

beforeAll(async () => {
  server = await startTestServer();
  team = await makeTeam(server.app, 'oracle');
  // The server's clock, pinned a minute past real time (instants of the team's creation and the
  // ops' createdAt stay valid) for the whole file: the model clamps against the same time.
  serverTime = Date.now() + 60_000;
  setServerTimeSource(() => serverTime);
  const setup = device(team.head);
  otherSession = uuidv7();
  const res = await push(server.app, setup, team.teamId, [sessionCreate(setup, otherSession, userIdOf(team.head), '2026-01-16')]);
  expect(res.status).toBe(200);
});
afterAll(async () => {
  setServerTimeSource();
  await server.close();
});

interface Device {
  node: string;
  account: Account;
  clientId: string;
  last: string | null;
}

/** Turns a plan into ops (fresh op ids, the device's clock values) for this history's record ids. */
function makeOps(plan: BatchPlan, dev: Device, ids: Record<Table, string[]>, serial: { n: number }): Op[] {
  return plan.ops.map((p) => {
    const n = (serial.n += 1);
    let hlc: string;
    if (p.clock === 'same' && dev.last) hlc = dev.last;
    else {
      const c = p.clock === 'same' ? { wall: 0, counter: 0 } : p.clock;
      hlc = encode({ wall: serverTime + WALLS[c.wall], counter: c.counter, node: dev.node });
    }
    dev.last = hlc;
    const recordId = ids[p.table][p.record];
    const stamp = (fields: Record<string, unknown>) => Object.fromEntries(Object.keys(fields).map((f) => [f, hlc]));
    if (p.kind === 'delete') {
      // Notes are deleted on a device, and a session merged into another (tidy-up).
      return { opId: uuidv7(), table: p.table, recordId, kind: 'delete', fields: {}, hlc: { deleted: hlc } };
    }
    let fields: Record<string, unknown>;
    if (p.table === 'observations') {
      // Moves and merges: another session (one of this history's, maybe merged away), skater or cue.
      const sessions = [team.sessionId, otherSession, ids.sessions[0], ids.sessions[1]];
      const editable = {
        mark: p.variant % 2 ? 'good' : 'needs_work',
        note: `note ${n}`,
        noteShared: p.variant % 3 === 0,
        sessionId: sessions[(p.variant + n) % sessions.length],
        skaterId: (p.variant + n) % 3 ? team.skaterA.id : team.skaterB.id,
        cueId: team.cueIds[(p.variant + n) % 2],
      };
      if (p.kind === 'create') {
        fields = {
          ...editable,
          sessionId: p.variant % 2 ? team.sessionId : sessions[(p.variant + n) % sessions.length],
          createdAt: new Date(serverTime - 1000 * (1 + (p.variant % 3))).toISOString(),
          createdBy: userIdOf(dev.account),
        };
      } else fields = Object.fromEntries(EDITABLE.observations.filter((_, i) => p.fieldBits & (1 << i)).map((f) => [f, editable[f as keyof typeof editable]]));
    } else {
      const editable = { rink: `rink ${n}`, title: `title ${n}`, focusCueIds: team.cueIds.slice(p.variant % 3, (p.variant % 3) + 1 + (n % 3)) };
      if (p.kind === 'create') {
        fields = {
          day: p.variant % 2 ? '2026-01-15' : '2026-01-17',
          ...editable,
          createdAt: new Date(serverTime - 1000 * (1 + (p.variant % 3))).toISOString(),
          createdBy: userIdOf(dev.account),
        };
      } else fields = Object.fromEntries(EDITABLE.sessions.filter((_, i) => p.fieldBits & (1 << i)).map((f) => [f, editable[f as keyof typeof editable]]));
    }
    return { opId: uuidv7(), table: p.table, recordId, kind: 'upsert', fields, hlc: stamp(fields) };
  });
}

/** The server's records of this history, in the model's terms. */
async function serverRecords(ids: string[]) {
  const rows = (await server.dataSource.query(
    `SELECT 'observations' AS tbl, id, deleted_at, field_hlc,
            json_build_object('mark', mark, 'note', note, 'noteShared', note_shared, 'sessionId', session_id, 'skaterId', skater_id,
                              'cueId', cue_id, 'createdAt', created_at, 'createdBy', created_by) AS fields
       FROM observations WHERE team_id = $1 AND id = ANY($2::uuid[])
     UNION ALL
     SELECT 'sessions', id, deleted_at, field_hlc,
            json_build_object('rink', rink, 'title', title, 'focusCueIds', focus_cue_ids, 'day', day, 'createdAt', created_at, 'createdBy', created_by)
       FROM sessions WHERE team_id = $1 AND id = ANY($2::uuid[])`,
    [team.teamId, ids],
  )) as { tbl: Table; id: string; deleted_at: Date | null; field_hlc: Record<string, string>; fields: Record<string, unknown> }[];
  return new Map(rows.map((r) => [r.id, r]));
}

const sameValue = (field: string, a: unknown, b: unknown) =>
  field === 'createdAt' ? Date.parse(String(a)) === Date.parse(String(b)) : JSON.stringify(a) === JSON.stringify(b);

/** Every way the server differs from the model for these records. */
async function disagreements(model: Model, ids: string[]): Promise<string[]> {
  const stored = await serverRecords(ids);
  const out: string[] = [];
  for (const id of ids) {
    const want = model.records.get(id);
    const got = stored.get(id);
    if (!want || (!want.created && !want.deleted)) {
      if (got && !got.deleted_at) out.push(`${id}: live on the server, never created`);
      continue;
    }
    if (want.deleted) {
      if (got && !got.deleted_at) out.push(`${id}: live on the server, deleted in the model`);
      continue;
    }
    if (!got) {
      out.push(`${id}: missing on the server`);
      continue;
    }
    if (got.deleted_at) {
      out.push(`${id}: deleted on the server, live in the model`);
      continue;
    }
    for (const [field, { clock, value }] of want.fields) {
      if (!sameValue(field, got.fields[field], value)) out.push(`${id}.${field}: server ${JSON.stringify(got.fields[field])}, model ${JSON.stringify(value)}`);
      if (EDITABLE[want.table].includes(field) && got.field_hlc[field] !== encode(clock)) {
        out.push(`${id}.${field}: server clock ${got.field_hlc[field]}, model clock ${encode(clock)}`);
      }
    }
  }
  return out;
}

describe('merge oracle: the server against a model written from the contract', () => {
  it('random histories of creates, edits and deletes from three devices (clamped, far-ahead and equal clocks) end as the model says (fast-check, fixed seed)', async () => {
    const model = new Model(serverTime, new Set([team.sessionId, otherSession]));
    // Histories run one after another on the same team: the clamp carries over, as on the server.
    const seen = { clamped: 0, ties: 0, tombstoneFirst: 0, histories: 0, moves: 0, movesRefused: 0, sessionDeletes: 0, deletesRefused: 0 };
    await fc.assert(
      fc.asyncProperty(historyArb, async (history) => {
        seen.histories += 1;
        const ids: Record<Table, string[]> = { observations: [uuidv7(), uuidv7(), uuidv7()], sessions: [uuidv7(), uuidv7(), uuidv7()] };
        const devices: Device[] = NODES.map((node, i) => ({ node, account: i === 1 ? team.coach : team.head, clientId: uuidv4(), last: null }));
        const serial = { n: 0 };
        for (const plan of history) {
          const dev = devices[plan.device];
          const ops = makeOps(plan, dev, ids, serial);
          const limit = serverTime + LEAD_MS;
          seen.clamped += ops.flatMap((op) => Object.values(op.hlc)).filter((v) => decode(v).wall > limit).length;
          seen.ties += plan.ops.filter((p) => p.clock === 'same').length;
          for (const op of ops) if (op.kind === 'delete' && !model.records.has(op.recordId)) seen.tombstoneFirst += 1;
          for (const op of ops) if (op.kind === 'delete' && op.table === 'sessions') seen.sessionDeletes += 1;
          const res = await push(server.app, { clientId: dev.clientId, clock: undefined as never, account: dev.account }, team.teamId, ops);
          expect(res.status).toBe(200);
          const results = (res.body as PushReply).results;
          expect(results.map((r) => r.opId)).toEqual(ops.map((op) => op.opId));
          for (const [i, op] of ops.entries()) {
            if (op.kind !== 'upsert' || op.table !== 'observations' || 'createdAt' in op.fields) continue;
            if (!['sessionId', 'skaterId', 'cueId'].some((f) => f in op.fields)) continue;
            if (results[i].status === 'applied') seen.moves += 1;
            else if (results[i].message?.includes('no such session')) seen.movesRefused += 1;
          }
          seen.deletesRefused += results.filter((r) => /still holds|No such session|Only its author/.test(r.message ?? '')).length;
          model.apply(ops, { userId: userIdOf(dev.account), head: dev.account === team.head });
        }
        expect(await disagreements(model, [...ids.observations, ...ids.sessions])).toEqual([]);
      }),
      { seed: 777_2026, numRuns: 60, endOnFailure: true },
    );
    // The histories reached the cases they are for.
    expect(seen.clamped).toBeGreaterThan(20);
    expect(seen.ties).toBeGreaterThan(10);
    expect(seen.tombstoneFirst).toBeGreaterThan(3);
    expect(seen.moves).toBeGreaterThan(20);
    expect(seen.movesRefused).toBeGreaterThan(3);
    expect(seen.sessionDeletes).toBeGreaterThan(10);
    expect(seen.deletesRefused).toBeGreaterThan(1);
  }, 120_000);
});
