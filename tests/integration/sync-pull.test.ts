/**
 * GET /api/sync/pull against the real PostgreSQL (shared/SYNC.md "Server order", "Pull" and proofs
 * 4 and 7): a pull running while another writer holds the team counter misses no row, a cursor
 * older than the purge horizon gets 410, and a 50,000-row first pull pages 1,000 at a time and
 * resumes from any cursor (fast-check picks the cursors, fixed seed).
 */
import fc from 'fast-check';
import { Client } from 'pg';
import { v7 as uuidv7 } from 'uuid';
import type { PullReply } from '../../shared/schemas/sync';
import { purgeTombstones } from '../../server/services/sync/purge';
import { expectError, startTestServer, type TestServer } from './helpers';
import { device, latest, makeTeam, newObservation, seedObservations, pull, pullAll, push, pushOk, remove, type SyncTeam } from './sync-helpers';

let server: TestServer;
let team: SyncTeam;

beforeAll(async () => {
  server = await startTestServer();
  team = await makeTeam(server.app, 'pull', { people: false });
});
afterAll(async () => {
  await server.close();
});

/**
 * Waits until some backend is blocked by `holderPid` while writing team_counters (the push's
 * Push.1 waiting for the counter's row lock); fails loudly if that never happens. A fixed sleep
 * would pass just as well if the push had not started yet, or had not been stopped by the lock.
 */
async function waitForBlockedCounterWriter(observer: Client, holderPid: number, timeoutMs = 10_000): Promise<{ pid: number; query: string }> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const { rows } = await observer.query<{ pid: number; query: string }>(
      `SELECT pid, query FROM pg_stat_activity
        WHERE $1 = ANY(pg_blocking_pids(pid)) AND wait_event_type = 'Lock' AND query ILIKE '%team_counters%'`,
      [holderPid],
    );
    if (rows.length > 0) return rows[0];
    if (Date.now() > deadline) throw new Error(`no push blocked on the team counter held by backend ${holderPid} within ${timeoutMs} ms`);
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
}

describe('server order', () => {
  it('a pull while another transaction holds the team counter misses no row afterwards', async () => {
    const dev = device(team.head);
    await pushOk(server.app, dev, team.teamId, [newObservation(team, dev)]);
    const start = await pullAll(server.app, team.head, team.teamId);

    // A slow writer: takes the next number, writes its row, and holds its transaction open.
    const holder = new Client({ connectionString: process.env.DATABASE_URL });
    await holder.connect();
    const observer = new Client({ connectionString: process.env.DATABASE_URL });
    await observer.connect();
    const slowId = uuidv7();
    let pushing: Promise<{ status: number }> | undefined;
    const fastOps = [newObservation(team, dev), newObservation(team, dev)];
    try {
      const {
        rows: [{ pid: holderPid }],
      } = await holder.query<{ pid: number }>('SELECT pg_backend_pid() AS pid');
      await holder.query('BEGIN');
      const { rows } = await holder.query(`UPDATE team_counters SET seq = seq + 1 WHERE team_id = $1 RETURNING seq`, [team.teamId]);
      await holder.query(
        `INSERT INTO observations (team_id, id, session_id, skater_id, cue_id, mark, created_at, created_by, server_seq)
         VALUES ($1, $2, $3, $4, $5, 'good', now(), $6, $7)`,
        [team.teamId, slowId, team.sessionId, team.skaterA.id, team.cueIds[0], team.head.session.user.id, rows[0].seq],
      );

      // A push starts meanwhile: it must wait for the counter, not take a number past the open one.
      pushing = push(server.app, dev, team.teamId, fastOps).then((res) => res);
      // The push is really waiting for the counter (not merely not started yet) before the pull.
      const blocked = await waitForBlockedCounterWriter(observer, holderPid);
      expect(blocked.query).toMatch(/INSERT INTO team_counters/);
      const during = await pullAll(server.app, team.head, team.teamId, start.cursor);
      expect(during.changes).toEqual([]);
      expect(during.cursor).toBe(start.cursor);
      // Still blocked after the pull: the pull did not wait for it, and it has not gone past the lock.
      expect((await waitForBlockedCounterWriter(observer, holderPid, 1000)).pid).toBe(blocked.pid);
      await holder.query('COMMIT');
    } finally {
      await holder.end();
      await observer.end();
    }
    expect((await pushing!).status).toBe(200);

    const after = await pullAll(server.app, team.head, team.teamId, start.cursor);
    const ids = after.changes.map((c) => c.id);
    expect(ids).toEqual([slowId, ...fastOps.map((o) => o.recordId)]);
    // The same as a full pull has, past the old cursor.
    const full = await pullAll(server.app, team.head, team.teamId);
    expect(full.changes.filter((c) => c.serverSeq > start.cursor).map((c) => c.id)).toEqual(ids);
  });

  it('concurrent pushes and pulls: every pulled row is seen once and nothing is skipped (fast-check, fixed seed)', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(fc.integer({ min: 1, max: 30 }), { minLength: 3, maxLength: 6 }), async (sizes) => {
        const start = await pullAll(server.app, team.head, team.teamId);
        const devices = sizes.map(() => device(team.head));
        const batches = sizes.map((n, i) => Array.from({ length: n }, () => newObservation(team, devices[i])));
        let cursor = start.cursor;
        const seen: string[] = [];
        const pushes = Promise.all(batches.map((ops, i) => pushOk(server.app, devices[i], team.teamId, ops)));
        let done = false;
        void pushes.then(
          () => (done = true),
          () => (done = true),
        );
        while (!done) {
          const page = await pullAll(server.app, team.head, team.teamId, cursor, 7);
          seen.push(...page.changes.map((c) => c.id));
          cursor = page.cursor;
        }
        await pushes;
        const rest = await pullAll(server.app, team.head, team.teamId, cursor, 7);
        seen.push(...rest.changes.map((c) => c.id));
        const expected = batches.flat().map((o) => o.recordId);
        expect(new Set(seen).size).toBe(seen.length);
        expect([...seen].sort()).toEqual([...expected].sort());
      }),
      { seed: 4242, numRuns: 8 },
    );
  });
});

describe('horizon', () => {
  it('a cursor older than the purged tombstones answers 410 resync_required; 0 and newer cursors still work', async () => {
    const local = await makeTeam(server.app, 'horizon', { people: false });
    const dev = device(local.head);
    const keep = newObservation(local, dev);
    const gone = newObservation(local, dev);
    await pushOk(server.app, dev, local.teamId, [keep, gone]);
    const early = await pullAll(server.app, local.head, local.teamId);
    await pushOk(server.app, dev, local.teamId, [remove(dev, 'observations', gone.recordId)]);
    const seen = await pullAll(server.app, local.head, local.teamId, early.cursor);
    expect(seen.tombstones.map((t) => t.id)).toEqual([gone.recordId]);

    // Nothing old enough yet: purging removes nothing.
    expect((await purgeTombstones(server.dataSource, local.teamId)).purged).toBe(0);
    // Age the tombstone (the write is stamped with a new server_seq, as every write is).
    const [[aged]] = await server.dataSource.query(
      `UPDATE observations SET deleted_at = now() - interval '181 days' WHERE team_id = $1 AND id = $2 RETURNING server_seq`,
      [local.teamId, gone.recordId],
    );
    expect(Number(aged.server_seq)).toBeGreaterThan(seen.cursor);
    const result = await purgeTombstones(server.dataSource, local.teamId);
    expect(result).toEqual({ purged: 1, horizon: Number(aged.server_seq) });

    expectError(await pull(server.app, local.head, local.teamId, early.cursor), 410, 'resync_required');
    expectError(await pull(server.app, local.head, local.teamId, 1), 410, 'resync_required');
    const full = await pullAll(server.app, local.head, local.teamId);
    expect(full.tombstones).toEqual([]);
    expect(latest(full).get(`observations:${keep.recordId}`)).toMatchObject({ mark: 'needs_work' });
    const fromHorizon = await pull(server.app, local.head, local.teamId, result.horizon).expect(200);
    expect(fromHorizon.body.changes).toEqual([]);
  });
});

describe('a 50,000-row first pull', () => {
  const ROWS = 50_000;
  let big: SyncTeam;
  let all: PullReply['changes'];

  beforeAll(async () => {
    big = await makeTeam(server.app, 'fifty', { people: false });
    await seedObservations(server.dataSource, big, ROWS);
  });

  it('pages 1,000 at a time in server order, with remaining counting down to 0', async () => {
    const drained = await pullAll(server.app, big.head, big.teamId);
    all = drained.changes;
    const observations = all.filter((c) => c.table === 'observations');
    expect(observations).toHaveLength(ROWS);
    expect(drained.pages.slice(0, -1).every((p) => p.changes.length + p.tombstones.length === 1000)).toBe(true);
    const total = all.length;
    expect(drained.pages.length).toBe(Math.ceil(total / 1000));
    drained.pages.forEach((page, index) => {
      expect(page.remaining).toBe(Math.max(0, total - (index + 1) * 1000));
      expect(page.hasMore).toBe(index < drained.pages.length - 1);
    });
    const seqs = all.map((c) => c.serverSeq);
    expect(seqs.every((s, i) => i === 0 || s > seqs[i - 1])).toBe(true);
    expect(new Set(all.map((c) => c.id)).size).toBe(total);
  });

  it('resumes from any cursor (a kill mid-way) and ends with the same rows', async () => {
    await fc.assert(
      fc.asyncProperty(fc.integer({ min: 0, max: all.length - 1 }), async (index) => {
        const cursor = all[index].serverSeq;
        const rest = await pullAll(server.app, big.head, big.teamId, cursor);
        expect(rest.changes.map((c) => c.id)).toEqual(all.slice(index + 1).map((c) => c.id));
      }),
      { seed: 7, numRuns: 4 },
    );
  });

  it('rejects a limit above 1,000 and answers a smaller one', async () => {
    expectError(await pull(server.app, big.head, big.teamId, 0, 5000), 400, 'validation');
    const page = await pull(server.app, big.head, big.teamId, 0, 10).expect(200);
    expect(page.body.changes).toHaveLength(10);
    expect(page.body.hasMore).toBe(true);
  });
});
