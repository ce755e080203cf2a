/**
 * Sign-in rate limits with low limits for this file: per (account, client address) pair (failed
 * sign-ins against one e-mail from one address) and per client address. The app is told to trust
 * X-Forwarded-For from loopback (where supertest connects from), which lets the tests speak from
 * several addresses.
 */
import request from 'supertest';
import { expectError, PASSWORD, signUpCoach, startTestServer, uniqueEmail, type Coach, type TestServer } from './helpers';

// Read lazily by the app: these must be set before startTestServer().
process.env.TRUST_PROXY = 'loopback';
process.env.LOGIN_LIMIT_PER_ACCOUNT = '3';
process.env.LOGIN_LIMIT_PER_IP = '5';
process.env.LOGIN_LIMIT_WINDOW_SECONDS = '600';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

// signUpCoach() speaks from loopback itself: keep this file's sign-ups (4) under the limit of 5.
let lastOctet = 0;
/** A fresh documentation-range address per call, so the per-address limit stays out of the way. */
const freshIp = () => `198.51.100.${++lastOctet}`;

const signInFrom = (ip: string, email: string, password: string) =>
  request(server.app).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email, password });

describe('per (account, address) limit', () => {
  let victim: Coach;
  beforeAll(async () => {
    victim = await signUpCoach(server.app, 'victim');
  });

  it('after 3 failed sign-ins for one account from one address, that address gets 429 for it, even with the right password', async () => {
    const stranger = freshIp();
    for (let i = 0; i < 3; i++) {
      // Vary the case: the limit counts the account, not the spelling.
      const email = i % 2 ? victim.email.toUpperCase() : victim.email;
      expectError(await signInFrom(stranger, email, 'guessed-wrong'), 401, 'unauthorized');
    }
    const blocked = await signInFrom(stranger, victim.email, 'guessed-wrong');
    expectError(blocked, 429, 'rate_limited');
    expect(blocked.body.error.message).toMatch(/this account from this address/);
    expect(blocked.headers['ratelimit']).toBeDefined();

    const rightPassword = await signInFrom(stranger, victim.email, PASSWORD);
    expectError(rightPassword, 429, 'rate_limited');
    expect(rightPassword.headers['set-cookie']).toBeUndefined();
  });

  it('the coach still signs in from another address: a stranger cannot lock them out', async () => {
    await signInFrom(freshIp(), victim.email, PASSWORD).expect(200);
  });

  it('failed sign-ins spread over many addresses do not lock the account', async () => {
    const target = await signUpCoach(server.app, 'target');
    for (let i = 0; i < 6; i++) expectError(await signInFrom(freshIp(), target.email, 'guessed-wrong'), 401, 'unauthorized');
    await signInFrom(freshIp(), target.email, PASSWORD).expect(200);
  });

  it('successful sign-ins do not count toward the limit', async () => {
    const regular = await signUpCoach(server.app, 'regular');
    const home = freshIp();
    for (let i = 0; i < 3; i++) await signInFrom(home, regular.email, PASSWORD).expect(200);
    expectError(await signInFrom(home, regular.email, 'one-typo'), 401, 'unauthorized');
    expectError(await signInFrom(home, regular.email, 'two-typos'), 401, 'unauthorized');
  });
});

describe('per-address limit', () => {
  it('after 5 attempts from one address the 6th is 429, while another address still gets 401', async () => {
    const ip = '203.0.113.7';
    for (let i = 0; i < 5; i++) {
      // A different unknown account each time, so only the address limit can trigger.
      expectError(await signInFrom(ip, uniqueEmail('spray'), 'guessed-wrong'), 401, 'unauthorized');
    }
    const blocked = await signInFrom(ip, uniqueEmail('spray'), 'guessed-wrong');
    expectError(blocked, 429, 'rate_limited');
    expect(blocked.body.error.message).toMatch(/this address/);

    expectError(await signInFrom('203.0.113.8', uniqueEmail('other'), 'guessed-wrong'), 401, 'unauthorized');
  });

  it('the address limit covers sign-up and password reset too', async () => {
    const ip = '203.0.113.20';
    for (let i = 0; i < 5; i++) {
      await request(server.app).post('/api/auth/password-reset').set('X-Forwarded-For', ip).send({ email: uniqueEmail('r') }).expect(202);
    }
    expectError(
      await request(server.app)
        .post('/api/auth/sign-up')
        .set('X-Forwarded-For', ip)
        .send({ email: uniqueEmail('late'), password: PASSWORD, displayName: 'Late Comer', teamName: 'Late Club' }),
      429,
      'rate_limited',
    );
    expectError(
      await request(server.app).post('/api/auth/password-reset').set('X-Forwarded-For', ip).send({ email: uniqueEmail('r') }),
      429,
      'rate_limited',
    );
  });

  it('invitation links are limited per address too (guessing tokens)', async () => {
    const ip = '203.0.113.30';
    for (let i = 0; i < 5; i++) {
      expectError(await request(server.app).get(`/api/invitations/${'G'.repeat(40)}${i}`).set('X-Forwarded-For', ip), 404, 'invalid_link');
    }
    expectError(await request(server.app).get(`/api/invitations/${'G'.repeat(43)}`).set('X-Forwarded-For', ip), 429, 'rate_limited');
    expectError(await request(server.app).get(`/api/invitations/${'G'.repeat(43)}`).set('X-Forwarded-For', '203.0.113.31'), 404);
  });

  it('refreshing a session is not limited by the sign-in limits', async () => {
    const coach = await signUpCoach(server.app, 'refresher');
    let cookie = coach.cookie;
    for (let i = 0; i < 8; i++) {
      const res = await request(server.app).post('/api/auth/refresh').set('X-Forwarded-For', '203.0.113.40').set('Cookie', cookie).expect(200);
      cookie = (res.headers['set-cookie'] as unknown as string[])[0].split(';')[0];
    }
  });
});
