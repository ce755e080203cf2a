/**
 * Invitations end to end: the head coach invites a coach, a skater or a guardian, the mail goes
 * through the real SMTP sink, the invitee previews and accepts the link, and the membership
 * appears with the right role and skater link.
 */
import request from 'supertest';
import { v7 as uuidv7 } from 'uuid';
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
  type Coach,
  type TestServer,
} from './helpers';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

const invite = (coach: Coach, body: Record<string, unknown>) =>
  request(server.app).post(`/api/teams/${coach.teamId}/invitations`).set(coach.auth).send(body);
const preview = (token: string) => request(server.app).get(`/api/invitations/${token}`);
const accept = (token: string, displayName = 'Rina Kolderveld', password = PASSWORD) =>
  request(server.app).post('/api/invitations/accept').send({ token, displayName, password });

/** Invites `email` and returns the token from the invitation mail (not a cc of someone else's). */
async function inviteAndRead(coach: Coach, body: { email: string; role: string; skaterId?: string }) {
  const res = await invite(coach, body).expect(201);
  const mail = await waitForMail(body.email, { where: (m) => addressesOf(m, 'to').includes(body.email) });
  return { invitation: res.body, mail, token: linkToken(mail) };
}

describe('inviting a coach', () => {
  it('mails a link; preview shows the invitation; accepting creates the account and a coach membership', async () => {
    const head = await signUpCoach(server.app, 'head');
    const email = uniqueEmail('assistant');
    const { invitation, mail, token } = await inviteAndRead(head, { email, role: 'coach' });

    expect(invitation).toMatchObject({ email, role: 'coach', skaterId: null, acceptedAt: null });
    expect(Date.parse(invitation.expiresAt) - Date.now()).toBeGreaterThan(13 * 86_400_000);
    expect(mail.subject).toBe('Coach head invites you to Team head on Boardside');
    expect(mail.text).toContain(`${process.env.PUBLIC_URL}/accept-invite?token=${token}`);
    expect(addressesOf(mail, 'cc')).toEqual([]);

    const shown = await preview(token).expect(200);
    expect(shown.body).toEqual({
      teamName: 'Team head',
      role: 'coach',
      email,
      skaterName: null,
      invitedBy: 'Coach head',
      existingAccount: false,
    });
    expect(shown.headers['cache-control']).toBe('no-store');

    const accepted = await accept(token, 'Rina Kolderveld').expect(200);
    expect(accepted.body.user).toMatchObject({ email, displayName: 'Rina Kolderveld' });
    expect(accepted.body.memberships).toEqual([{ teamId: head.teamId, teamName: 'Team head', role: 'coach', skaterId: null }]);

    const members = await request(server.app).get(`/api/teams/${head.teamId}/members`).set(head.auth).expect(200);
    expect(members.body.map((m: { email: string; role: string }) => [m.email, m.role]).sort()).toEqual(
      [[head.email, 'head_coach'], [email, 'coach']].sort(),
    );
    await signIn(server.app, email).expect(200);

    const listed = await request(server.app).get(`/api/teams/${head.teamId}/invitations`).set(head.auth).expect(200);
    expect(listed.body).toHaveLength(1);
    expect(listed.body[0]).toMatchObject({ id: invitation.id, acceptedAt: expect.any(String) });
    expect(JSON.stringify(listed.body)).not.toMatch(/token/i);
  });

  it('an accepted link cannot be previewed or used again (404)', async () => {
    const head = await signUpCoach(server.app, 'reuse');
    const { token } = await inviteAndRead(head, { email: uniqueEmail('once'), role: 'coach' });
    await accept(token).expect(200);
    expectError(await preview(token), 404, 'invalid_link');
    expectError(await accept(token, 'Second Try'), 404, 'invalid_link');
  });

  it('an expired link is 404 for preview and accept, and creates no account', async () => {
    const head = await signUpCoach(server.app, 'expiry');
    const email = uniqueEmail('late');
    const { invitation, token } = await inviteAndRead(head, { email, role: 'coach' });
    await server.dataSource.query(`UPDATE invitations SET expires_at = now() - interval '1 second' WHERE team_id = $1 AND id = $2`, [
      head.teamId,
      invitation.id,
    ]);
    expectError(await preview(token), 404, 'invalid_link');
    expectError(await accept(token), 404, 'invalid_link');
    const [{ count }] = await server.dataSource.query('SELECT count(*)::int AS count FROM users WHERE email = $1', [email]);
    expect(count).toBe(0);
  });

  it('a new account needs a name (400 naming displayName) and the link stays usable', async () => {
    const head = await signUpCoach(server.app, 'noname');
    const { token } = await inviteAndRead(head, { email: uniqueEmail('noname-coach'), role: 'coach' });
    const res = await request(server.app).post('/api/invitations/accept').send({ token, password: PASSWORD });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toEqual({ displayName: 'Name is required' });
    await request(server.app).get(`/api/invitations/${token}`).expect(200);
  });

  it('an unknown token of the right shape is 404; a malformed one is 400', async () => {
    expectError(await preview('Z'.repeat(43)), 404, 'invalid_link');
    expectError(await preview('bad.token'), 400, 'validation');
    expectError(await accept('Z'.repeat(43)), 404, 'invalid_link');
  });

  it('a newer invitation for the same person and role replaces the pending one', async () => {
    const head = await signUpCoach(server.app, 'resend');
    const email = uniqueEmail('resent');
    const first = await inviteAndRead(head, { email, role: 'coach' });
    const second = await inviteAndRead(head, { email, role: 'coach' });
    expect(second.token).not.toBe(first.token);
    expectError(await preview(first.token), 404, 'invalid_link');
    await accept(second.token).expect(200);
  });

  it('lets exactly one of two simultaneous accepts of one link through', async () => {
    const head = await signUpCoach(server.app, 'double');
    const email = uniqueEmail('doubleclick');
    const { token } = await inviteAndRead(head, { email, role: 'coach' });
    const results = await Promise.all([accept(token), accept(token)]);
    expect(results.map((r) => r.status).sort()).toEqual([200, 404]);
    const [{ count }] = await server.dataSource.query(
      'SELECT count(*)::int AS count FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1',
      [email],
    );
    expect(count).toBe(1);
  });

  it('an existing account joins with its current password; a wrong one is 401 and leaves the link usable', async () => {
    const head = await signUpCoach(server.app, 'teamA');
    const other = await signUpCoach(server.app, 'teamB');
    const { token } = await inviteAndRead(head, { email: other.email, role: 'coach' });

    expect((await preview(token).expect(200)).body.existingAccount).toBe(true);
    expectError(await accept(token, 'Whoever', 'not-their-password'), 401, 'unauthorized');

    const joined = await accept(token, 'Ignored Name', PASSWORD).expect(200);
    expect(joined.body.user).toMatchObject({ id: other.session.user.id, displayName: 'Coach teamB' });
    expect(joined.body.memberships.map((m: { teamId: string; role: string }) => [m.teamId, m.role])).toEqual([
      [other.teamId, 'head_coach'],
      [head.teamId, 'coach'],
    ]);
  });

  it('refuses to invite someone who is already a member (409)', async () => {
    const head = await signUpCoach(server.app, 'member');
    const coach = await inviteAndAccept(server.app, head, 'coach');
    const res = await invite(head, { email: coach.email, role: 'coach' });
    expectError(res, 409, 'conflict');
    expect(res.body.error.fields).toHaveProperty('email');
    expectError(await invite(head, { email: head.email.toUpperCase(), role: 'coach' }), 409, 'conflict');
  });

  it('refuses a coach invitation that names a skater profile (400), not a server error', async () => {
    const head = await signUpCoach(server.app, 'coachskater');
    const skater = await addSkater(server.app, head, 'Noor Hazelaar');
    const res = await invite(head, { email: uniqueEmail('confused'), role: 'coach', skaterId: skater.id });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields).toHaveProperty('skaterId');
  });
});

describe('inviting a skater', () => {
  it('links the skater profile to the new account and gives a skater membership', async () => {
    const head = await signUpCoach(server.app, 'skaterinv');
    const profile = await addSkater(server.app, head, 'Fenna Ijsselmoer');
    expect(profile.hasAccount).toBe(false);
    const email = uniqueEmail('fenna');
    const { invitation, mail, token } = await inviteAndRead(head, { email, role: 'skater', skaterId: profile.id });
    expect(invitation).toMatchObject({ role: 'skater', skaterId: profile.id });
    expect(mail.text).toContain('as Fenna Ijsselmoer');

    expect((await preview(token).expect(200)).body).toMatchObject({ role: 'skater', skaterName: 'Fenna Ijsselmoer' });
    const accepted = await accept(token, 'Fenna').expect(200);
    expect(accepted.body.memberships).toEqual([
      { teamId: head.teamId, teamName: 'Team skaterinv', role: 'skater', skaterId: profile.id },
    ]);

    const [row] = await server.dataSource.query('SELECT user_id FROM skaters WHERE team_id = $1 AND id = $2', [head.teamId, profile.id]);
    expect(row.user_id).toBe(accepted.body.user.id);
    const squad = await request(server.app).get(`/api/teams/${head.teamId}/squad`).set(head.auth).expect(200);
    expect(squad.body.skaters).toEqual([{ id: profile.id, displayName: 'Fenna Ijsselmoer', groupId: null, hasAccount: true, retired: false }]);
  });

  it('refuses a second skater invitation for a profile that already has an account (409)', async () => {
    const head = await signUpCoach(server.app, 'linked');
    const profile = await addSkater(server.app, head, 'Jorrit Wieldam');
    await inviteAndAccept(server.app, head, 'skater', { skaterId: profile.id });
    const res = await invite(head, { email: uniqueEmail('impostor'), role: 'skater', skaterId: profile.id });
    expectError(res, 409, 'conflict');
    expect(res.body.error.fields).toHaveProperty('skaterId');
  });

  it('of two pending skater invitations for one profile, the second accept is refused (409)', async () => {
    const head = await signUpCoach(server.app, 'twopending');
    const profile = await addSkater(server.app, head, 'Sieta Moerkerk');
    const first = await inviteAndRead(head, { email: uniqueEmail('sieta1'), role: 'skater', skaterId: profile.id });
    const second = await inviteAndRead(head, { email: uniqueEmail('sieta2'), role: 'skater', skaterId: profile.id });
    await accept(first.token).expect(200);
    expectError(await accept(second.token), 409, 'conflict');
    // The refused accept rolled back: the second link was not used up.
    await preview(second.token).expect(200);
  });

  it('needs a skater profile of the inviting team: missing is 400, another team\'s is 404', async () => {
    const head = await signUpCoach(server.app, 'ownteam');
    const other = await signUpCoach(server.app, 'otherteam');
    const foreign = await addSkater(server.app, other, 'Bauke Slikveld');

    const missing = await invite(head, { email: uniqueEmail('noprofile'), role: 'skater' });
    expectError(missing, 400, 'validation');
    expect(missing.body.error.fields).toHaveProperty('skaterId');

    const email = uniqueEmail('foreign');
    expectError(await invite(head, { email, role: 'skater', skaterId: foreign.id }), 404, 'not_found');
    expectError(await invite(head, { email, role: 'guardian', skaterId: foreign.id }), 404, 'not_found');
    expectError(await invite(head, { email, role: 'skater', skaterId: uuidv7() }), 404, 'not_found');
    const [{ count }] = await server.dataSource.query('SELECT count(*)::int AS count FROM invitations WHERE email = $1', [email]);
    expect(count).toBe(0);
  });

  it("sends a skater's invitation in copy to the skater's guardian", async () => {
    const head = await signUpCoach(server.app, 'safeguard');
    const profile = await addSkater(server.app, head, 'Lieke Dwarsvaart');
    const guardian = await inviteAndAccept(server.app, head, 'guardian', { skaterId: profile.id, label: 'parent' });
    const bystander = await addSkater(server.app, head, 'Otto Ringsloot');
    const otherGuardian = await inviteAndAccept(server.app, head, 'guardian', { skaterId: bystander.id, label: 'otherparent' });

    const email = uniqueEmail('lieke');
    await invite(head, { email, role: 'skater', skaterId: profile.id }).expect(201);
    const mail = await waitForMail(email);
    expect(addressesOf(mail, 'to')).toEqual([email]);
    expect(addressesOf(mail, 'cc')).toEqual([guardian.email]);
    expect(addressesOf(mail, 'cc')).not.toContain(otherGuardian.email);
    // The guardian's copy is the same message with the same link.
    const copy = await waitForMail(guardian.email, { where: (m) => addressesOf(m, 'to').includes(email) });
    expect(linkToken(copy)).toBe(linkToken(mail));
  });

  it('sends a skater invitation without copy when the skater has no guardian', async () => {
    const head = await signUpCoach(server.app, 'nocc');
    const profile = await addSkater(server.app, head, 'Daan Veenwijk');
    const { mail } = await inviteAndRead(head, { email: uniqueEmail('daan'), role: 'skater', skaterId: profile.id });
    expect(addressesOf(mail, 'cc')).toEqual([]);
  });
});

describe('inviting a guardian', () => {
  it('gives a guardian membership linked to the skater, without linking the profile to the guardian', async () => {
    const head = await signUpCoach(server.app, 'guardianinv');
    const profile = await addSkater(server.app, head, 'Mats Kruisdijk');
    const email = uniqueEmail('guardian');
    const { mail, token } = await inviteAndRead(head, { email, role: 'guardian', skaterId: profile.id });
    expect(mail.text).toContain('as the guardian of Mats Kruisdijk');
    expect((await preview(token).expect(200)).body).toMatchObject({ role: 'guardian', skaterName: 'Mats Kruisdijk' });

    const accepted = await accept(token, 'Hanna Kruisdijk').expect(200);
    expect(accepted.body.memberships).toEqual([
      { teamId: head.teamId, teamName: 'Team guardianinv', role: 'guardian', skaterId: profile.id },
    ]);
    const [row] = await server.dataSource.query('SELECT user_id FROM skaters WHERE team_id = $1 AND id = $2', [head.teamId, profile.id]);
    expect(row.user_id).toBeNull();

    const squad = await request(server.app)
      .get(`/api/teams/${head.teamId}/squad`)
      .set('Authorization', `Bearer ${accepted.body.accessToken}`)
      .expect(200);
    expect(squad.body.skaters.map((s: { id: string }) => s.id)).toEqual([profile.id]);
  });
});

describe('who may invite', () => {
  it('a coach who is not the head coach gets 403 and nothing is sent', async () => {
    const head = await signUpCoach(server.app, 'boss');
    const coach = await inviteAndAccept(server.app, head, 'coach');
    const email = uniqueEmail('notsent');
    const res = await request(server.app)
      .post(`/api/teams/${head.teamId}/invitations`)
      .set(coach.auth)
      .send({ email, role: 'coach' });
    expectError(res, 403, 'forbidden');
    const [{ count }] = await server.dataSource.query('SELECT count(*)::int AS count FROM invitations WHERE email = $1', [email]);
    expect(count).toBe(0);
    expectError(await request(server.app).get(`/api/teams/${head.teamId}/invitations`).set(coach.auth), 403, 'forbidden');
  });

  it('a head coach of another team gets 404', async () => {
    const head = await signUpCoach(server.app, 'owner');
    const stranger = await signUpCoach(server.app, 'stranger');
    const res = await request(server.app)
      .post(`/api/teams/${head.teamId}/invitations`)
      .set(stranger.auth)
      .send({ email: uniqueEmail('sneaky'), role: 'coach' });
    expectError(res, 404, 'not_found');
  });

  it('without a token: 401', async () => {
    const head = await signUpCoach(server.app, 'anon');
    expectError(
      await request(server.app).post(`/api/teams/${head.teamId}/invitations`).send({ email: uniqueEmail('x'), role: 'coach' }),
      401,
      'unauthorized',
    );
  });
});
