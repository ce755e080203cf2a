/** GET /api/health against the real database, and the headers every API answer carries. */
import request from 'supertest';
import { startTestServer, type TestServer } from './helpers';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

describe('GET /api/health', () => {
  it('is 200 with the database up', async () => {
    const res = await request(server.app).get('/api/health').expect(200);
    expect(res.body).toEqual({ status: 'ok', database: 'up', clock: { status: 'ok', maxLeadMs: expect.any(Number) }, serverTime: expect.any(String) });
    expect(Math.abs(Date.parse(res.body.serverTime) - Date.now())).toBeLessThan(5_000);
  });

  it('is 503 with the database down when the server has no working connection', async () => {
    const { createDataSource } = await import('../../server/data-source');
    const { createApp } = await import('../../server/app');
    const dataSource = await createDataSource(process.env.DATABASE_URL!, 1).initialize();
    const app = createApp(dataSource);
    await dataSource.destroy();
    const res = await request(app).get('/api/health').expect(503);
    expect(res.body).toEqual({ status: 'degraded', database: 'down' });
  });
});

describe('API response headers', () => {
  it('sets the security headers and hides the framework', async () => {
    const res = await request(server.app).get('/api/health');
    expect(res.headers['x-powered-by']).toBeUndefined();
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toMatch(/frame-ancestors 'none'/);
    expect(res.headers['cross-origin-opener-policy']).toBe('same-origin');
    // PUBLIC_URL is http:// in the tests: no HSTS.
    expect(res.headers['strict-transport-security']).toBeUndefined();
  });

  it('allows credentialed CORS from the public origin only', async () => {
    const origin = new URL(process.env.PUBLIC_URL!).origin;
    const ok = await request(server.app).get('/api/health').set('Origin', origin);
    expect(ok.headers['access-control-allow-origin']).toBe(origin);
    expect(ok.headers['access-control-allow-credentials']).toBe('true');

    const other = await request(server.app).get('/api/health').set('Origin', 'https://elsewhere.example');
    expect(other.headers['access-control-allow-origin']).toBeUndefined();
  });

  it('answers a preflight from a foreign origin without allowing it', async () => {
    const res = await request(server.app)
      .options('/api/auth/sign-in')
      .set('Origin', 'https://elsewhere.example')
      .set('Access-Control-Request-Method', 'POST');
    expect(res.status).toBeLessThan(500);
    expect(res.headers['access-control-allow-origin']).toBeUndefined();
  });
});
