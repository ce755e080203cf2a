/**
 * The demo accounts' password is published: the server refuses to listen beyond loopback while
 * any exists (server/seed/exposure.ts, called by server/main.ts before it listens). Checked as a
 * function against the real database, and once by starting the real server process.
 */
import { spawn } from 'node:child_process';
import path from 'node:path';
import { v4 as uuidv4 } from 'uuid';
import { DEMO_DOMAIN } from '../../server/seed/demo';
import { demoAccounts, demoExposureProblem, isLoopbackHost } from '../../server/seed/exposure';
import { startTestServer, type TestServer } from './helpers';

let server: TestServer;
const demoEmail = `retired.${uuidv4().slice(0, 8)}@${DEMO_DOMAIN}`;
const demoId = uuidv4();

beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.dataSource.query(`DELETE FROM users WHERE id = $1`, [demoId]);
  await server.close();
});

describe('isLoopbackHost', () => {
  it.each(['127.0.0.1', '127.1.2.3', '::1', '[::1]', 'localhost', 'LOCALHOST', ' 127.0.0.1 ', '::ffff:127.0.0.1'])('%s is loopback', (host) => {
    expect(isLoopbackHost(host)).toBe(true);
  });
  it.each(['0.0.0.0', '::', '', '192.168.1.20', '10.0.0.1', 'boardside.example', '128.0.0.1', '::2', 'localhost.example'])('%s is not', (host) => {
    expect(isLoopbackHost(host)).toBe(false);
  });
});

/** Starts server/main.ts with HOST; resolves with its exit code and output (or null if it kept running). */
function startServer(host: string): Promise<{ code: number | null; output: string }> {
  const root = path.resolve(__dirname, '../..');
  return new Promise((resolve, reject) => {
    const child = spawn(path.join(root, 'node_modules/.bin/tsx'), ['server/main.ts'], {
      cwd: root,
      env: { ...process.env, HOST: host, PORT: '0', LOG_LEVEL: 'fatal', TSX_TSCONFIG_PATH: path.join(root, 'server/tsconfig.json') },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let output = '';
    child.stdout.on('data', (chunk) => (output += chunk));
    child.stderr.on('data', (chunk) => (output += chunk));
    const timer = setTimeout(() => {
      child.kill('SIGKILL');
      resolve({ code: null, output });
    }, 20_000);
    child.on('error', reject);
    child.on('exit', (code) => {
      clearTimeout(timer);
      resolve({ code, output });
    });
  });
}

describe('demo accounts and the listening address', () => {
  it('refuses a non-loopback address while a demo account exists, allows loopback, and allows any address once it is gone', async () => {
    // The test database never holds the demo club.
    expect(await demoAccounts(server.dataSource)).toEqual([]);
    await server.dataSource.query(`INSERT INTO users (id, email, password_hash, display_name) VALUES ($1, $2, 'x', 'Retired demo')`, [
      demoId,
      demoEmail,
    ]);
    expect(await demoAccounts(server.dataSource)).toContain(demoEmail);

    const problem = await demoExposureProblem(server.dataSource, '0.0.0.0');
    expect(problem).toMatch(/^Refusing to listen on 0\.0\.0\.0: this database holds \d+ demo account\(s\) whose password is published/);
    expect(problem).toContain(demoEmail);
    expect(problem).toContain('npm run db:reset -- --remove-demo');
    expect(await demoExposureProblem(server.dataSource, '')).toMatch(/^Refusing to listen on every address/);
    expect(await demoExposureProblem(server.dataSource, '127.0.0.1')).toBeNull();
    expect(await demoExposureProblem(server.dataSource, '::1')).toBeNull();

    // The real server process stops before listening, with the message.
    const started = await startServer('0.0.0.0');
    expect(started.code).toBe(1);
    expect(started.output).toContain('Refusing to listen on 0.0.0.0');

    await server.dataSource.query(`DELETE FROM users WHERE id = $1`, [demoId]);
    expect(await demoExposureProblem(server.dataSource, '0.0.0.0')).toBeNull();
  }, 40_000);
});
