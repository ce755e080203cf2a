/**
 * The sync limit per user, with a low limit for this file: push and pull together count toward
 * one budget per signed-in user (not per address: a club's devices share one), and the one over
 * the limit gets a 429 that says what to do.
 */
import request from 'supertest';
import { v7 as uuidv7 } from 'uuid';
import { expectError, signUpCoach, startTestServer, type Coach, type TestServer } from './helpers';
import { device, pull, push, sessionCreate, userIdOf } from './sync-helpers';

// Read lazily by the app: these must be set before startTestServer().
process.env.SYNC_LIMIT_PER_USER = '4';
process.env.SYNC_LIMIT_WINDOW_SECONDS = '600';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

const pushOne = (coach: Coach) => {
  const dev = device(coach);
  return push(server.app, dev, coach.teamId, [sessionCreate(dev, uuidv7(), userIdOf(coach))]);
};

describe('sync limit per user', () => {
  it('after 4 sync requests (push and pull together) the 5th is 429 with a clear message', async () => {
    const busy = await signUpCoach(server.app, 'busy');
    await pull(server.app, busy, busy.teamId).expect(200);
    await pushOne(busy).expect(200);
    await pull(server.app, busy, busy.teamId).expect(200);
    await pushOne(busy).expect(200);

    const pulled = await pull(server.app, busy, busy.teamId);
    expectError(pulled, 429, 'rate_limited');
    expect(pulled.body.error.message).toMatch(/sync/i);
    expect(pulled.headers['ratelimit']).toBeDefined();
    expectError(await pushOne(busy), 429, 'rate_limited');
  });

  it('another user from the same address still syncs', async () => {
    const calm = await signUpCoach(server.app, 'calm');
    await pull(server.app, calm, calm.teamId).expect(200);
    await pushOne(calm).expect(200);
  });

  it('requests without a valid token are refused before they count (401, not 429)', async () => {
    for (let i = 0; i < 6; i++) {
      expectError(await request(server.app).get('/api/sync/pull').set('Authorization', 'Bearer nope'), 401, 'unauthorized');
    }
  });
});
