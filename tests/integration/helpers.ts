/**
 * Helpers for the server integration tests: one app and DataSource per test file against the
 * real PostgreSQL, unique e-mails per test, reading the mail the sink captured, and building the
 * people of a team (skater profiles, invited coaches, skaters and guardians) through the API.
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { simpleParser, type ParsedMail } from 'mailparser';
import request from 'supertest';
import type { DataSource } from 'typeorm';
import type { Express } from 'express';
import type { Session, Skater } from '../../shared/schemas';

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

/** Someone signed in: their session, the refresh cookie (`name=value`) and a bearer header. */
export interface Account {
  session: Session;
  email: string;
  cookie: string;
  auth: { Authorization: string };
}

export interface Coach extends Account {
  teamId: string;
}

export function refreshCookieOf(res: request.Response): string {
  const cookie = setCookieHeaders(res).find((c) => c.startsWith('boardside_refresh='));
  if (!cookie) throw new Error('no refresh cookie set');
  return cookie.split(';')[0];
}

export const setCookieHeaders = (res: request.Response): string[] => ([] as string[]).concat(res.headers['set-cookie'] ?? []);

export function accountOf(res: request.Response): Account {
  const session = res.body as Session;
  return {
    session,
    email: session.user.email,
    cookie: refreshCookieOf(res),
    auth: { Authorization: `Bearer ${session.accessToken}` },
  };
}

export async function signUpCoach(app: Express, label = 'coach'): Promise<Coach> {
  const res = await request(app)
    .post('/api/auth/sign-up')
    .send({ email: uniqueEmail(label), password: PASSWORD, displayName: `Coach ${label}`, teamName: `Team ${label}` })
    .expect(201);
  const account = accountOf(res);
  return { ...account, teamId: account.session.memberships[0].teamId };
}

export function signIn(app: Express, email: string, password = PASSWORD) {
  return request(app).post('/api/auth/sign-in').send({ email, password });
}

/** Adds a skater profile to the coach's team (head coach only) and returns it. */
export async function addSkater(app: Express, coach: Coach, displayName: string): Promise<Skater> {
  const res = await request(app)
    .post(`/api/teams/${coach.teamId}/skaters`)
    .set(coach.auth)
    .send({ displayName })
    .expect(201);
  return res.body as Skater;
}

export interface Invited extends Account {
  token: string;
  mail: ParsedMail;
}

/** The head coach invites `role` (linked to `skaterId` for skaters and guardians); the invitee accepts from the mail. */
export async function inviteAndAccept(
  app: Express,
  coach: Coach,
  role: 'coach' | 'skater' | 'guardian',
  options: { skaterId?: string; label?: string; displayName?: string } = {},
): Promise<Invited> {
  // The server stores e-mails lower-cased, and so does the mail it sends.
  const email = uniqueEmail(options.label ?? role).toLowerCase();
  await request(app)
    .post(`/api/teams/${coach.teamId}/invitations`)
    .set(coach.auth)
    .send({ email, role, skaterId: options.skaterId })
    .expect(201);
  const mail = await waitForMail(email, { where: (m) => addressesOf(m, 'to').includes(email) });
  const token = linkToken(mail);
  const res = await request(app)
    .post('/api/invitations/accept')
    .send({ token, displayName: options.displayName ?? `Invited ${role}`, password: PASSWORD })
    .expect(200);
  return { ...accountOf(res), token, mail };
}

/** The addresses of a captured message's To or Cc header, lower-cased. */
export function addressesOf(mail: ParsedMail, header: 'to' | 'cc'): string[] {
  return [mail[header]]
    .flat()
    .filter(Boolean)
    .flatMap((a) => (a as { value: { address?: string }[] }).value)
    .map((r) => (r.address ?? '').toLowerCase());
}

export interface MailQuery {
  timeoutMs?: number;
  /** Only messages for which this returns true (e.g. to tell an invitation from a cc). */
  where?: (mail: ParsedMail) => boolean;
}

/** Waits for the newest captured message addressed (To or Cc) to `to`; the sink writes .eml files. */
export async function waitForMail(to: string, query: number | MailQuery = {}): Promise<ParsedMail> {
  const { timeoutMs = 5000, where = () => true } = typeof query === 'number' ? { timeoutMs: query } : query;
  const dir = process.env.MAIL_DIR!;
  const wanted = to.toLowerCase();
  const deadline = Date.now() + timeoutMs;
  do {
    let files: string[] = [];
    try {
      files = readdirSync(dir).filter((f) => f.endsWith('.eml')).sort().reverse();
    } catch {
      files = [];
    }
    for (const file of files) {
      const raw = readFileSync(path.join(dir, file));
      if (!raw.toString('utf8').toLowerCase().includes(wanted)) continue;
      const mail = await simpleParser(raw);
      const recipients = [...addressesOf(mail, 'to'), ...addressesOf(mail, 'cc')];
      if (recipients.includes(wanted) && where(mail)) return mail;
    }
    await new Promise((resolve) => setTimeout(resolve, 100));
  } while (Date.now() < deadline);
  throw new Error(`no mail to ${to} within ${timeoutMs} ms (is the mail sink running? see scripts/test.sh)`);
}

/**
 * Asserts that nothing was mailed to `to`. The server answers only after the sink accepted the
 * message, so a short wait is enough to be sure.
 */
export async function expectNoMail(to: string, waitMs = 400): Promise<void> {
  await expect(waitForMail(to, waitMs)).rejects.toThrow(/no mail/);
}

export function linkToken(mail: ParsedMail): string {
  const match = /token=([A-Za-z0-9_-]+)/.exec(mail.text ?? '');
  if (!match) throw new Error(`no token link in mail: ${mail.text}`);
  return match[1];
}

/**
 * Asserts the one error shape `{ error: { code, message, fields? } }` with `status`, and that the
 * body carries no stack trace or internal detail.
 */
export function expectError(res: request.Response, status: number, code?: string) {
  expect({ status: res.status, body: res.body }).toMatchObject({ status, body: { error: { message: expect.any(String) } } });
  if (code) expect(res.body.error.code).toBe(code);
  expect(res.headers['content-type']).toMatch(/application\/json/);
  expectNoStack(res);
}

export function expectNoStack(res: request.Response) {
  expect(res.status).toBeLessThan(500);
  expect(res.text).not.toMatch(/\n\s+at /);
  expect(res.text).not.toMatch(/\bat .+\.(ts|js):\d+/);
  expect(res.text).not.toMatch(/node_modules|server\/|stack/i);
}
