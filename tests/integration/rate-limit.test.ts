/**
 * Sign-in rate limits with low limits for this file: per account (failed sign-ins against one
 * e-mail, from any address) and per client address. The app trusts X-Forwarded-For from loopback
 * (where supertest connects from), which lets the tests speak from several addresses.
 */
import request from 'supertest';
import { expectError, PASSWORD, signUpCoach, startTestServer, uniqueEmail, type Coach, type TestServer } from './helpers';

// Read lazily by the app: these must be set before startTestServer().
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

describe('per-account limit', () => {
  let victim: Coach;
  let bystander: Coach;
  beforeAll(async () => {
    victim = await signUpCoach(server.app, 'victim');
    bystander = await signUpCoach(server.app, 'bystander');
  });

  it('after 3 failed sign-ins for one account (from different addresses) the 4th is 429, even with the right password', async () => {
    for (let i = 0; i < 3; i++) {
      // Vary the case: the limit counts the account, not the spelling.
      const email = i % 2 ? victim.email.toUpperCase() : victim.email;
      expectError(await signInFrom(freshIp(), email, 'guessed-wrong'), 401, 'unauthorized');
    }
    const blocked = await signInFrom(freshIp(), victim.email, 'guessed-wrong');
    expectError(blocked, 429, 'rate_limited');
    expect(blocked.body.error.message).toMatch(/this account/);
    expect(blocked.headers['ratelimit']).toBeDefined();

    const rightPassword = await signInFrom(freshIp(), victim.email, PASSWORD);
    expectError(rightPassword, 429, 'rate_limited');
    expect(rightPassword.headers['set-cookie']).toBeUndefined();
  });

  it('another account is not affected: a wrong password is still 401 and the right one works', async () => {
    expectError(await signInFrom(freshIp(), bystander.email, 'guessed-wrong'), 401, 'unauthorized');
    await signInFrom(freshIp(), bystander.email, PASSWORD).expect(200);
  });

  it('successful sign-ins do not count toward the limit', async () => {
    const regular = await signUpCoach(server.app, 'regular');
    for (let i = 0; i < 5; i++) await signInFrom(freshIp(), regular.email, PASSWORD).expect(200);
    expectError(await signInFrom(freshIp(), regular.email, 'one-typo'), 401, 'unauthorized');
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
