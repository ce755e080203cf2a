/**
 * Access tokens that must not work (expired, tampered, wrong audience or issuer, wrong
 * algorithm, `alg: none`, unknown subject) and refresh-token reuse, which revokes the family.
 * Every token made here names the coach's live sign-in (`sid`), so only the flaw under test can
 * be the reason for a refusal.
 */
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { v7 as uuidv7 } from 'uuid';
import { expectError, refreshCookieOf, signUpCoach, startTestServer, type Coach, type TestServer } from './helpers';

let server: TestServer;
let coach: Coach;
const secret = () => process.env.JWT_SECRET!;
const issuer = 'boardside-server';
const audience = 'boardside-app';

beforeAll(async () => {
  server = await startTestServer();
  coach = await signUpCoach(server.app, 'tokens');
});
afterAll(async () => {
  await server.close();
});

const me = (token: string) => request(server.app).get('/api/me').set('Authorization', `Bearer ${token}`);
/** The coach's sign-in, as the server put it in their access token. */
const sid = () => (jwt.decode(coach.session.accessToken) as { sid: string }).sid;
const b64url = (value: object) => Buffer.from(JSON.stringify(value)).toString('base64url');

describe('access tokens', () => {
  it('accepts a token signed like the server signs them (the control case)', async () => {
    const token = jwt.sign({ sid: sid() }, secret(), { algorithm: 'HS256', subject: coach.session.user.id, issuer, audience, expiresIn: 60 });
    const res = await me(token).expect(200);
    expect(res.body.user.id).toBe(coach.session.user.id);
  });

  it('refuses an expired token with 401 and says the session expired', async () => {
    const token = jwt.sign({ sid: sid() }, secret(), { algorithm: 'HS256', subject: coach.session.user.id, issuer, audience, expiresIn: -10 });
    const res = await me(token);
    expectError(res, 401, 'unauthorized');
    expect(res.body.error.message).toMatch(/expired/i);
  });

  it('refuses a token with a tampered signature', async () => {
    const [header, payload, signature] = coach.session.accessToken.split('.');
    // Flip a character in the middle: the last one may carry only padding bits.
    const i = Math.floor(signature.length / 2);
    const flipped = signature.slice(0, i) + (signature[i] === 'A' ? 'B' : 'A') + signature.slice(i + 1);
    expectError(await me(`${header}.${payload}.${flipped}`), 401, 'unauthorized');
  });

  it('refuses a token whose payload was changed to another user', async () => {
    const other = await signUpCoach(server.app, 'victim');
    const [header, payload, signature] = coach.session.accessToken.split('.');
    const claims = JSON.parse(Buffer.from(payload, 'base64url').toString());
    const forged = b64url({ ...claims, sub: other.session.user.id });
    expectError(await me(`${header}.${forged}.${signature}`), 401, 'unauthorized');
  });

  it.each([
    ['the wrong audience', { issuer, audience: 'some-other-app' }],
    ['the wrong issuer', { issuer: 'someone-else', audience }],
    ['no audience', { issuer }],
    ['no issuer', { audience }],
  ])('refuses a token with %s', async (_label, claims) => {
    const token = jwt.sign({ sid: sid() }, secret(), { algorithm: 'HS256', subject: coach.session.user.id, expiresIn: 60, ...claims });
    expectError(await me(token), 401, 'unauthorized');
  });

  it('refuses a token signed with another secret', async () => {
    const token = jwt.sign({ sid: sid() }, 'a-different-secret-that-is-also-long-enough', {
      algorithm: 'HS256', subject: coach.session.user.id, issuer, audience, expiresIn: 60,
    });
    expectError(await me(token), 401, 'unauthorized');
  });

  it('refuses HS512 even with the right secret (the algorithm is pinned)', async () => {
    const token = jwt.sign({ sid: sid() }, secret(), { algorithm: 'HS512', subject: coach.session.user.id, issuer, audience, expiresIn: 60 });
    expectError(await me(token), 401, 'unauthorized');
  });

  it.each(['none', 'None', 'NONE'])('refuses an unsigned token with alg: %s', async (alg) => {
    const now = Math.floor(Date.now() / 1000);
    const header = b64url({ alg, typ: 'JWT' });
    const payload = b64url({ sub: coach.session.user.id, sid: sid(), iss: issuer, aud: audience, iat: now, exp: now + 600 });
    expectError(await me(`${header}.${payload}.`), 401, 'unauthorized');
  });

  it('refuses a token without a subject', async () => {
    const token = jwt.sign({ sid: sid() }, secret(), { algorithm: 'HS256', issuer, audience, expiresIn: 60 });
    expectError(await me(token), 401, 'unauthorized');
  });

  it('refuses a well-signed token for a user that does not exist', async () => {
    const token = jwt.sign({ sid: sid() }, secret(), { algorithm: 'HS256', subject: uuidv7(), issuer, audience, expiresIn: 60 });
    expectError(await me(token), 401, 'unauthorized');
  });

  it('refuses a token that is not valid yet (nbf in the future)', async () => {
    const token = jwt.sign({ sid: sid() }, secret(), {
      algorithm: 'HS256', subject: coach.session.user.id, issuer, audience, expiresIn: 600, notBefore: 300,
    });
    expectError(await me(token), 401, 'unauthorized');
  });

  it('refuses an expired token on team routes too', async () => {
    const token = jwt.sign({ sid: sid() }, secret(), { algorithm: 'HS256', subject: coach.session.user.id, issuer, audience, expiresIn: -10 });
    expectError(
      await request(server.app).get(`/api/teams/${coach.teamId}/squad`).set('Authorization', `Bearer ${token}`),
      401,
      'unauthorized',
    );
  });
});

describe('refresh-token reuse', () => {
  it('refuses a used refresh token and then revokes the whole family, including the newer token', async () => {
    const user = await signUpCoach(server.app, 'reuse');
    const rotated = await request(server.app).post('/api/auth/refresh').set('Cookie', user.cookie).expect(200);
    const newer = refreshCookieOf(rotated);

    // Someone replays the old cookie (e.g. a stolen copy): refused.
    expectError(await request(server.app).post('/api/auth/refresh').set('Cookie', user.cookie), 401, 'unauthorized');
    // ...and the legitimate newer token dies with its family.
    expectError(await request(server.app).post('/api/auth/refresh').set('Cookie', newer), 401, 'unauthorized');

    const rows = await server.dataSource.query(
      'SELECT count(*)::int AS total, count(revoked_at)::int AS revoked FROM refresh_tokens WHERE user_id = $1',
      [user.session.user.id],
    );
    expect(rows[0].total).toBe(2);
    expect(rows[0].revoked).toBe(2);
  });

  it('does not touch other sign-ins (other families) of the same user', async () => {
    const user = await signUpCoach(server.app, 'family');
    const laptop = refreshCookieOf(
      await request(server.app).post('/api/auth/sign-in').send({ email: user.email, password: 'rink-side-pass-1' }).expect(200),
    );
    await request(server.app).post('/api/auth/refresh').set('Cookie', user.cookie).expect(200);
    await request(server.app).post('/api/auth/refresh').set('Cookie', user.cookie).expect(401);
    await request(server.app).post('/api/auth/refresh').set('Cookie', laptop).expect(200);
  });

  it('lets only one of two simultaneous refreshes with one cookie succeed', async () => {
    const user = await signUpCoach(server.app, 'concurrent');
    const results = await Promise.all([
      request(server.app).post('/api/auth/refresh').set('Cookie', user.cookie),
      request(server.app).post('/api/auth/refresh').set('Cookie', user.cookie),
    ]);
    expect(results.map((r) => r.status).sort()).toEqual([200, 401]);
  });
});
