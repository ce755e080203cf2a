/** Serving the web app: client routes get the page, missing files a 404, headers for the device store. */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { startTestServer, type TestServer } from './helpers';

const dist = mkdtempSync(path.join(tmpdir(), 'boardside-dist-'));
writeFileSync(path.join(dist, 'index.html'), '<!doctype html><title>Boardside</title>');
writeFileSync(path.join(dist, 'sw.js'), 'self.addEventListener("fetch", () => {});');
process.env.WEB_DIST = dist;

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(() => server.close());

describe('web app', () => {
  it('answers a client route with the page, not cached, cross-origin isolated', async () => {
    const res = await request(server.app).get('/board').expect(200);
    expect(res.text).toContain('<title>Boardside</title>');
    expect(res.headers['cache-control']).toBe('no-cache');
    expect(res.headers['cross-origin-opener-policy']).toBe('same-origin');
    expect(res.headers['cross-origin-embedder-policy']).toBe('require-corp');
  });

  it('serves the service worker as JavaScript that is re-checked on every visit', async () => {
    const res = await request(server.app).get('/sw.js').expect(200);
    expect(res.headers['content-type']).toMatch(/javascript/);
    expect(res.headers['cache-control']).toBe('no-cache');
  });

  it('answers a missing file with 404 instead of the page', async () => {
    const res = await request(server.app).get('/missing.js').expect(404);
    expect(res.text).not.toContain('<title>');
  });

  it('compresses what it serves when asked to', async () => {
    writeFileSync(path.join(dist, 'big.js'), 'const x = 1;\n'.repeat(5000));
    const res = await request(server.app).get('/big.js').set('Accept-Encoding', 'gzip').expect(200);
    expect(res.headers['content-encoding']).toBe('gzip');
  });
});
