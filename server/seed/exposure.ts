/**
 * The demo accounts' password is published in the README, so a server holding them must not be
 * reachable from anywhere but this machine. server/main.ts calls `demoExposureProblem` before it
 * listens and refuses to start with the message it returns.
 */
import { isIP } from 'node:net';
import type { DataSource } from 'typeorm';
import { DEMO_DOMAIN } from './demo';

/** True when `host` only accepts connections from this machine (127.0.0.0/8, ::1, localhost). */
export function isLoopbackHost(host: string): boolean {
  const value = host.trim().toLowerCase().replace(/^\[(.*)\]$/, '$1');
  if (value === 'localhost') return true;
  if (isIP(value) === 4) return value.startsWith('127.');
  if (isIP(value) === 6) return value === '::1' || value === '0:0:0:0:0:0:0:1' || /^::ffff:127\./.test(value);
  return false;
}

/** E-mails of demo accounts present in the database (any account of the demo club's domain). */
export async function demoAccounts(dataSource: DataSource): Promise<string[]> {
  const rows: { email: string }[] = await dataSource.query(
    `SELECT email FROM users WHERE lower(email) LIKE '%@' || $1 ORDER BY email`,
    [DEMO_DOMAIN],
  );
  return rows.map((r) => r.email);
}

/** Why the server must not listen on `host` with this database, or null when it may. */
export async function demoExposureProblem(dataSource: DataSource, host: string): Promise<string | null> {
  if (isLoopbackHost(host)) return null;
  const accounts = await demoAccounts(dataSource);
  if (accounts.length === 0) return null;
  return [
    `Refusing to listen on ${host || 'every address'}: this database holds ${accounts.length} demo account(s) whose password is published in the README`,
    `(${accounts.slice(0, 5).join(', ')}${accounts.length > 5 ? ', ...' : ''}).`,
    'Remove them first (`npm run db:reset -- --remove-demo` removes the demo club and its accounts),',
    'or listen on loopback only (HOST=127.0.0.1).',
  ].join(' ');
}
