/**
 * Serving the web app: client routes get the page, missing files a 404, headers for the device
 * store, and what "add to home screen" needs (the shipped manifest, icons and favicon from
 * public/, with the right content types and values that match the app's theme).
 */
import { cpSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { colors } from '../../components/ui/theme';
import { startTestServer, type TestServer } from './helpers';

/** Width and height from a PNG's header. */
const pngSize = (png: Buffer) => ({ width: png.readUInt32BE(16), height: png.readUInt32BE(20) });

const dist = mkdtempSync(path.join(tmpdir(), 'boardside-dist-'));
writeFileSync(path.join(dist, 'index.html'), '<!doctype html><title>Boardside</title>');
writeFileSync(path.join(dist, 'sw.js'), 'self.addEventListener("fetch", () => {});');
// The files `expo export` copies from public/ into the build, as shipped.
const publicDir = path.resolve(__dirname, '../../public');
cpSync(publicDir, dist, { recursive: true, filter: (src) => !src.endsWith('index.html') });
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

  it('serves the web app manifest with its content type, naming the app, its colours and a standalone start', async () => {
    const res = await request(server.app).get('/manifest.webmanifest').expect(200);
    expect(res.headers['content-type']).toMatch(/^application\/manifest\+json/);
    const manifest = JSON.parse(res.text);
    expect(manifest).toMatchObject({ name: expect.stringContaining('Boardside'), short_name: 'Boardside', display: 'standalone', start_url: '/' });
    expect(manifest.theme_color).toBe(colors.primary);
    expect(manifest.background_color).toBe(colors.background);
  });

  it('serves every manifest icon as an image of the size it claims, a maskable one among them', async () => {
    const manifest = JSON.parse(readFileSync(path.join(publicDir, 'manifest.webmanifest'), 'utf8'));
    const icons: { src: string; sizes: string; type: string; purpose: string }[] = manifest.icons;
    expect(icons.some((i) => i.purpose === 'maskable' && i.sizes === '512x512')).toBe(true);
    for (const size of ['192x192', '512x512']) expect(icons.some((i) => i.sizes === size && i.purpose === 'any')).toBe(true);
    for (const icon of icons) {
      const res = await request(server.app).get(icon.src).buffer(true).parse((r, done) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => done(null, Buffer.concat(chunks)));
      }).expect(200);
      expect(res.headers['content-type']).toContain(icon.type);
      if (icon.type === 'image/png') {
        const { width, height } = pngSize(res.body as Buffer);
        expect(`${width}x${height}`).toBe(icon.sizes);
      }
    }
  });

  it('serves a favicon, and the page shell links the manifest and icons', async () => {
    const res = await request(server.app).get('/favicon.ico').expect(200);
    expect(res.headers['content-type']).toMatch(/icon/);
    const shell = readFileSync(path.join(publicDir, 'index.html'), 'utf8');
    expect(shell).toContain('<link rel="manifest" href="/manifest.webmanifest" />');
    expect(shell).toContain('href="/favicon.ico"');
    expect(shell).toContain('rel="apple-touch-icon"');
  });
});
