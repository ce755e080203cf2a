/**
 * POST /api/sync/push against the real PostgreSQL (shared/SYNC.md "Push", "Conflicts" and proofs
 * 2, 3, 5 and 6): idempotent retries, a lost reply, a bad op in a batch, a database failure
 * mid-batch, a cut or broken body, create + delete in one batch, a device a year ahead, per-field
 * merge (fast-check, fixed seed), delete wins, and a 500-op batch.
 */
import http from 'node:http';
import net from 'node:net';
import type { AddressInfo } from 'node:net';
import fc from 'fast-check';
import { Client } from 'pg';
import request from 'supertest';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';
import { decodeHlc, encodeHlc } from '../../shared/hlc';
import type { Op } from '../../shared/schemas/sync';
import { setServerTimeSource } from '../../server/services/sync/clock';
import { expectError, startTestServer, type TestServer } from './helpers';
import {
  device,
  latest,
  makeTeam,
  newObservation,
  pull,
  pullAll,
  push,
  pushOk,
  remove,
  sessionCreate,
  upsert,
  userIdOf,
  type SyncTeam,
} from './sync-helpers';

let server: TestServer;
let team: SyncTeam;

/** Polls `condition` every 5 ms; fails naming what it waited for if it does not hold within `timeoutMs`. */
async function waitFor(what: string, condition: () => boolean, timeoutMs = 5000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!condition()) {
    if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 5));
  }
}

/** `promise`, or a failure naming what it waited for after `timeoutMs`. */
async function within<T>(timeoutMs: number, what: string, promise: Promise<T>): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`timed out after ${timeoutMs} ms waiting for ${what}`)), timeoutMs);
  });
  try {
    return await Promise.race([promise, timeout]);
  } finally {
    clearTimeout(timer);
  }
}

beforeAll(async () => {
  server = await startTestServer();
  team = await makeTeam(server.app, 'push', { people: false });
});
afterAll(async () => {
  setServerTimeSource();
  await server.close();
});

const count = async (sql: string, params: unknown[]) => Number((await server.dataSource.query(sql, params))[0].n);
const opLogCount = (ids: string[]) =>
  count(`SELECT count(*) AS n FROM op_log WHERE team_id = $1 AND op_id = ANY($2::uuid[])`, [team.teamId, ids]);
const observationCount = (ids: string[]) =>
  count(`SELECT count(*) AS n FROM observations WHERE team_id = $1 AND id = ANY($2::uuid[])`, [team.teamId, ids]);

describe('retries', () => {
  it('the same batch twice: applied ops answer duplicate and are applied once; a rejected op is judged again', async () => {
    const dev = device(team.head);
    const ops = [newObservation(team, dev), newObservation(team, dev, { skaterId: team.skaterB.id }), newObservation(team, dev, { mark: 'bad' as never })];
    const first = await pushOk(server.app, dev, team.teamId, ops);
    expect(first.results.map((r) => r.status)).toEqual(['applied', 'applied', 'rejected']);
    expect(first.results[2]).toMatchObject({ reason: 'validation', message: expect.stringMatching(/mark/i) });
    const seqBefore = await count(`SELECT seq AS n FROM team_counters WHERE team_id = $1`, [team.teamId]);

    const again = await pushOk(server.app, dev, team.teamId, ops);
    expect(again.results.map((r) => [r.opId, r.status])).toEqual([
      [ops[0].opId, 'duplicate'],
      [ops[1].opId, 'duplicate'],
      [ops[2].opId, 'rejected'],
    ]);
    // The rejected op is not in the op log (refused input never grows it): it is refused afresh,
    // with the same reason.
    expect(again.results[2]).toMatchObject({ reason: 'validation', message: expect.stringMatching(/mark/i) });
    expect(await observationCount(ops.map((o) => o.recordId))).toBe(2);
    expect(await count(`SELECT seq AS n FROM team_counters WHERE team_id = $1`, [team.teamId])).toBe(seqBefore);
  });

  it('reply lost after commit: the resend answers duplicate and each row exists once', async () => {
    const dev = device(team.head);
    const ops = Array.from({ length: 20 }, (_, i) => newObservation(team, dev, { note: `lost reply ${i}` }));
    await push(server.app, dev, team.teamId, ops).expect(200); // the device never reads this reply
    const { changes: before } = await pullAll(server.app, team.head, team.teamId);
    const resend = await pushOk(server.app, dev, team.teamId, [...ops, newObservation(team, dev, { note: 'new one' })]);
    expect(resend.results.slice(0, 20).every((r) => r.status === 'duplicate')).toBe(true);
    expect(resend.results[20].status).toBe('applied');
    const { changes: after } = await pullAll(server.app, team.head, team.teamId);
    expect(after.length).toBe(before.length + 1);
    for (const op of ops) expect(after.filter((c) => c.id === op.recordId)).toHaveLength(1);
  });

  it('an op id repeated inside one batch is applied once', async () => {
    const dev = device(team.head);
    const op = newObservation(team, dev);
    const reply = await pushOk(server.app, dev, team.teamId, [op, op]);
    expect(reply.results.map((r) => r.status)).toEqual(['applied', 'duplicate']);
  });
});

describe('no partially applied batch', () => {
  it('a bad op inside a batch is rejected alone; the others are applied', async () => {
    const dev = device(team.head);
    const good1 = newObservation(team, dev);
    const badCue = newObservation(team, dev, { cueId: uuidv7() });
    const tooLong = newObservation(team, dev, { note: 'x'.repeat(281) });
    const unknown = upsert(dev, 'observations', uuidv7(), { mark: 'good' });
    const strayField = upsert(dev, 'observations', uuidv7(), { colour: 'red' });
    const good2 = newObservation(team, dev, { skaterId: team.skaterB.id });
    const reply = await pushOk(server.app, dev, team.teamId, [good1, badCue, tooLong, unknown, strayField, good2]);
    expect(reply.results.map((r) => [r.status, r.reason])).toEqual([
      ['applied', undefined],
      ['rejected', 'validation'],
      ['rejected', 'validation'],
      ['rejected', 'unknown_record'],
      ['rejected', 'validation'],
      ['applied', undefined],
    ]);
    expect(reply.results[1].message).toMatch(/cueId/);
    expect(reply.results[2].message).toMatch(/280/);
    expect(await observationCount([good1, badCue, tooLong, unknown, good2].map((o) => o.recordId))).toBe(2);
    // Only applied ops are logged: refused input does not grow the op log.
    expect(await opLogCount([badCue.opId, tooLong.opId, unknown.opId, strayField.opId])).toBe(0);
    expect(await opLogCount([good1.opId, good2.opId])).toBe(2);
  });

  it('a database failure mid-batch answers 503 and applies nothing; the retry then applies', async () => {
    const admin = new Client({ connectionString: process.env.DATABASE_URL });
    await admin.connect();
    const marker = `explode-${uuidv4()}`;
    try {
      // Test-only trigger: the observations statement fails for this one note (the sessions
      // statement of the same batch has already run by then).
      await admin.query(`
        CREATE OR REPLACE FUNCTION sync_test_fail() RETURNS trigger LANGUAGE plpgsql AS $$
        BEGIN
          IF NEW.note = '${marker}' THEN RAISE EXCEPTION 'forced failure for a test'; END IF;
          RETURN NEW;
        END $$`);
      await admin.query(`CREATE TRIGGER tg_sync_test_fail BEFORE INSERT ON observations FOR EACH ROW EXECUTE FUNCTION sync_test_fail()`);
      const dev = device(team.head);
      const sessionId = uuidv7();
      const ops = [
        sessionCreate(dev, sessionId, userIdOf(team.head), '2026-02-01'),
        newObservation(team, dev, { sessionId }),
        newObservation(team, dev, { sessionId, note: marker }),
        newObservation(team, dev, { sessionId }),
      ];
      const seqBefore = await count(`SELECT seq AS n FROM team_counters WHERE team_id = $1`, [team.teamId]);
      const res = await push(server.app, dev, team.teamId, ops);
      expect(res.status).toBe(503);
      expect(res.body.error.code).toBe('unavailable');
      expect(res.text).not.toMatch(/forced failure|stack/);
      expect(await opLogCount(ops.map((o) => o.opId))).toBe(0);
      expect(await count(`SELECT count(*) AS n FROM sessions WHERE team_id = $1 AND id = $2`, [team.teamId, sessionId])).toBe(0);
      expect(await observationCount(ops.map((o) => o.recordId))).toBe(0);
      expect(await count(`SELECT seq AS n FROM team_counters WHERE team_id = $1`, [team.teamId])).toBe(seqBefore);

      await admin.query(`DROP TRIGGER tg_sync_test_fail ON observations`);
      const retry = await pushOk(server.app, dev, team.teamId, ops);
      expect(retry.results.map((r) => r.status)).toEqual(['applied', 'applied', 'applied', 'applied']);
    } finally {
      await admin.query(`DROP TRIGGER IF EXISTS tg_sync_test_fail ON observations`);
      await admin.query(`DROP FUNCTION IF EXISTS sync_test_fail()`);
      await admin.end();
    }
  });

  it('a body that is not JSON, or cut short, is a 400 and applies nothing', async () => {
    const dev = device(team.head);
    const op = newObservation(team, dev);
    const text = JSON.stringify({ clientId: dev.clientId, teamId: team.teamId, ops: [op] });
    for (const body of [text.slice(0, text.length - 7), '{"clientId":', 'not json']) {
      const res = await request(server.app).post('/api/sync/push').set(team.head.auth).set('Content-Type', 'application/json').send(body);
      expectError(res, 400, 'validation');
    }
    expect(await opLogCount([op.opId])).toBe(0);
  });

  it('a connection dropped mid-body applies nothing', async () => {
    const dev = device(team.head);
    const op = newObservation(team, dev);
    const text = JSON.stringify({ clientId: dev.clientId, teamId: team.teamId, ops: [op] });
    // The app behind a server that lets the test see each request arrive and end.
    const seen: { req: http.IncomingMessage; closed: Promise<void> }[] = [];
    const listener = http.createServer((req, res) => {
      seen.push({ req, closed: new Promise<void>((resolve) => res.once('close', () => resolve())) });
      server.app(req, res);
    });
    await new Promise<void>((resolve) => listener.listen(0, '127.0.0.1', resolve));
    try {
      const { port } = listener.address() as AddressInfo;
      const head =
        `POST /api/sync/push HTTP/1.1\r\nHost: 127.0.0.1\r\nAuthorization: ${team.head.auth.Authorization}\r\n` +
        `Content-Type: application/json\r\nContent-Length: ${Buffer.byteLength(text)}\r\n\r\n`;
      const sent = head + text.slice(0, text.length / 2);
      const socket = net.connect(port, '127.0.0.1');
      const gone = new Promise<void>((resolve) => {
        socket.on('close', () => resolve());
        socket.on('error', () => resolve());
      });
      await new Promise<void>((resolve) => socket.once('connect', () => resolve()));
      socket.write(sent);
      // The server has the headers and half the body (not merely "50 ms went by") before the cut.
      await waitFor('the server to read the headers and half the body', () => seen.length === 1 && seen[0].req.socket.bytesRead >= Buffer.byteLength(sent));
      socket.destroy();
      await gone;
      // The server saw the request end without its body, and is done with it.
      await within(5000, 'the server to close the cut request', seen[0].closed);
      expect(seen[0].req.complete).toBe(false);
    } finally {
      await new Promise((resolve) => listener.close(resolve));
    }
    expect(seen).toHaveLength(1);
    expect(await opLogCount([op.opId])).toBe(0);
    expect(await observationCount([op.recordId])).toBe(0);
  });

  it('a body that breaks the schema is a 400 naming the field; over 500 ops is refused; over 1 MB is 413', async () => {
    const dev = device(team.head);
    const bad = await push(server.app, dev, team.teamId, [{ ...newObservation(team, dev), opId: 'nope' }]);
    expectError(bad, 400, 'validation');
    expect(JSON.stringify(bad.body.error.fields)).toMatch(/opId/);
    const extra = await request(server.app)
      .post('/api/sync/push')
      .set(team.head.auth)
      .send({ clientId: dev.clientId, teamId: team.teamId, ops: [newObservation(team, dev)], sneaky: true });
    expectError(extra, 400, 'validation');
    const many = Array.from({ length: 501 }, () => newObservation(team, dev));
    expectError(await push(server.app, dev, team.teamId, many), 400, 'validation');
    const huge = Array.from({ length: 400 }, () => ({ ...newObservation(team, dev), fields: { note: 'y'.repeat(3000) } }));
    expectError(await push(server.app, dev, team.teamId, huge as Op[]), 413, 'payload_too_large');
  });
});

describe('create and delete', () => {
  it('a create and its delete in one batch never show up live on another device', async () => {
    const other = await pullAll(server.app, team.head, team.teamId);
    const dev = device(team.head);
    const create = newObservation(team, dev, { note: 'gone before sync' });
    const reply = await pushOk(server.app, dev, team.teamId, [create, remove(dev, 'observations', create.recordId)]);
    expect(reply.results.map((r) => r.status)).toEqual(['applied', 'applied']);
    const since = await pullAll(server.app, team.head, team.teamId, other.cursor);
    expect(since.changes.find((c) => c.id === create.recordId)).toBeUndefined();
    const fresh = await pullAll(server.app, team.head, team.teamId);
    expect(fresh.changes.find((c) => c.id === create.recordId)).toBeUndefined();
    expect(JSON.stringify(fresh.pages)).not.toContain('gone before sync');
    // A late upsert of the same record does not bring it back.
    await pushOk(server.app, dev, team.teamId, [upsert(dev, 'observations', create.recordId, { mark: 'good' })]);
    expect(latest(await pullAll(server.app, team.head, team.teamId)).get(`observations:${create.recordId}`)).toBe('deleted');
  });
});

describe('conflicts', () => {
  it('a device whose clock is a year ahead wins none of the later conflicts (clamped to server now + 60 s)', async () => {
    const start = Date.now();
    let serverTime = start;
    setServerTimeSource(() => serverTime);
    try {
      const yearAhead = device(team.head, () => serverTime + 365 * 86_400_000);
      const honest = device(team.head, () => serverTime);
      const create = newObservation(team, honest, { note: 'start' });
      await pushOk(server.app, honest, team.teamId, [create]);

      const ahead = await pushOk(server.app, yearAhead, team.teamId, [upsert(yearAhead, 'observations', create.recordId, { mark: 'good', note: 'from the future' })]);
      // The server clock is not dragged a year ahead.
      expect(decodeHlc(ahead.serverClock).wall).toBeLessThanOrEqual(serverTime + 60_000);
      const [{ field_hlc: stored }] = await server.dataSource.query(`SELECT field_hlc FROM observations WHERE team_id = $1 AND id = $2`, [team.teamId, create.recordId]);
      expect(decodeHlc(stored.mark).wall).toBe(serverTime + 60_000);

      // Two minutes later an honest coach edits both fields without having seen the server clock.
      serverTime += 120_000;
      const honest2 = device(team.coach, () => serverTime);
      await pushOk(server.app, honest2, team.teamId, [upsert(honest2, 'observations', create.recordId, { mark: 'needs_work', note: 'honest' })]);
      let row = latest(await pullAll(server.app, team.head, team.teamId)).get(`observations:${create.recordId}`) as Record<string, unknown>;
      expect(row).toMatchObject({ mark: 'needs_work', note: 'honest' });

      // The fast device edits again; two minutes later, an honest edit still wins.
      await pushOk(server.app, yearAhead, team.teamId, [upsert(yearAhead, 'observations', create.recordId, { note: 'future again' })]);
      serverTime += 120_000;
      await pushOk(server.app, honest2, team.teamId, [upsert(honest2, 'observations', create.recordId, { note: 'honest again' })]);
      row = latest(await pullAll(server.app, team.head, team.teamId)).get(`observations:${create.recordId}`) as Record<string, unknown>;
      expect(row.note).toBe('honest again');
    } finally {
      setServerTimeSource();
    }
  });

  it('per field, the newest clock wins whatever the push order (fast-check, fixed seed)', async () => {
    const base = Date.now() - 3_600_000;
    const fieldValues = {
      mark: fc.constantFrom('good', 'needs_work'),
      note: fc.string({ maxLength: 20 }),
      noteShared: fc.boolean(),
    };
    const edit = fc.oneof(
      ...Object.entries(fieldValues).map(([field, value]) =>
        fc.record({ field: fc.constant(field), value: value as fc.Arbitrary<unknown>, wall: fc.integer({ min: 1, max: 10_000 }), node: fc.constantFrom('dev-a', 'dev-b', 'dev-c') }),
      ),
    );
    await fc.assert(
      fc.asyncProperty(fc.array(edit, { minLength: 1, maxLength: 12 }), fc.integer({ min: 1, max: 4 }), fc.context(), async (edits, batches, ctx) => {
        const dev = device(team.head);
        const create = newObservation(team, dev, { note: 'base' });
        // The create carries an old clock, so every edit is newer than it.
        create.hlc = Object.fromEntries(Object.keys(create.fields).map((f) => [f, encodeHlc({ wall: base, counter: 0, node: 'dev-0' })]));
        await pushOk(server.app, dev, team.teamId, [create]);
        const ops: Op[] = edits.map((e, i) => ({
          opId: uuidv7(),
          table: 'observations',
          recordId: create.recordId,
          kind: 'upsert',
          fields: { [e.field]: e.value },
          // The index keeps clocks unique, as they are between real devices.
          hlc: { [e.field]: encodeHlc({ wall: base + e.wall, counter: i, node: e.node }) },
        }));
        const size = Math.ceil(ops.length / batches);
        for (let i = 0; i < ops.length; i += size) await pushOk(server.app, dev, team.teamId, ops.slice(i, i + size));
        const expected: Record<string, unknown> = { mark: 'needs_work', note: 'base', noteShared: false };
        for (const field of Object.keys(fieldValues)) {
          const winner = ops.filter((o) => field in o.fields).sort((a, b) => (a.hlc[field] < b.hlc[field] ? -1 : 1)).pop();
          if (winner) expected[field] = winner.fields[field];
        }
        const [row] = await server.dataSource.query(`SELECT mark, note, note_shared AS "noteShared" FROM observations WHERE team_id = $1 AND id = $2`, [team.teamId, create.recordId]);
        ctx.log(JSON.stringify({ expected, row }));
        // Notes are stored trimmed (shared noteSchema).
        expect(row).toEqual({ ...expected, note: String(expected.note).trim() });
      }),
      { seed: 20260115, numRuns: 25 },
    );
  });

  it('two coaches edit mark and note of one observation offline: both newest values stand', async () => {
    const head = device(team.head);
    const coach = device(team.coach);
    const create = newObservation(team, head, { note: 'first' });
    await pushOk(server.app, head, team.teamId, [create]);
    const markEdit = upsert(head, 'observations', create.recordId, { mark: 'good' });
    const noteEdit = upsert(coach, 'observations', create.recordId, { note: 'second look' });
    // Reversed order of arrival, and an older edit of the mark arriving last.
    const staleMark = upsert(coach, 'observations', create.recordId, { mark: 'needs_work' }, encodeHlc({ wall: 1, counter: 0, node: 'old' }));
    await pushOk(server.app, coach, team.teamId, [noteEdit]);
    await pushOk(server.app, head, team.teamId, [markEdit]);
    await pushOk(server.app, coach, team.teamId, [staleMark]);
    const row = latest(await pullAll(server.app, team.head, team.teamId)).get(`observations:${create.recordId}`);
    expect(row).toMatchObject({ mark: 'good', note: 'second look' });
  });

  it('delete wins over a concurrent later edit, in either order of arrival', async () => {
    const head = device(team.head);
    const coach = device(team.coach);
    for (const order of ['delete first', 'edit first']) {
      const create = newObservation(team, head);
      await pushOk(server.app, head, team.teamId, [create]);
      const del = remove(head, 'observations', create.recordId);
      const edit = upsert(coach, 'observations', create.recordId, { note: `later edit, ${order}` }, encodeHlc({ wall: Date.now() + 30_000, counter: 0, node: 'coach' }));
      for (const op of order === 'delete first' ? [del, edit] : [edit, del]) await pushOk(server.app, head, team.teamId, [op]);
      const drained = await pullAll(server.app, team.head, team.teamId);
      expect(latest(drained).get(`observations:${create.recordId}`)).toBe('deleted');
      expect(drained.changes.find((c) => c.id === create.recordId)).toBeUndefined();
    }
  });
});

describe('size', () => {
  it('one push of 500 ops succeeds (bulk writes stay far under 65,535 bind parameters)', async () => {
    const dev = device(team.head);
    const ops = Array.from({ length: 500 }, (_, i) => newObservation(team, dev, { note: `bulk ${i}`, skaterId: i % 2 ? team.skaterA.id : team.skaterB.id }));
    const started = Date.now();
    const reply = await pushOk(server.app, dev, team.teamId, ops);
    expect(reply.results.every((r) => r.status === 'applied')).toBe(true);
    expect(await observationCount(ops.map((o) => o.recordId))).toBe(500);
    const seqs: { server_seq: string }[] = await server.dataSource.query(
      `SELECT server_seq FROM observations WHERE team_id = $1 AND id = ANY($2::uuid[])`,
      [team.teamId, ops.map((o) => o.recordId)],
    );
    expect(new Set(seqs.map((s) => s.server_seq)).size).toBe(500);
    expect(Date.now() - started).toBeLessThan(10_000);
  });

  it('pulling right after a push shows the change with the device field names', async () => {
    const dev = device(team.head);
    const before = await pullAll(server.app, team.head, team.teamId);
    const create = newObservation(team, dev, { note: 'names', noteShared: true });
    await pushOk(server.app, dev, team.teamId, [create]);
    const res = await pull(server.app, team.head, team.teamId, before.cursor).expect(200);
    expect(res.body.changes).toEqual([
      {
        table: 'observations',
        id: create.recordId,
        serverSeq: expect.any(Number),
        // The author's name comes from the account, not from the device.
        fields: { ...create.fields, acknowledgedAt: null, authorName: team.head.session.user.displayName },
      },
    ]);
    expect(res.body).toMatchObject({ tombstones: [], evictions: [], hasMore: false, remaining: 0, nextCursor: res.body.changes[0].serverSeq });
  });
});
