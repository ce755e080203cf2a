/**
 * Helpers for the server integration tests: one app and DataSource per test file against the
 * real PostgreSQL, unique e-mails per test, and reading the mail the sink captured.
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { simpleParser, type ParsedMail } from 'mailparser';
import request from 'supertest';
import type { DataSource } from 'typeorm';
import type { Express } from 'express';
import type { Session } from '../../shared/schemas';

export interface TestServer {
  app: Express;
  dataSource: DataSource;
  close: () => Promise<void>;
}

/** Imports the app lazily so a test file can change process.env before the config is read. */
export async function startTestServer(): Promise<TestServer> {
  const { createDataSource } = await import('../../server/data-source');
  const { createApp } = await import('../../server/app');
  const dataSource = await createDataSource(process.env.DATABASE_URL!, 4).initialize();
  const app = createApp(dataSource);
  return {
    app,
    dataSource,
    close: async () => {
      (await import('../../server/lib/mailer')).closeMailer();
      await dataSource.destroy();
    },
  };
}

let counter = 0;
export const uniqueEmail = (label: string) =>
  `${label}.${Date.now().toString(36)}${(counter++).toString(36)}${Math.random().toString(36).slice(2, 6)}@test.example`;

export const PASSWORD = 'rink-side-pass-1';

export interface Coach {
  session: Session;
  teamId: string;
  cookie: string;
  auth: { Authorization: string };
}

export function refreshCookieOf(res: request.Response): string {
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? []);
  const cookie = cookies.find((c) => c.startsWith('boardside_refresh='));
  if (!cookie) throw new Error('no refresh cookie set');
  return cookie.split(';')[0];
}

export async function signUpCoach(app: Express, label = 'coach'): Promise<Coach> {
  const res = await request(app)
    .post('/api/auth/sign-up')
    .send({ email: uniqueEmail(label), password: PASSWORD, displayName: `Coach ${label}`, teamName: `Team ${label}` })
    .expect(201);
  const session = res.body as Session;
  return {
    session,
    teamId: session.memberships[0].teamId,
    cookie: refreshCookieOf(res),
    auth: { Authorization: `Bearer ${session.accessToken}` },
  };
}

/** Waits for the newest captured message addressed to `to` (the sink writes .eml files). */
export async function waitForMail(to: string, timeoutMs = 5000): Promise<ParsedMail> {
  const dir = process.env.MAIL_DIR!;
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    let files: string[] = [];
    try {
      files = readdirSync(dir).filter((f) => f.endsWith('.eml')).sort().reverse();
    } catch {
      files = [];
    }
    for (const file of files) {
      const raw = readFileSync(path.join(dir, file));
      if (!raw.toString('utf8').toLowerCase().includes(to.toLowerCase())) continue;
      const mail = await simpleParser(raw);
      const recipients = [mail.to, mail.cc].flat().filter(Boolean).flatMap((a) => (a as { value: { address?: string }[] }).value);
      if (recipients.some((r) => r.address?.toLowerCase() === to.toLowerCase())) return mail;
    }
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error(`no mail to ${to} within ${timeoutMs} ms (is the mail sink running? see scripts/test.sh)`);
}

export function linkToken(mail: ParsedMail): string {
  const match = /token=([A-Za-z0-9_-]+)/.exec(mail.text ?? '');
  if (!match) throw new Error(`no token link in mail: ${mail.text}`);
  return match[1];
}
