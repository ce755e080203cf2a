/**
 * Role and team checks on the team-scoped routes: a member of another team finds nothing (404),
 * a member without the role is refused (403), and skaters and guardians see only their skater.
 */
import request from 'supertest';
import { v7 as uuidv7 } from 'uuid';
import type { Skater } from '../../shared/schemas';
import {
  addSkater,
  expectError,
  inviteAndAccept,
  signUpCoach,
  startTestServer,
  type Account,
  type Coach,
  type TestServer,
} from './helpers';

let server: TestServer;
// Team A: head coach, a coach, two skater profiles; skater 1 has an account, skater 2 a guardian.
let headA: Coach;
let coachA: Account;
let skater1: Skater;
let skater2: Skater;
let skaterAccount: Account;
let guardianAccount: Account;
// Team B: a head coach and a coach who must find nothing of team A.
let headB: Coach;
let coachB: Account;
let skaterOfB: Skater;

beforeAll(async () => {
  server = await startTestServer();
  headA = await signUpCoach(server.app, 'headA');
  headB = await signUpCoach(server.app, 'headB');
  coachA = await inviteAndAccept(server.app, headA, 'coach', { label: 'coachA' });
  coachB = await inviteAndAccept(server.app, headB, 'coach', { label: 'coachB' });
  skater1 = await addSkater(server.app, headA, 'Anouk Ribbelink');
  skater2 = await addSkater(server.app, headA, 'Berend Schaatsma');
  skaterOfB = await addSkater(server.app, headB, 'Cato Lindewaard');
  skaterAccount = await inviteAndAccept(server.app, headA, 'skater', { skaterId: skater1.id, label: 'anouk' });
  guardianAccount = await inviteAndAccept(server.app, headA, 'guardian', { skaterId: skater2.id, label: 'berendparent' });
});
afterAll(async () => {
  await server.close();
});

const get = (path: string, who: Account) => request(server.app).get(path).set(who.auth);
const post = (path: string, who: Account, body: object) => request(server.app).post(path).set(who.auth).send(body);
const teamA = () => `/api/teams/${headA.teamId}`;

describe('members of the team', () => {
  it('the head coach and a coach see the whole squad', async () => {
    for (const who of [headA, coachA]) {
      const res = await get(`${teamA()}/squad`, who).expect(200);
      expect(res.body.skaters.map((s: Skater) => s.id).sort()).toEqual([skater1.id, skater2.id].sort());
    }
  });

  it('a coach may list the members; the list shows each role and skater link', async () => {
    const res = await get(`${teamA()}/members`, coachA).expect(200);
    const byEmail = Object.fromEntries(res.body.map((m: { email: string }) => [m.email, m]));
    expect(byEmail[headA.email]).toMatchObject({ role: 'head_coach', skaterId: null });
    expect(byEmail[coachA.email]).toMatchObject({ role: 'coach', skaterId: null });
    expect(byEmail[skaterAccount.email]).toMatchObject({ role: 'skater', skaterId: skater1.id });
    expect(byEmail[guardianAccount.email]).toMatchObject({ role: 'guardian', skaterId: skater2.id });
    expect(res.body).toHaveLength(4);
    expect(JSON.stringify(res.body)).not.toMatch(/hash|password/i);
  });

  it('a skater reading the squad sees only their own profile', async () => {
    const res = await get(`${teamA()}/squad`, skaterAccount).expect(200);
    expect(res.body.skaters).toEqual([{ id: skater1.id, displayName: 'Anouk Ribbelink', groupId: null, hasAccount: true, retired: false }]);
  });

  it('a guardian reading the squad sees only their skater', async () => {
    const res = await get(`${teamA()}/squad`, guardianAccount).expect(200);
    expect(res.body.skaters).toEqual([{ id: skater2.id, displayName: 'Berend Schaatsma', groupId: null, hasAccount: false, retired: false }]);
  });

  it('a skater may read their own profile but another skater\'s is 404', async () => {
    expect((await get(`${teamA()}/skaters/${skater1.id}`, skaterAccount).expect(200)).body.id).toBe(skater1.id);
    expectError(await get(`${teamA()}/skaters/${skater2.id}`, skaterAccount), 404, 'not_found');
  });

  it("a guardian may read their skater's profile but not another's (404)", async () => {
    await get(`${teamA()}/skaters/${skater2.id}`, guardianAccount).expect(200);
    expectError(await get(`${teamA()}/skaters/${skater1.id}`, guardianAccount), 404, 'not_found');
  });

  it('a coach reads any profile of the team; an unknown or malformed id is 404', async () => {
    await get(`${teamA()}/skaters/${skater2.id}`, coachA).expect(200);
    expectError(await get(`${teamA()}/skaters/${uuidv7()}`, coachA), 404, 'not_found');
    expectError(await get(`${teamA()}/skaters/not-a-uuid`, coachA), 404, 'not_found');
    // A skater of another team, asked through this team's path, does not exist here.
    expectError(await get(`${teamA()}/skaters/${skaterOfB.id}`, coachA), 404, 'not_found');
  });

  it.each([
    ['skater', () => skaterAccount],
    ['guardian', () => guardianAccount],
  ])('a %s cannot add skaters, invite, or list members or invitations (403)', async (_role, who) => {
    expectError(await post(`${teamA()}/skaters`, who(), { displayName: 'Sneaky Extra' }), 403, 'forbidden');
    expectError(await post(`${teamA()}/invitations`, who(), { email: 'friend@test.example', role: 'coach' }), 403, 'forbidden');
    expectError(await get(`${teamA()}/members`, who()), 403, 'forbidden');
    expectError(await get(`${teamA()}/invitations`, who()), 403, 'forbidden');
  });

  it('a coach cannot add skaters (403: head coach only) and nothing is stored', async () => {
    const res = await post(`${teamA()}/skaters`, coachA, { displayName: 'Not Allowed' });
    expectError(res, 403, 'forbidden');
    expect(res.body.error.message).toMatch(/head coach/);
    const [{ count }] = await server.dataSource.query('SELECT count(*)::int AS count FROM skaters WHERE team_id = $1', [headA.teamId]);
    expect(count).toBe(2);
  });
});

describe('the head coach adding skaters', () => {
  it('keeps a client-made id, and refuses it a second time (409)', async () => {
    const head = await signUpCoach(server.app, 'clientid');
    const id = uuidv7();
    const created = await post(`/api/teams/${head.teamId}/skaters`, head, { id, displayName: 'Evi Grachtzijl' }).expect(201);
    expect(created.body).toEqual({ id, displayName: 'Evi Grachtzijl', groupId: null, hasAccount: false, retired: false });
    expectError(await post(`/api/teams/${head.teamId}/skaters`, head, { id, displayName: 'Evi Again' }), 409, 'conflict');
  });

  it('allows the same client-made id in two teams (ids are per team)', async () => {
    const first = await signUpCoach(server.app, 'idteam1');
    const second = await signUpCoach(server.app, 'idteam2');
    const id = uuidv7();
    await post(`/api/teams/${first.teamId}/skaters`, first, { id, displayName: 'Gijs Poldervaart' }).expect(201);
    await post(`/api/teams/${second.teamId}/skaters`, second, { id, displayName: 'Hidde Poldervaart' }).expect(201);
  });

  it('refuses a group that is not in the team (404)', async () => {
    const head = await signUpCoach(server.app, 'nogroup');
    expectError(await post(`/api/teams/${head.teamId}/skaters`, head, { displayName: 'Ilja Vennegoor', groupId: uuidv7() }), 404, 'not_found');
  });
});

describe('another team', () => {
  it.each([
    ['the squad', () => `${teamA()}/squad`],
    ['the members', () => `${teamA()}/members`],
    ['the invitations', () => `${teamA()}/invitations`],
    ['a skater', () => `${teamA()}/skaters/${skater1.id}`],
  ])('a coach of team B asking for team A\'s %s gets 404', async (_what, path) => {
    const res = await get(path(), coachB);
    expectError(res, 404, 'not_found');
    expect(res.text).not.toContain('Anouk');
    // The head coach of team B too.
    expectError(await get(path(), headB), 404, 'not_found');
  });

  it("team B cannot add skaters to or invite into team A (404) and nothing is stored", async () => {
    expectError(await post(`${teamA()}/skaters`, headB, { displayName: 'Planted Skater' }), 404, 'not_found');
    expectError(await post(`${teamA()}/invitations`, headB, { email: 'plant@test.example', role: 'coach' }), 404, 'not_found');
    const planted = await server.dataSource.query(
      `SELECT 1 FROM skaters WHERE team_id = $1 AND display_name = 'Planted Skater'
       UNION ALL SELECT 1 FROM invitations WHERE team_id = $1 AND email = 'plant@test.example'`,
      [headA.teamId],
    );
    expect(planted).toEqual([]);
  });

  it("a skater of team A gets 404 for team B's squad", async () => {
    expectError(await get(`/api/teams/${headB.teamId}/squad`, skaterAccount), 404, 'not_found');
  });

  it('a team id that does not exist or is not a UUID is 404, never 500', async () => {
    expectError(await get(`/api/teams/${uuidv7()}/squad`, headA), 404, 'not_found');
    expectError(await get('/api/teams/not-a-team/squad', headA), 404, 'not_found');
    expectError(await get("/api/teams/1'%20OR%20'1'='1/squad", headA), 404, 'not_found');
  });

  it('without a token every team route is 401', async () => {
    for (const path of ['squad', 'members', 'invitations', `skaters/${skater1.id}`]) {
      expectError(await request(server.app).get(`${teamA()}/${path}`), 401, 'unauthorized');
    }
    expectError(await request(server.app).post(`${teamA()}/skaters`).send({ displayName: 'Anon' }), 401, 'unauthorized');
  });
});

describe('groups in the squad', () => {
  it('a coach sees every group; a skater only the group of their own profile', async () => {
    const head = await signUpCoach(server.app, 'groups');
    const sprint = uuidv7();
    const distance = uuidv7();
    await server.dataSource.query(
      `INSERT INTO skater_groups (team_id, id, name, sort_order) VALUES ($1, $2, 'Sprint', 1), ($1, $3, 'Distance', 2)`,
      [head.teamId, sprint, distance],
    );
    const fast = await post(`/api/teams/${head.teamId}/skaters`, head, { displayName: 'Jet Snelwater', groupId: sprint }).expect(201);
    await post(`/api/teams/${head.teamId}/skaters`, head, { displayName: 'Kees Langebaan', groupId: distance }).expect(201);
    const jet = await inviteAndAccept(server.app, head, 'skater', { skaterId: fast.body.id, label: 'jet' });

    const all = await get(`/api/teams/${head.teamId}/squad`, head).expect(200);
    expect(all.body.groups.map((g: { name: string }) => g.name)).toEqual(['Sprint', 'Distance']);
    const own = await get(`/api/teams/${head.teamId}/squad`, jet).expect(200);
    expect(own.body.groups).toEqual([{ id: sprint, name: 'Sprint', sortOrder: 1 }]);
    expect(own.body.skaters.map((s: Skater) => s.displayName)).toEqual(['Jet Snelwater']);
  });
});
