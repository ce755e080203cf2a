/**
 * Pushes a hostile or careless device can send (shared/SYNC.md proofs 3, 8 and 9), against the
 * real server and PostgreSQL:
 * - clock values with the largest counter or far in the future never stop sync, for this team or
 *   any other, and health keeps telling the truth;
 * - values that would pass a loose schema but fail in PostgreSQL (NUL, lone surrogates, the year
 *   0, impossible dates, Object member names as fields) are refused per op, the rest applied;
 * - a value the database itself refuses rejects only its op;
 * - nothing the client can forge is kept: authors, instants, other users' op ids;
 * - ordering, tombstones for unknown ids, and what a skater may see.
 */
import request from 'supertest';
import { v7 as uuidv7 } from 'uuid';
import { decodeHlc, encodeHlc } from '../../shared/hlc';
import type { Op } from '../../shared/schemas/sync';
import { startTestServer, type TestServer } from './helpers';
import {
  device,
  latest,
  makeTeam,
  newObservation,
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
let other: SyncTeam;

beforeAll(async () => {
  server = await startTestServer();
  team = await makeTeam(server.app, 'hostile');
  other = await makeTeam(server.app, 'bystander', { people: false });
});
afterAll(() => server.close());

const YEAR = 365 * 86_400_000;
const hlcAt = (wall: number, counter: number, node = 'hostile-device') => encodeHlc({ wall, counter, node });
const withClock = (op: Op, value: string): Op => ({ ...op, hlc: Object.fromEntries(Object.keys(op.hlc).map((f) => [f, value])) });

async function serverObservation(id: string) {
  const [row] = await server.dataSource.query(`SELECT note, created_by, deleted_at FROM observations WHERE team_id = $1 AND id = $2`, [team.teamId, id]);
  return row as { note: string; created_by: string; deleted_at: Date | null } | undefined;
}

describe('9. hostile clocks never stop anyone syncing', () => {
  it.each([
    ['the largest counter, a year ahead (clamped, counter kept)', () => hlcAt(Date.now() + YEAR, 999_999)],
    ['the largest counter, right now', () => hlcAt(Date.now(), 999_999)],
    ['a wall time past year 9999', () => `999999999999999-000000-hostile-device`],
    ['a node with characters no device id has', () => hlcAt(Date.now(), 0, '<script>"\'</script>')],
  ])('%s: the op is refused; another team pushes and pulls in the same second', async (_name, value) => {
    // A skater acknowledges a note of their own: the one write a skater may make.
    const coachDevice = device(team.head);
    const note = newObservation(team, coachDevice);
    await pushOk(server.app, coachDevice, team.teamId, [note]);
    const skater = device(team.skaterAccount);
    const ack = withClock(upsert(skater, 'observations', note.recordId, { acknowledgedAt: new Date().toISOString() }), value());
    const hostile = await pushOk(server.app, skater, team.teamId, [ack]);
    expect(hostile.results[0]).toMatchObject({ status: 'rejected', reason: 'validation', message: expect.stringMatching(/clock value/) });

    // At once: another team syncs, and so does this one.
    const bystander = device(other.head);
    const reply = await pushOk(server.app, bystander, other.teamId, [newObservation(other, bystander)]);
    expect(reply.results[0].status).toBe('applied');
    expect((await pullAll(server.app, other.head, other.teamId)).changes.length).toBeGreaterThan(0);
    const again = await pushOk(server.app, coachDevice, team.teamId, [newObservation(team, coachDevice)]);
    expect(again.results[0].status).toBe('applied');
    await request(server.app).get('/api/health').expect(200);
  });

  it("a team's clamped clock values do not move another team's clock", async () => {
    const ahead = device(team.head, () => Date.now() + YEAR);
    const reply = await pushOk(server.app, ahead, team.teamId, [newObservation(team, ahead)]);
    expect(reply.results[0].status).toBe('applied');
    // This team's clock folded the clamped value in: it runs up to the allowed minute ahead.
    expect(decodeHlc(reply.serverClock).wall).toBeGreaterThan(Date.now() + 30_000);
    const bystander = device(other.head);
    const theirs = await pushOk(server.app, bystander, other.teamId, [newObservation(other, bystander)]);
    expect(decodeHlc(theirs.serverClock).wall).toBeLessThan(Date.now() + 5_000);
    const health = await request(server.app).get('/api/health').expect(200);
    expect(health.body.clock.status).toBe('ok');
    expect(health.body.clock.maxLeadMs).toBeLessThanOrEqual(61_000);
  });

  it('two edits of one field in one batch from a device far ahead: the later edit stands', async () => {
    const ahead = device(team.head, () => Date.now() + YEAR);
    const create = newObservation(team, ahead);
    await pushOk(server.app, ahead, team.teamId, [create]);
    // Seconds apart on the device's (wrong) clock: both are clamped to the same wall time.
    const first = upsert(ahead, 'observations', create.recordId, { note: 'first edit' }, hlcAt(Date.now() + YEAR, 0, ahead.clientId));
    const second = upsert(ahead, 'observations', create.recordId, { note: 'second edit' }, hlcAt(Date.now() + YEAR + 5_000, 0, ahead.clientId));
    expect(second.hlc.note > first.hlc.note).toBe(true);
    const reply = await pushOk(server.app, ahead, team.teamId, [first, second]);
    expect(reply.results.map((r) => r.status)).toEqual(['applied', 'applied']);
    expect((await serverObservation(create.recordId))?.note).toBe('second edit');
    // And in the next batch, a later edit from the same device still wins over both.
    const third = upsert(ahead, 'observations', create.recordId, { note: 'third edit' });
    await pushOk(server.app, ahead, team.teamId, [third]);
    expect((await serverObservation(create.recordId))?.note).toBe('third edit');
  });
});

describe('3. a bad record never stalls a device', () => {
  const fieldsOf = (extra: Record<string, unknown>) => ({
    sessionId: team.sessionId,
    skaterId: team.skaterA.id,
    cueId: team.cueIds[0],
    mark: 'good',
    createdAt: new Date().toISOString(),
    createdBy: userIdOf(team.head),
    ...extra,
  });

  it.each([
    ['a NUL character in a note', { note: 'before\u0000after' }, /note/i],
    ['a lone surrogate in a note', { note: 'half an emoji \ud83d' }, /note/i],
    ['the year 0', { createdAt: '0000-06-01T10:00:00.000Z' }, /createdAt/],
    ['a date far in the future', { createdAt: '9999-12-31T23:59:59.000Z' }, /createdAt/],
    ['a field named constructor', { constructor: 'x' }, /constructor/],
    ['a field named toString', { toString: 'x' }, /toString/],
    ['a field named hasOwnProperty', { hasOwnProperty: 'x' }, /hasOwnProperty/],
  ])('%s: that op is rejected, the rest of the batch applied, the answer 200', async (_name, extra, field) => {
    const dev = device(team.head);
    const good1 = newObservation(team, dev, { note: 'emoji 🛼 and עברית stay as they are' });
    const bad = upsert(dev, 'observations', uuidv7(), fieldsOf(extra));
    const good2 = newObservation(team, dev);
    const res = await push(server.app, dev, team.teamId, [good1, bad, good2]).expect(200);
    expect(res.body.results.map((r: { status: string }) => r.status)).toEqual(['applied', 'rejected', 'applied']);
    expect(res.body.results[1].message).toMatch(field);
    expect(await serverObservation(bad.recordId)).toBeUndefined();
    expect((await serverObservation(good1.recordId))?.note).toBe('emoji 🛼 and עברית stay as they are');
  });

  it('a field named __proto__ in the raw body is refused (400 naming it; the device then finds the op by halving)', async () => {
    const dev = device(team.head);
    const good = newObservation(team, dev);
    const bad = upsert(dev, 'observations', uuidv7(), fieldsOf({}));
    const body = JSON.stringify({ clientId: dev.clientId, teamId: team.teamId, ops: [good, bad] }).replace(
      '"mark":"good","createdAt"',
      '"mark":"good","__proto__":{"polluted":true},"createdAt"',
    );
    expect(body).toContain('__proto__');
    const res = await request(server.app).post('/api/sync/push').set(team.head.auth).set('content-type', 'application/json').send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/__proto__/);
    expect(await serverObservation(bad.recordId)).toBeUndefined();
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });

  it.each([
    ['year 0', '0000-01-01'],
    ['30 February', '2026-02-30'],
    ['month 13', '2026-13-01'],
  ])('a session day of %s is refused per op', async (_name, day) => {
    const dev = device(team.head);
    const reply = await pushOk(server.app, dev, team.teamId, [sessionCreate(dev, uuidv7(), userIdOf(team.head), day)]);
    expect(reply.results[0]).toMatchObject({ status: 'rejected', reason: 'validation', message: expect.stringMatching(/day/i) });
  });

  it('a value PostgreSQL itself refuses (a constraint the schema does not know) rejects only that op', async () => {
    // A constraint only this test's text can break, so parallel tests are not disturbed.
    const magic = `refused-by-the-database-${uuidv7()}`;
    const name = `ck_test_refuse_${Date.now()}`;
    await server.dataSource.query(`ALTER TABLE observations ADD CONSTRAINT ${name} CHECK (note <> '${magic}') NOT VALID`);
    try {
      const dev = device(team.head);
      const good1 = newObservation(team, dev);
      const bad = newObservation(team, dev, { note: magic });
      const good2 = newObservation(team, dev);
      const res = await push(server.app, dev, team.teamId, [good1, bad, good2]).expect(200);
      expect(res.body.results.map((r: { status: string }) => r.status)).toEqual(['applied', 'rejected', 'applied']);
      expect(res.body.results[1]).toMatchObject({ reason: 'validation', message: expect.stringMatching(/database refused/) });
      expect(await serverObservation(bad.recordId)).toBeUndefined();
      expect(await serverObservation(good1.recordId)).toBeDefined();
      expect(await serverObservation(good2.recordId)).toBeDefined();
      const [{ n }] = await server.dataSource.query(`SELECT count(*)::int AS n FROM op_log WHERE team_id = $1 AND op_id = $2`, [team.teamId, bad.opId]);
      expect(n).toBe(0);
    } finally {
      await server.dataSource.query(`ALTER TABLE observations DROP CONSTRAINT ${name}`);
    }
  });
});

describe('4. nothing the client can forge is kept', () => {
  it('an author naming another user is refused; a create without one is the signed-in user', async () => {
    const dev = device(team.coach);
    const forged = newObservation(team, dev, { createdBy: userIdOf(team.head) });
    const plain = newObservation(team, dev);
    const { createdBy: _drop, ...withoutAuthor } = plain.fields;
    const noAuthor = { ...plain, fields: withoutAuthor, hlc: Object.fromEntries(Object.keys(withoutAuthor).map((f) => [f, plain.hlc.mark])) };
    const reply = await pushOk(server.app, dev, team.teamId, [forged, noAuthor]);
    expect(reply.results[0]).toMatchObject({ status: 'rejected', reason: 'permission' });
    expect(reply.results[1].status).toBe('applied');
    expect(await serverObservation(forged.recordId)).toBeUndefined();
    expect((await serverObservation(noAuthor.recordId))?.created_by).toBe(userIdOf(team.coach));
  });

  it.each([
    ['createdAt a day ahead', { createdAt: new Date(Date.now() + 86_400_000).toISOString() }, /future/],
    ['createdAt before the team existed', { createdAt: '2001-01-01T00:00:00.000Z' }, /before the team existed/],
  ])('%s is refused', async (_name, extra, message) => {
    const dev = device(team.head);
    const op = newObservation(team, dev);
    const reply = await pushOk(server.app, dev, team.teamId, [{ ...op, fields: { ...op.fields, ...extra } }]);
    expect(reply.results[0]).toMatchObject({ status: 'rejected', reason: 'validation', message: expect.stringMatching(message) });
  });

  it('an acknowledgement dated in the future is refused', async () => {
    const coachDevice = device(team.head);
    const note = newObservation(team, coachDevice);
    await pushOk(server.app, coachDevice, team.teamId, [note]);
    const skater = device(team.skaterAccount);
    const reply = await pushOk(server.app, skater, team.teamId, [
      upsert(skater, 'observations', note.recordId, { acknowledgedAt: new Date(Date.now() + 7 * 86_400_000).toISOString() }),
    ]);
    expect(reply.results[0]).toMatchObject({ status: 'rejected', reason: 'validation', message: expect.stringMatching(/future/) });
  });

  it("another user's op id is a conflict, not a duplicate; the owner's retry is a duplicate", async () => {
    const mine = device(team.head);
    const op = newObservation(team, mine, { note: 'the original' });
    await pushOk(server.app, mine, team.teamId, [op]);
    const theirs = device(team.coach);
    const copy = { ...newObservation(team, theirs, { note: 'a copy under the same op id' }), opId: op.opId };
    const reply = await pushOk(server.app, theirs, team.teamId, [copy]);
    expect(reply.results[0]).toMatchObject({ status: 'rejected', reason: 'conflict' });
    expect(await serverObservation(copy.recordId)).toBeUndefined();
    const retry = await pushOk(server.app, mine, team.teamId, [op]);
    expect(retry.results[0].status).toBe('duplicate');
  });

  it('a delete of an id the server never had leaves a tombstone: a later create stays deleted', async () => {
    const dev = device(team.head);
    const id = uuidv7();
    const del = remove(dev, 'observations', id);
    expect((await pushOk(server.app, dev, team.teamId, [del])).results[0].status).toBe('applied');
    const create = newObservation(team, dev, { id });
    const reply = await pushOk(server.app, dev, team.teamId, [create]);
    expect(reply.results[0]).toMatchObject({ status: 'applied', message: expect.stringMatching(/deleted/) });
    expect(await serverObservation(id)).toBeUndefined();
    const seen = latest(await pullAll(server.app, team.head, team.teamId));
    expect(seen.get(`observations:${id}`)).toBeUndefined();
  });
});

describe('8. what a skater may see', () => {
  it('a skater pulls only their own group; moving to another group evicts the old one and brings the new', async () => {
    const [{ id: red }] = await server.dataSource.query(
      `INSERT INTO skater_groups (team_id, id, name, sort_order) VALUES ($1, gen_random_uuid(), 'Red group', 1) RETURNING id`,
      [team.teamId],
    );
    const [{ id: blue }] = await server.dataSource.query(
      `INSERT INTO skater_groups (team_id, id, name, sort_order) VALUES ($1, gen_random_uuid(), 'Blue group', 2) RETURNING id`,
      [team.teamId],
    );
    await server.dataSource.query(`UPDATE skaters SET group_id = $3 WHERE team_id = $1 AND id = $2`, [team.teamId, team.skaterA.id, red]);
    const first = await pullAll(server.app, team.skaterAccount, team.teamId);
    const groupsSeen = first.changes.filter((c) => c.table === 'groups').map((c) => c.id);
    expect(groupsSeen).toEqual([red]);
    // The coach sees both.
    const coachView = await pullAll(server.app, team.head, team.teamId);
    expect(coachView.changes.filter((c) => c.table === 'groups').map((c) => c.id).sort()).toEqual([red, blue].sort());

    await server.dataSource.query(`UPDATE skaters SET group_id = $3 WHERE team_id = $1 AND id = $2`, [team.teamId, team.skaterA.id, blue]);
    const next = await pullAll(server.app, team.skaterAccount, team.teamId, first.cursor);
    const evicted = next.pages.flatMap((p) => p.evictions);
    expect(evicted).toContainEqual({ table: 'groups', id: red });
    expect(next.changes.filter((c) => c.table === 'groups').map((c) => c.id)).toEqual([blue]);
    // The guardian of the other skater (no group) sees no group at all.
    const guardianView = await pullAll(server.app, team.guardian, team.teamId);
    expect(guardianView.changes.filter((c) => c.table === 'groups')).toEqual([]);
  });
});
