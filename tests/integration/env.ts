/**
 * Environment for the server integration tests. scripts/test.sh starts the real PostgreSQL (the
 * test cluster) and the mail sink and exports their addresses; these defaults only fill what it
 * does not set. Run by hand, the database URL (with the test cluster's generated password) comes
 * from .data/secrets/test-database-url, which `bash scripts/test.sh --setup` writes. A missing
 * database is not skipped: the tests fail with a message naming that command, or the connection error.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';

process.env.NODE_ENV = 'test';
if (!process.env.DATABASE_URL) {
  const file = path.join(__dirname, '../../.data/secrets/test-database-url');
  try {
    process.env.DATABASE_URL = readFileSync(file, 'utf8').trim();
  } catch {
    throw new Error(`No test database: run \`bash scripts/test.sh --setup\` once (it starts the test cluster and writes ${file}), or set DATABASE_URL.`);
  }
}
process.env.JWT_SECRET ??= 'test-secret-that-is-long-enough-for-hs256-0123456789';
process.env.BCRYPT_COST ??= '4';
process.env.LOG_LEVEL = 'silent';
process.env.SMTP_HOST ??= '127.0.0.1';
process.env.SMTP_PORT ??= '2526';
process.env.MAIL_DIR ??= `${process.cwd()}/.data/mail-test`;
process.env.PUBLIC_URL ??= 'http://127.0.0.1:8431';
// Each test file signs up many accounts from one address; rate-limit.test.ts sets its own limits.
process.env.LOGIN_LIMIT_PER_IP ??= '10000';
process.env.LOGIN_LIMIT_PER_ACCOUNT ??= '10000';
// The sync tests push and pull far faster than a device; rate-limit-sync.test.ts sets its own.
process.env.SYNC_LIMIT_PER_USER ??= '1000000';
