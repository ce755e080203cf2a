/**
 * Sign-up, sign-in, the refresh cookie's rotation and attributes, sign-out and GET /api/me,
 * against the real PostgreSQL.
 */
import request from 'supertest';
import type { Session } from '../../shared/schemas';
import {
  expectError,
  PASSWORD,
  refreshCookieOf,
  setCookieHeaders,
  signIn,
  signUpCoach,
  startTestServer,
  uniqueEmail,
  type TestServer,
} from './helpers';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

describe('sign-up', () => {
  it('creates the user, a new team and a head_coach membership, and returns a session', async () => {
    const email = uniqueEmail('signup');
    const res = await request(server.app)
      .post('/api/auth/sign-up')
      .send({ email, password: PASSWORD, displayName: 'Maren Oudvlier', teamName: 'Ice Hollow Club' })
      .expect(201);
    const session = res.body as Session;
    expect(session.user).toMatchObject({ email, displayName: 'Maren Oudvlier' });
    expect(session.accessToken).toMatch(/^[\w-]+\.[\w-]+\.[\w-]+$/);
    expect(session.expiresIn).toBeGreaterThan(0);
    expect(session.memberships).toEqual([
      { teamId: expect.any(String), teamName: 'Ice Hollow Club', role: 'head_coach', skaterId: null },
    ]);
    expect(res.headers['cache-control']).toBe('no-store');
    expect(JSON.stringify(res.body)).not.toMatch(/password|hash/i);

    const [team] = await server.dataSource.query('SELECT name FROM teams WHERE id = $1', [session.memberships[0].teamId]);
    expect(team.name).toBe('Ice Hollow Club');
    const members = await server.dataSource.query('SELECT user_id, role FROM memberships WHERE team_id = $1', [
      session.memberships[0].teamId,
    ]);
    expect(members).toEqual([{ user_id: session.user.id, role: 'head_coach' }]);
  });

  it('stores the e-mail lower-cased and trimmed', async () => {
    const email = uniqueEmail('mixedcase');
    const res = await request(server.app)
      .post('/api/auth/sign-up')
      .send({ email: `  ${email.toUpperCase()} `, password: PASSWORD, displayName: 'Tjalle Brink', teamName: 'North Oval' })
      .expect(201);
    expect(res.body.user.email).toBe(email);
    await signIn(server.app, email.toUpperCase()).expect(200);
  });

  it('refuses a second account with the same e-mail (any case) with 409 naming the field', async () => {
    const coach = await signUpCoach(server.app, 'dup');
    const res = await request(server.app)
      .post('/api/auth/sign-up')
      .send({ email: coach.email.toUpperCase(), password: 'another-pass-9', displayName: 'Someone Else', teamName: 'Copy Club' })
      .expect(409);
    expectError(res, 409, 'conflict');
    expect(res.body.error.fields).toHaveProperty('email');
    const [{ count }] = await server.dataSource.query('SELECT count(*)::int AS count FROM users WHERE email = $1', [coach.email]);
    expect(count).toBe(1);
  });

  it('lets exactly one of two simultaneous sign-ups with one e-mail through; the other gets 409, not 500', async () => {
    const email = uniqueEmail('race');
    const body = { email, password: PASSWORD, displayName: 'Quick Twin', teamName: 'Twin Rink' };
    const results = await Promise.all([
      request(server.app).post('/api/auth/sign-up').send(body),
      request(server.app).post('/api/auth/sign-up').send(body),
    ]);
    expect(results.map((r) => r.status).sort()).toEqual([201, 409]);
    const [{ count }] = await server.dataSource.query('SELECT count(*)::int AS count FROM teams t JOIN memberships m ON m.team_id = t.id JOIN users u ON u.id = m.user_id WHERE u.email = $1', [email]);
    expect(count).toBe(1);
  });
});

describe('sign-in', () => {
  it('accepts the right password and returns a session with the memberships', async () => {
    const coach = await signUpCoach(server.app, 'signin');
    const res = await signIn(server.app, coach.email).expect(200);
    expect(res.body.user.id).toBe(coach.session.user.id);
    expect(res.body.memberships).toEqual(coach.session.memberships);
    expect(refreshCookieOf(res)).not.toBe(coach.cookie);
  });

  it('refuses a wrong password with 401', async () => {
    const coach = await signUpCoach(server.app, 'wrongpw');
    const res = await signIn(server.app, coach.email, 'not-the-password');
    expectError(res, 401, 'unauthorized');
    expect(setCookieHeaders(res).some((c) => c.startsWith('boardside_refresh='))).toBe(false);
  });

  it('answers an unknown e-mail with the same 401 and message as a wrong password', async () => {
    const coach = await signUpCoach(server.app, 'known');
    const wrong = await signIn(server.app, coach.email, 'not-the-password');
    const unknown = await signIn(server.app, uniqueEmail('nobody'), 'not-the-password');
    expectError(unknown, 401, 'unauthorized');
    expect(unknown.body).toEqual(wrong.body);
  });
});

describe('refresh cookie', () => {
  it('is HttpOnly, SameSite=Strict, scoped to /api/auth and lasts the refresh lifetime', async () => {
    const res = await request(server.app)
      .post('/api/auth/sign-up')
      .send({ email: uniqueEmail('cookie'), password: PASSWORD, displayName: 'Lotte Vaarkamp', teamName: 'Cookie Club' })
      .expect(201);
    const cookie = setCookieHeaders(res).find((c) => c.startsWith('boardside_refresh='))!;
    const attributes = cookie.split(';').map((part) => part.trim().toLowerCase());
    expect(attributes).toContain('httponly');
    expect(attributes).toContain('samesite=strict');
    expect(attributes).toContain('path=/api/auth');
    // PUBLIC_URL is http:// in the tests, so the cookie must not be Secure-only (else the web app could not use it).
    expect(attributes).not.toContain('secure');
    const expires = attributes.find((a) => a.startsWith('expires='));
    expect(expires).toBeDefined();
    const days = (Date.parse(expires!.slice('expires='.length)) - Date.now()) / 86_400_000;
    expect(days).toBeGreaterThan(29);
    expect(days).toBeLessThanOrEqual(30);
    // The refresh token never appears in the body.
    expect(JSON.stringify(res.body)).not.toContain(cookie.split(';')[0].split('=')[1]);
  });

  it('rotates: every refresh sets a new cookie and a new access token that works', async () => {
    const coach = await signUpCoach(server.app, 'rotate');
    const first = await request(server.app).post('/api/auth/refresh').set('Cookie', coach.cookie).expect(200);
    const firstCookie = refreshCookieOf(first);
    expect(firstCookie).not.toBe(coach.cookie);
    expect(first.body.user.id).toBe(coach.session.user.id);
    expect(first.headers['cache-control']).toBe('no-store');

    const second = await request(server.app).post('/api/auth/refresh').set('Cookie', firstCookie).expect(200);
    const secondCookie = refreshCookieOf(second);
    expect(new Set([coach.cookie, firstCookie, secondCookie]).size).toBe(3);

    await request(server.app).get('/api/me').set('Authorization', `Bearer ${second.body.accessToken}`).expect(200);
  });

  it('refuses a refresh without a cookie or with an unknown one (401) and clears the cookie', async () => {
    expectError(await request(server.app).post('/api/auth/refresh'), 401, 'unauthorized');
    const res = await request(server.app).post('/api/auth/refresh').set('Cookie', 'boardside_refresh=made-up-value');
    expectError(res, 401, 'unauthorized');
    const cleared = setCookieHeaders(res).find((c) => c.startsWith('boardside_refresh='));
    expect(cleared).toMatch(/^boardside_refresh=;/);
    expect(cleared).toMatch(/Path=\/api\/auth/);
    expect(cleared).toMatch(/Expires=Thu, 01 Jan 1970/);
  });

  it('refuses a refresh token past its expiry', async () => {
    const coach = await signUpCoach(server.app, 'expiredrefresh');
    await server.dataSource.query(`UPDATE refresh_tokens SET expires_at = now() - interval '1 minute' WHERE user_id = $1`, [
      coach.session.user.id,
    ]);
    expectError(await request(server.app).post('/api/auth/refresh').set('Cookie', coach.cookie), 401, 'unauthorized');
  });
});

describe('sign-out', () => {
  it('answers 204, clears the cookie, and the refresh token no longer works', async () => {
    const coach = await signUpCoach(server.app, 'signout');
    const res = await request(server.app).post('/api/auth/sign-out').set('Cookie', coach.cookie).expect(204);
    expect(setCookieHeaders(res).find((c) => c.startsWith('boardside_refresh='))).toMatch(/^boardside_refresh=;.*Path=\/api\/auth/);
    expectError(await request(server.app).post('/api/auth/refresh').set('Cookie', coach.cookie), 401, 'unauthorized');
  });

  it('ends only that sign-in: a second device of the same user can still refresh', async () => {
    const coach = await signUpCoach(server.app, 'twodevices');
    const other = await signIn(server.app, coach.email).expect(200);
    await request(server.app).post('/api/auth/sign-out').set('Cookie', coach.cookie).expect(204);
    await request(server.app).post('/api/auth/refresh').set('Cookie', refreshCookieOf(other)).expect(200);
  });

  it('answers 204 without a cookie too', async () => {
    await request(server.app).post('/api/auth/sign-out').expect(204);
  });
});

describe('GET /api/me', () => {
  it('returns the user and memberships for a valid access token', async () => {
    const coach = await signUpCoach(server.app, 'me');
    const res = await request(server.app).get('/api/me').set(coach.auth).expect(200);
    expect(res.body).toEqual({
      user: { id: coach.session.user.id, email: coach.email, displayName: 'Coach me' },
      memberships: coach.session.memberships,
    });
  });

  it.each([
    ['no header', undefined],
    ['an empty bearer', 'Bearer '],
    ['another scheme', 'Basic Ym9hcmQ6c2lkZQ=='],
    ['garbage', 'Bearer not.a.jwt'],
  ])('refuses %s with 401', async (_label, header) => {
    const req = request(server.app).get('/api/me');
    if (header !== undefined) req.set('Authorization', header);
    expectError(await req, 401, 'unauthorized');
  });

  it('refuses a valid token whose account was deleted (401)', async () => {
    const coach = await signUpCoach(server.app, 'deleted');
    const teamId = coach.teamId;
    await server.dataSource.query('DELETE FROM users WHERE id = $1', [coach.session.user.id]);
    await server.dataSource.query('DELETE FROM teams WHERE id = $1', [teamId]);
    expectError(await request(server.app).get('/api/me').set(coach.auth), 401, 'unauthorized');
  });
});
