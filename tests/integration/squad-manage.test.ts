/**
 * The squad a head coach manages, against the real PostgreSQL: unique skater, group and cue names
 * (any case, NFC, retired skaters and archived cues count; 409 with a clear message, also under a
 * race, never 500), rename / move / retire reaching every device's pull, groups, removing a member
 * (their tokens stop working at once, a skater's profile is unlinked and can be invited again),
 * withdrawing and re-sending an invitation, and the roles each route needs.
 */
import { Client } from 'pg';
import request from 'supertest';
import { v7 as uuidv7 } from 'uuid';
import type { Group, Invitation, Member, Skater } from '../../shared/schemas';
import type { PullReply } from '../../shared/schemas/sync';
import {
  addressesOf,
  addSkater,
  expectError,
  inviteAndAccept,
  linkToken,
  PASSWORD,
  signIn,
  signUpCoach,
  startTestServer,
  uniqueEmail,
  waitForMail,
  accountOf,
  type Account,
  type Coach,
  type TestServer,
} from './helpers';
import { device, makeTeam, newObservation, pull, pullAll, push, pushOk, upsert, userIdOf, type SyncTeam } from './sync-helpers';

let server: TestServer;
let team: SyncTeam;
let other: Coach;

beforeAll(async () => {
  server = await startTestServer();
  team = await makeTeam(server.app, 'squad');
  other = await signUpCoach(server.app, 'othersquad');
});
afterAll(async () => {
  await server.close();
});

const api = (teamId: string) => `/api/teams/${teamId}`;
const createSkater = (coach: Coach, body: unknown) => request(server.app).post(`${api(coach.teamId)}/skaters`).set(coach.auth).send(body as object);
const patchSkater = (who: Account, teamId: string, skaterId: string, body: unknown) =>
  request(server.app).patch(`${api(teamId)}/skaters/${skaterId}`).set(who.auth).send(body as object);
const createGroup = (who: Account, teamId: string, body: unknown) => request(server.app).post(`${api(teamId)}/groups`).set(who.auth).send(body as object);
const squadOf = async (coach: Coach) => (await request(server.app).get(`${api(coach.teamId)}/squad`).set(coach.auth).expect(200)).body as { groups: Group[]; skaters: Skater[] };

/** A fresh team per test that changes names, so names never meet by accident. */
const freshHead = (label: string) => signUpCoach(server.app, label);

/** Waits until `count` backends running a query matching `like` wait on `holderPid`; fails loudly otherwise. */
async function waitForBlocked(observer: Client, holderPid: number, like: string, count = 1, timeoutMs = 10_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    // Blocked by the holder, or queued behind a backend the holder blocks (a second writer of the
    // same row waits for the first waiter's tuple lock).
    const { rows } = await observer.query(
      `SELECT pid FROM pg_stat_activity a
        WHERE wait_event_type = 'Lock' AND query ILIKE $2
          AND ($1 = ANY(pg_blocking_pids(pid))
               OR EXISTS (SELECT 1 FROM unnest(pg_blocking_pids(pid)) b WHERE $1 = ANY(pg_blocking_pids(b))))`,
      [holderPid, like],
    );
    if (rows.length >= count) return;
    if (Date.now() > deadline) throw new Error(`fewer than ${count} backends blocked by ${holderPid} on ${like} within ${timeoutMs} ms`);
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
}

async function openClients() {
  const holder = new Client({ connectionString: process.env.DATABASE_URL });
  const observer = new Client({ connectionString: process.env.DATABASE_URL });
  await holder.connect();
  await observer.connect();
  const [{ pid }] = (await holder.query('SELECT pg_backend_pid() AS pid')).rows as { pid: number }[];
  return { holder, observer, pid, close: () => Promise.all([holder.end(), observer.end()]) };
}

describe('skater names are unique in a team', () => {
  it('refuses a second skater with the same name in any case or accent form (409 naming the field), not in another team', async () => {
    const head = await freshHead('dupcreate');
    await createSkater(head, { displayName: 'Mia K.' }).expect(201);
    for (const name of ['Mia K.', 'mia k.', '  MIA K.  ']) {
      const res = await createSkater(head, { displayName: name });
      expectError(res, 409, 'conflict');
      expect(res.body.error.message).toBe('There is already a skater called “Mia K.” in this team. Add an initial or a second name to tell them apart.');
      expect(res.body.error.fields).toEqual({ displayName: '“Mia K.” is in the squad already: add an initial or a second name' });
    }
    // é typed as one letter and as e + combining accent is one name.
    await createSkater(head, { displayName: 'Élodie Vos' }).expect(201);
    expectError(await createSkater(head, { displayName: 'E\u0301LODIE VOS' }), 409, 'conflict');
    // Another team may have its own Mia K.; a near name is a different person.
    await createSkater(other, { displayName: 'Mia K.' }).expect(201);
    await createSkater(head, { displayName: 'Mia Ko.' }).expect(201);
    expect((await squadOf(head)).skaters.map((s) => s.displayName).sort()).toEqual(['Mia K.', 'Mia Ko.', 'Élodie Vos']);
  });

  it('a retired skater keeps the name: the message says so and suggests bringing them back', async () => {
    const head = await freshHead('dupretired');
    const mia = (await createSkater(head, { displayName: 'Mia K.' }).expect(201)).body as Skater;
    await patchSkater(head, head.teamId, mia.id, { retired: true }).expect(200);
    const res = await createSkater(head, { displayName: 'MIA K.' });
    expectError(res, 409, 'conflict');
    expect(res.body.error.message).toBe(
      'There is already a retired skater called “Mia K.” in this team: bring them back from the retired list, or add an initial or a second name to tell them apart.',
    );
    expect(res.body.error.fields.displayName).toMatch(/retired skater/);
  });

  it('refuses a rename to a taken name (also a retired one); a change of case of the own name is fine', async () => {
    const head = await freshHead('duprename');
    const a = (await createSkater(head, { displayName: 'Anna Reede' }).expect(201)).body as Skater;
    const b = (await createSkater(head, { displayName: 'Bram Tolsma' }).expect(201)).body as Skater;
    const res = await patchSkater(head, head.teamId, b.id, { displayName: 'anna reede' });
    expectError(res, 409, 'conflict');
    expect(res.body.error.fields).toEqual({ displayName: expect.stringContaining('“Anna Reede”') });
    await patchSkater(head, head.teamId, a.id, { retired: true }).expect(200);
    expect((await patchSkater(head, head.teamId, b.id, { displayName: 'ANNA REEDE' })).body.error.message).toMatch(/retired skater called “Anna Reede”/);
    const renamed = await patchSkater(head, head.teamId, b.id, { displayName: 'bram tolsma' }).expect(200);
    expect(renamed.body).toMatchObject({ id: b.id, displayName: 'bram tolsma' });
  });

  it('two creates of one name at the same moment: one 201, one 409, never a 500', async () => {
    const head = await freshHead('duprace');
    const { holder, observer, pid, close } = await openClients();
    try {
      // Hold the team's counter so both requests are in flight before either can write.
      await holder.query('BEGIN');
      await holder.query(`SELECT seq FROM team_counters WHERE team_id = $1 FOR UPDATE`, [head.teamId]);
      const both = Promise.all([
        createSkater(head, { displayName: 'Jet Zwart' }).then((r) => r),
        createSkater(head, { displayName: 'JET ZWART' }).then((r) => r),
      ]);
      await waitForBlocked(observer, pid, '%team_counters%', 2);
      await holder.query('COMMIT');
      const statuses = (await both).map((r) => r.status).sort();
      expect(statuses).toEqual([201, 409]);
    } finally {
      await close();
    }
    expect((await squadOf(head)).skaters.map((s) => s.displayName.toLowerCase())).toEqual(['jet zwart']);
  });

  it('a name written by another transaction after the check is still a 409 (the unique index), never a 500', async () => {
    const head = await freshHead('dupindex');
    const { holder, observer, pid, close } = await openClients();
    try {
      // Another writer (not through the routes, not taking the counter) inserts the name and waits.
      await holder.query('BEGIN');
      await holder.query(`INSERT INTO skaters (team_id, id, display_name, server_seq) VALUES ($1, $2, 'Sil Brand', 0)`, [head.teamId, uuidv7()]);
      const creating = createSkater(head, { displayName: 'sil brand' }).then((r) => r);
      await waitForBlocked(observer, pid, '%INSERT INTO skaters%');
      await holder.query('COMMIT');
      const res = await creating;
      expectError(res, 409, 'conflict');
      expect(res.body.error.message).toMatch(/^There is already a skater called “Sil Brand” in this team/);
    } finally {
      await close();
    }
  });

  it('bad bodies are 400 naming the problem; emoji and right-to-left names are fine', async () => {
    const head = await freshHead('badbody');
    const mia = (await createSkater(head, { displayName: 'Mia Kolk' }).expect(201)).body as Skater;
    for (const body of [{ displayName: 'A\u0000B' }, { displayName: 'Mia', constructor: 'x' }, { displayName: '' }, { displayName: 'x'.repeat(81) }]) {
      expectError(await createSkater(head, body), 400, 'validation');
    }
    for (const body of [
      {},
      { constructor: { name: 'x' } },
      { toString: 'x' },
      { displayName: 'Mia\u0000' },
      { displayName: 'Line\nbreak' },
      { retired: 'yes' },
      { groupId: 'not-a-uuid' },
      { teamId: other.teamId },
    ]) {
      const res = await patchSkater(head, head.teamId, mia.id, body);
      expectError(res, 400, 'validation');
    }
    const empty = await patchSkater(head, head.teamId, mia.id, {});
    expect(empty.body.error.message).toMatch(/Say what to change/);
    expectError(await createGroup(head, head.teamId, { name: 'Sprint', prototype: 1 }), 400, 'validation');
    for (const name of ['🚀 Noor', 'ليلى حداد', 'Łucja Ōtani-Müller']) {
      const res = await createSkater(head, { displayName: name }).expect(201);
      expect(res.body.displayName).toBe(name);
    }
    const renamed = await patchSkater(head, head.teamId, mia.id, { displayName: 'שירה 🎯' }).expect(200);
    expect(renamed.body.displayName).toBe('שירה 🎯');
  });
});

describe('rename, move and retire reach every device', () => {
  it('the coach and the skater pull the new name and group with a newer server_seq; the skater leaves the old group', async () => {
    const coachStart = await pullAll(server.app, team.coach, team.teamId);
    const skaterStart = await pullAll(server.app, team.skaterAccount, team.teamId);

    const sprint = (await createGroup(team.head, team.teamId, { name: 'Sprint' }).expect(201)).body as Group;
    const moved = await patchSkater(team.head, team.teamId, team.skaterA.id, { displayName: 'Wietske R.', groupId: sprint.id }).expect(200);
    expect(moved.body).toEqual({ id: team.skaterA.id, displayName: 'Wietske R.', groupId: sprint.id, hasAccount: true, retired: false });

    const coachPull = await pullAll(server.app, team.coach, team.teamId, coachStart.cursor);
    const profile = coachPull.changes.find((c) => c.table === 'skaters' && c.id === team.skaterA.id);
    expect(profile?.fields).toEqual({ displayName: 'Wietske R.', groupId: sprint.id, hasAccount: true, retired: false });
    expect(profile!.serverSeq).toBeGreaterThan(coachStart.cursor);
    expect(coachPull.changes.find((c) => c.table === 'groups' && c.id === sprint.id)?.fields).toEqual({ name: 'Sprint', sortOrder: expect.any(Number) });

    const skaterPull = await pullAll(server.app, team.skaterAccount, team.teamId, skaterStart.cursor);
    expect(skaterPull.changes.find((c) => c.table === 'skaters' && c.id === team.skaterA.id)?.fields).toMatchObject({ displayName: 'Wietske R.', groupId: sprint.id });
    expect(skaterPull.changes.some((c) => c.table === 'groups' && c.id === sprint.id)).toBe(true);
    // The skater's device never hears of the other skater.
    expect(skaterPull.changes.some((c) => c.table === 'skaters' && c.id === team.skaterB.id)).toBe(false);

    // Moved on to another group: the skater's device drops Sprint.
    const distance = (await createGroup(team.head, team.teamId, { name: 'Distance' }).expect(201)).body as Group;
    expect(distance.sortOrder).toBeGreaterThan(sprint.sortOrder);
    await patchSkater(team.head, team.teamId, team.skaterA.id, { groupId: distance.id }).expect(200);
    const res = await pull(server.app, team.skaterAccount, team.teamId, skaterPull.cursor).expect(200);
    const page = res.body as PullReply;
    expect(page.evictions).toContainEqual({ table: 'groups', id: sprint.id });
    expect(page.changes.some((c) => c.table === 'groups' && c.id === distance.id)).toBe(true);

    // No group at all.
    const loose = await patchSkater(team.head, team.teamId, team.skaterA.id, { groupId: null }).expect(200);
    expect(loose.body.groupId).toBeNull();
  });

  it('retiring keeps the notes and the profile; devices pull retired: true; bringing back clears it', async () => {
    const dev = device(team.head);
    const note = newObservation(team, dev, { skaterId: team.skaterB.id, note: 'Hips lower', noteShared: true });
    await pushOk(server.app, dev, team.teamId, [note]);
    const start = await pullAll(server.app, team.coach, team.teamId);
    const guardianStart = await pullAll(server.app, team.guardian, team.teamId);

    const retired = await patchSkater(team.head, team.teamId, team.skaterB.id, { retired: true }).expect(200);
    expect(retired.body).toMatchObject({ id: team.skaterB.id, retired: true });
    const after = await pullAll(server.app, team.coach, team.teamId, start.cursor);
    expect(after.changes.find((c) => c.id === team.skaterB.id)?.fields).toMatchObject({ retired: true });
    expect(after.tombstones).toEqual([]);
    // The guardian's device learns it too, and still holds the note.
    const guardianAfter = await pullAll(server.app, team.guardian, team.teamId, guardianStart.cursor);
    expect(guardianAfter.changes.find((c) => c.id === team.skaterB.id)?.fields).toMatchObject({ retired: true });
    const fromStart = await pullAll(server.app, team.guardian, team.teamId);
    expect(fromStart.changes.find((c) => c.id === note.recordId)?.fields).toMatchObject({ note: 'Hips lower' });

    const squad = await squadOf(team.head);
    expect(squad.skaters.find((s) => s.id === team.skaterB.id)).toMatchObject({ retired: true });
    const one = await request(server.app).get(`${api(team.teamId)}/skaters/${team.skaterB.id}`).set(team.head.auth).expect(200);
    expect(one.body.retired).toBe(true);
    const [{ count }] = await server.dataSource.query(
      `SELECT count(*)::int AS count FROM observations WHERE team_id = $1 AND skater_id = $2 AND deleted_at IS NULL`,
      [team.teamId, team.skaterB.id],
    );
    expect(count).toBeGreaterThanOrEqual(1);
    // A device that wrote a note before it heard of the retirement still gets it in.
    const late = newObservation(team, dev, { skaterId: team.skaterB.id });
    expect((await pushOk(server.app, dev, team.teamId, [late])).results[0].status).toBe('applied');

    const back = await patchSkater(team.head, team.teamId, team.skaterB.id, { retired: false }).expect(200);
    expect(back.body.retired).toBe(false);
    const again = await pullAll(server.app, team.coach, team.teamId, after.cursor);
    expect(again.changes.find((c) => c.id === team.skaterB.id)?.fields).toMatchObject({ retired: false });
  });

  it('an unknown or foreign skater or group is 404; ids that are not UUIDs too', async () => {
    const foreignSkater = await addSkater(server.app, other, 'Bauke Slikveld');
    const foreignGroup = (await createGroup(other, other.teamId, { name: 'Elsewhere' }).expect(201)).body as Group;
    expectError(await patchSkater(team.head, team.teamId, foreignSkater.id, { retired: true }), 404, 'not_found');
    expectError(await patchSkater(team.head, team.teamId, uuidv7(), { retired: true }), 404, 'not_found');
    expectError(await patchSkater(team.head, team.teamId, 'not-an-id', { retired: true }), 404, 'not_found');
    const res = await patchSkater(team.head, team.teamId, team.skaterA.id, { groupId: foreignGroup.id });
    expectError(res, 404, 'not_found');
    expect(res.body.error.message).toBe('No such group in this team');
    expectError(await createSkater(team.head, { displayName: 'Nieuw Lid', groupId: foreignGroup.id }), 404, 'not_found');
    expectError(await request(server.app).patch(`${api(team.teamId)}/groups/${foreignGroup.id}`).set(team.head.auth).send({ name: 'Mine' }), 404, 'not_found');
    // The foreign skater is untouched.
    expect((await squadOf(other)).skaters.find((s) => s.id === foreignSkater.id)).toMatchObject({ retired: false, displayName: 'Bauke Slikveld' });
  });
});

describe('groups', () => {
  it('a new team adds groups in order, refuses a taken name in any case, and renames', async () => {
    const head = await freshHead('groups');
    const a = (await createGroup(head, head.teamId, { name: 'Juniors A' }).expect(201)).body as Group;
    const b = (await createGroup(head, head.teamId, { name: 'Juniors B' }).expect(201)).body as Group;
    expect([a.sortOrder, b.sortOrder]).toEqual([1, 2]);
    const dup = await createGroup(head, head.teamId, { name: 'juniors a' });
    expectError(dup, 409, 'conflict');
    expect(dup.body.error.message).toBe('There is already a group called “Juniors A” in this team. Pick another name.');
    expect(dup.body.error.fields).toEqual({ name: '“Juniors A” exists already: pick another name' });
    const rename = (name: string, id = b.id) => request(server.app).patch(`${api(head.teamId)}/groups/${id}`).set(head.auth).send({ name });
    expectError(await rename('JUNIORS A'), 409, 'conflict');
    expect((await rename('Seniors').expect(200)).body).toEqual({ id: b.id, name: 'Seniors', sortOrder: 2 });
    expect((await rename('seniors').expect(200)).body.name).toBe('seniors');
    expectError(await rename('Other', uuidv7()), 404, 'not_found');
    expectError(await createGroup(head, head.teamId, { id: a.id, name: 'Copy' }), 409, 'conflict');
    expect((await squadOf(head)).groups.map((g) => g.name)).toEqual(['Juniors A', 'seniors']);
  });
});

describe('roles on the new routes', () => {
  it('a coach, a skater and a guardian are refused (403); a head coach of another team finds nothing (404)', async () => {
    const inv = (await request(server.app).post(`${api(team.teamId)}/invitations`).set(team.head.auth).send({ email: uniqueEmail('roles'), role: 'coach' }).expect(201))
      .body as Invitation;
    const group = (await createGroup(team.head, team.teamId, { name: 'Roles group' }).expect(201)).body as Group;
    const calls = (who: Account) => [
      request(server.app).patch(`${api(team.teamId)}/skaters/${team.skaterA.id}`).set(who.auth).send({ retired: true }),
      request(server.app).post(`${api(team.teamId)}/groups`).set(who.auth).send({ name: 'Not allowed' }),
      request(server.app).patch(`${api(team.teamId)}/groups/${group.id}`).set(who.auth).send({ name: 'Not allowed' }),
      request(server.app).delete(`${api(team.teamId)}/members/${userIdOf(team.guardian)}`).set(who.auth),
      request(server.app).delete(`${api(team.teamId)}/invitations/${inv.id}`).set(who.auth),
      request(server.app).post(`${api(team.teamId)}/invitations/${inv.id}/resend`).set(who.auth),
      request(server.app).post(`${api(team.teamId)}/skaters`).set(who.auth).send({ displayName: 'Not allowed' }),
    ];
    for (const who of [team.coach, team.skaterAccount, team.guardian]) {
      for (const res of await Promise.all(calls(who))) expectError(res, 403, 'forbidden');
    }
    for (const res of await Promise.all(calls(other))) expectError(res, 404, 'not_found');
    // Nothing changed.
    expect((await squadOf(team.head)).skaters.find((s) => s.id === team.skaterA.id)?.retired).toBe(false);
    const members = (await request(server.app).get(`${api(team.teamId)}/members`).set(team.head.auth).expect(200)).body as Member[];
    expect(members.some((m) => m.userId === userIdOf(team.guardian))).toBe(true);
  });
});

describe('removing a member', () => {
  it("a removed coach's tokens stop working at once on team routes, sync push and pull, and refresh; their notes stay", async () => {
    const t = await makeTeam(server.app, 'rmcoach');
    const dev = device(t.coach);
    const note = newObservation(t, dev, { note: 'Written by the assistant' });
    await pushOk(server.app, dev, t.teamId, [note]);
    // A second device of the same coach.
    const laptop = accountOf(await signIn(server.app, t.coach.email).expect(200));

    await request(server.app).delete(`${api(t.teamId)}/members/${userIdOf(t.coach)}`).set(t.head.auth).expect(204);

    for (const who of [t.coach, laptop]) {
      expectError(await request(server.app).get(`${api(t.teamId)}/squad`).set(who.auth), 401, 'unauthorized');
      expectError(await pull(server.app, who, t.teamId), 401, 'unauthorized');
      const phone = device(who);
      expectError(await push(server.app, phone, t.teamId, [newObservation(t, phone)]), 401, 'unauthorized');
      expectError(await request(server.app).post('/api/auth/refresh').set('Cookie', who.cookie), 401, 'unauthorized');
    }
    // Signing in again works (the account lives on) but the team is gone from it.
    const fresh = accountOf(await signIn(server.app, t.coach.email).expect(200));
    expect(fresh.session.memberships.map((m) => m.teamId)).not.toContain(t.teamId);
    expectError(await request(server.app).get(`${api(t.teamId)}/squad`).set(fresh.auth), 404, 'not_found');
    expectError(await pull(server.app, fresh, t.teamId), 404, 'not_found');

    const members = (await request(server.app).get(`${api(t.teamId)}/members`).set(t.head.auth).expect(200)).body as Member[];
    expect(members.map((m) => m.userId)).not.toContain(userIdOf(t.coach));
    const headPull = await pullAll(server.app, t.head, t.teamId);
    expect(headPull.changes.find((c) => c.id === note.recordId)?.fields).toMatchObject({ note: 'Written by the assistant', createdBy: userIdOf(t.coach) });
  });

  it("a removed skater's profile stays with its notes, unlinked (devices pull hasAccount: false), and can be invited again", async () => {
    const t = await makeTeam(server.app, 'rmskater');
    const dev = device(t.head);
    const note = newObservation(t, dev, { skaterId: t.skaterA.id, note: 'Keep this' });
    await pushOk(server.app, dev, t.teamId, [note]);
    const start = await pullAll(server.app, t.coach, t.teamId);

    await request(server.app).delete(`${api(t.teamId)}/members/${userIdOf(t.skaterAccount)}`).set(t.head.auth).expect(204);
    expectError(await request(server.app).get(`${api(t.teamId)}/squad`).set(t.skaterAccount.auth), 401, 'unauthorized');
    expectError(await pull(server.app, t.skaterAccount, t.teamId), 401, 'unauthorized');

    const profile = (await squadOf(t.head)).skaters.find((s) => s.id === t.skaterA.id);
    expect(profile).toMatchObject({ displayName: 'Wietske Rondbaan', hasAccount: false, retired: false });
    const after = await pullAll(server.app, t.coach, t.teamId, start.cursor);
    expect(after.changes.find((c) => c.table === 'skaters' && c.id === t.skaterA.id)?.fields).toMatchObject({ hasAccount: false });
    const [{ count }] = await server.dataSource.query(`SELECT count(*)::int AS count FROM observations WHERE team_id = $1 AND id = $2`, [t.teamId, note.recordId]);
    expect(count).toBe(1);

    // Invited again with the same e-mail: the existing account joins with its password.
    const email = t.skaterAccount.email;
    await request(server.app).post(`${api(t.teamId)}/invitations`).set(t.head.auth).send({ email, role: 'skater', skaterId: t.skaterA.id }).expect(201);
    // The newest mail to them: this invitation (the first one's link was used up when they joined).
    const mail = await waitForMail(email, { where: (m) => addressesOf(m, 'to').includes(email) });
    const rejoined = await request(server.app).post('/api/invitations/accept').send({ token: linkToken(mail), password: PASSWORD }).expect(200);
    expect(rejoined.body.memberships).toContainEqual({ teamId: t.teamId, teamName: expect.any(String), role: 'skater', skaterId: t.skaterA.id });
    expect((await squadOf(t.head)).skaters.find((s) => s.id === t.skaterA.id)?.hasAccount).toBe(true);
  });

  it('a guardian is removed without touching the skater link; the list shows guardians with their skater', async () => {
    const t = await makeTeam(server.app, 'rmguardian');
    const before = (await request(server.app).get(`${api(t.teamId)}/members`).set(t.head.auth).expect(200)).body as Member[];
    expect(before.find((m) => m.userId === userIdOf(t.guardian))).toMatchObject({ role: 'guardian', skaterId: t.skaterB.id });
    await request(server.app).delete(`${api(t.teamId)}/members/${userIdOf(t.guardian)}`).set(t.head.auth).expect(204);
    const squad = await squadOf(t.head);
    expect(squad.skaters.find((s) => s.id === t.skaterA.id)?.hasAccount).toBe(true);
    expect(squad.skaters.find((s) => s.id === t.skaterB.id)?.hasAccount).toBe(false);
    // The skater member is still signed in.
    await request(server.app).get(`${api(t.teamId)}/squad`).set(t.skaterAccount.auth).expect(200);
  });

  it('yourself (409), another head coach (409), an unknown or foreign user or a bad id (404)', async () => {
    const t = await makeTeam(server.app, 'rmrules', { people: false });
    const self = await request(server.app).delete(`${api(t.teamId)}/members/${userIdOf(t.head)}`).set(t.head.auth);
    expectError(self, 409, 'conflict');
    expect(self.body.error.message).toBe('You cannot remove yourself from the team: the team needs its head coach');
    // A second head coach (made in the database: invitations never make one).
    const second = await signUpCoach(server.app, 'secondhead');
    await server.dataSource.query(`INSERT INTO memberships (team_id, user_id, role) VALUES ($1, $2, 'head_coach')`, [t.teamId, userIdOf(second)]);
    const head2 = await request(server.app).delete(`${api(t.teamId)}/members/${userIdOf(second)}`).set(t.head.auth);
    expectError(head2, 409, 'conflict');
    expect(head2.body.error.message).toBe('A head coach cannot be removed from the team');
    expectError(await request(server.app).delete(`${api(t.teamId)}/members/${uuidv7()}`).set(t.head.auth), 404, 'not_found');
    expectError(await request(server.app).delete(`${api(t.teamId)}/members/${userIdOf(other)}`).set(t.head.auth), 404, 'not_found');
    expectError(await request(server.app).delete(`${api(t.teamId)}/members/nope`).set(t.head.auth), 404, 'not_found');
    // Every sign-in of theirs still works.
    await request(server.app).get(`${api(t.teamId)}/squad`).set(second.auth).expect(200);
    await request(server.app).get(`${api(other.teamId)}/squad`).set(other.auth).expect(200);
  });
});

describe('withdrawing and re-sending an invitation', () => {
  const invite = (coach: Coach, body: object) => request(server.app).post(`${api(coach.teamId)}/invitations`).set(coach.auth).send(body);
  const preview = (token: string) => request(server.app).get(`/api/invitations/${token}`);
  const accept = (token: string) => request(server.app).post('/api/invitations/accept').send({ token, displayName: 'Rina Kolderveld', password: PASSWORD });
  const revoke = (coach: Coach, id: string) => request(server.app).delete(`${api(coach.teamId)}/invitations/${id}`).set(coach.auth);
  const resend = (coach: Coach, id: string) => request(server.app).post(`${api(coach.teamId)}/invitations/${id}/resend`).set(coach.auth);
  async function mailedToken(email: string, not?: string) {
    const mail = await waitForMail(email, { where: (m) => addressesOf(m, 'to').includes(email) && (!not || !(m.text ?? '').includes(not)) });
    return { mail, token: linkToken(mail) };
  }

  it('a withdrawn link fails like an expired one (preview and accept 404); the list shows revokedAt', async () => {
    const head = await freshHead('revoke');
    const email = uniqueEmail('withdrawn');
    const invitation = (await invite(head, { email, role: 'coach' }).expect(201)).body as Invitation;
    expect(invitation.revokedAt).toBeNull();
    const { token } = await mailedToken(email);
    await preview(token).expect(200);

    const revoked = await revoke(head, invitation.id).expect(200);
    expect(revoked.body).toMatchObject({ id: invitation.id, email, revokedAt: expect.any(String), acceptedAt: null });
    expectError(await preview(token), 404, 'invalid_link');
    expectError(await accept(token), 404, 'invalid_link');
    const [{ count }] = await server.dataSource.query('SELECT count(*)::int AS count FROM users WHERE email = $1', [email]);
    expect(count).toBe(0);

    const listed = (await request(server.app).get(`${api(head.teamId)}/invitations`).set(head.auth).expect(200)).body as Invitation[];
    expect(listed.find((i) => i.id === invitation.id)?.revokedAt).toBe(revoked.body.revokedAt);
    // Withdrawing again answers it as it is.
    expect((await revoke(head, invitation.id).expect(200)).body.revokedAt).toBe(revoked.body.revokedAt);
    expectError(await revoke(head, uuidv7()), 404, 'not_found');
    expectError(await revoke(other, invitation.id), 404, 'not_found');
  });

  it('an accepted invitation can be neither withdrawn nor sent again (409)', async () => {
    const head = await freshHead('revokeaccepted');
    const email = uniqueEmail('joined');
    const invitation = (await invite(head, { email, role: 'coach' }).expect(201)).body as Invitation;
    await accept((await mailedToken(email)).token).expect(200);
    const res = await revoke(head, invitation.id);
    expectError(res, 409, 'conflict');
    expect(res.body.error.message).toMatch(/accepted already/);
    expectError(await resend(head, invitation.id), 409, 'conflict');
  });

  it('sending again mails a new link on the same invitation: the old link stops working, the new one joins', async () => {
    const head = await freshHead('resend');
    const profile = await addSkater(server.app, head, 'Fenna Dijkhuis');
    const email = uniqueEmail('again');
    const invitation = (await invite(head, { email, role: 'skater', skaterId: profile.id }).expect(201)).body as Invitation;
    const first = await mailedToken(email);
    // Expired meanwhile, and withdrawn: sending again brings it back.
    await server.dataSource.query(`UPDATE invitations SET expires_at = now() - interval '1 day' WHERE team_id = $1 AND id = $2`, [head.teamId, invitation.id]);
    await revoke(head, invitation.id).expect(200);

    const again = await resend(head, invitation.id).expect(200);
    expect(again.body).toMatchObject({ id: invitation.id, email, role: 'skater', skaterId: profile.id, revokedAt: null, acceptedAt: null });
    expect(Date.parse(again.body.expiresAt) - Date.now()).toBeGreaterThan(13 * 86_400_000);
    const second = await mailedToken(email, first.token);
    expect(second.token).not.toBe(first.token);
    // The same words as the first mail, with the new link.
    expect(second.mail.subject).toBe(first.mail.subject);
    expect(second.mail.text?.replace(second.token, 'TOKEN')).toBe(first.mail.text?.replace(first.token, 'TOKEN'));

    expectError(await preview(first.token), 404, 'invalid_link');
    expectError(await accept(first.token), 404, 'invalid_link');
    expect((await preview(second.token).expect(200)).body).toMatchObject({ skaterName: 'Fenna Dijkhuis', role: 'skater' });
    await accept(second.token).expect(200);
    expect((await squadOf(head)).skaters.find((s) => s.id === profile.id)?.hasAccount).toBe(true);
    expectError(await resend(head, uuidv7()), 404, 'not_found');
  });

  it('a link read before it was sent again cannot be accepted after (the token is checked when claimed)', async () => {
    const head = await freshHead('resendrace');
    const email = uniqueEmail('racer');
    const invitation = (await invite(head, { email, role: 'coach' }).expect(201)).body as Invitation;
    const first = await mailedToken(email);
    await resend(head, invitation.id).expect(200);
    expectError(await accept(first.token), 404, 'invalid_link');
    const [{ count }] = await server.dataSource.query(`SELECT count(*)::int AS count FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1`, [email]);
    expect(count).toBe(0);
  });
});

describe('cue labels are unique in a phase (push)', () => {
  it('a duplicate label is that op rejected with a plain reason; the rest of the batch is applied', async () => {
    const head = await freshHead('cuedup');
    const cues = (await request(server.app).get(`${api(head.teamId)}/cues`).set(head.auth).expect(200)).body as { id: string; phase: string; label: string }[];
    const hug = cues.find((c) => c.label === 'Hug the blocks')!;
    const stayLow = cues.find((c) => c.label === 'Stay low, do not stand up')!;
    const dev = device(head);
    // Archive one cue first: an archived label counts too.
    expect((await pushOk(server.app, dev, head.teamId, [upsert(dev, 'cues', stayLow.id, { archived: true })])).results[0].status).toBe('applied');

    const ops = [
      upsert(dev, 'cues', uuidv7(), { phase: 'curve', label: 'hug THE blocks', sortOrder: 50 }),
      upsert(dev, 'cues', uuidv7(), { phase: 'curve', label: 'Look through the curve', sortOrder: 51 }),
      upsert(dev, 'cues', uuidv7(), { phase: 'straight', label: 'Hug the blocks', sortOrder: 52 }),
      upsert(dev, 'cues', uuidv7(), { phase: 'curve', label: 'STAY LOW, DO NOT STAND UP', sortOrder: 53 }),
      upsert(dev, 'cues', hug.id, { label: 'LEAN IN FROM THE ANKLE' }),
      upsert(dev, 'cues', uuidv7(), { phase: 'exit', label: 'Fresh exit cue', sortOrder: 54 }),
      upsert(dev, 'cues', uuidv7(), { phase: 'exit', label: 'fresh exit cue', sortOrder: 55 }),
    ];
    const reply = await pushOk(server.app, dev, head.teamId, ops);
    expect(reply.results.map((r) => r.status)).toEqual(['rejected', 'applied', 'applied', 'rejected', 'rejected', 'applied', 'rejected']);
    expect(reply.results[0]).toMatchObject({ reason: 'validation', message: 'A cue called “Hug the blocks” exists already in this phase (Curve).' });
    expect(reply.results[3].message).toBe(
      'An archived cue called “Stay low, do not stand up” exists already in this phase (Curve): bring it back from the archive instead of adding it again.',
    );
    expect(reply.results[4].message).toBe('A cue called “Lean in from the ankle” exists already in this phase (Curve).');
    expect(reply.results[6].message).toBe('A cue called “Fresh exit cue” exists already in this phase (Curve exit).');

    const after = (await request(server.app).get(`${api(head.teamId)}/cues`).set(head.auth).expect(200)).body as { phase: string; label: string }[];
    expect(after.filter((c) => c.phase === 'curve' && c.label.toLowerCase() === 'hug the blocks')).toEqual([expect.objectContaining({ id: hug.id, label: 'Hug the blocks' })]);
    expect(after.some((c) => c.phase === 'curve' && c.label === 'Look through the curve')).toBe(true);
    expect(after.some((c) => c.phase === 'straight' && c.label === 'Hug the blocks')).toBe(true);
    expect(after.filter((c) => c.label.toLowerCase() === 'fresh exit cue')).toHaveLength(1);
    // Sent again (a rejected op is not logged), it is weighed again and refused in the same words.
    const retry = await pushOk(server.app, dev, head.teamId, [ops[0]]);
    expect(retry.results[0]).toMatchObject({ status: 'rejected', message: 'A cue called “Hug the blocks” exists already in this phase (Curve).' });
  });
});
