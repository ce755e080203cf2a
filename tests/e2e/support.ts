/**
 * Shared helpers for the browser tests: captured mail from the sink's folder, screenshots at the
 * two widths we design for, and watching the page for errors a person would notice.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { expect, type Page } from '@playwright/test';
import { simpleParser } from 'mailparser';
import { Client } from 'pg';

export const PHONE = { width: 390, height: 844 };
export const DESKTOP = { width: 1440, height: 900 };
export const SHOTS = path.resolve(__dirname, 'artifacts/screenshots');

export const uniqueEmail = (label: string) =>
  `${label}.${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}@e2e.example`;

/** Waits for the newest captured mail to `to` and returns the first link in it. */
export async function linkFromMail(to: string, timeoutMs = 10_000): Promise<string> {
  const dir = process.env.MAIL_DIR ?? path.resolve(__dirname, '../../.data/mail-test');
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const files = readdirSync(dir).filter((f) => f.endsWith('.eml')).sort().reverse();
    for (const file of files) {
      const raw = readFileSync(path.join(dir, file));
      if (!raw.toString('utf8').toLowerCase().includes(to.toLowerCase())) continue;
      const mail = await simpleParser(raw);
      const link = /https?:\/\/\S+/.exec(mail.text ?? '')?.[0];
      if (link) return link;
    }
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
  throw new Error(`no mail with a link reached ${to} (is the mail sink running?)`);
}

/** Saves a screenshot at phone and desktop width (restoring the phone width after). */
export async function shootBoth(page: Page, name: string) {
  mkdirSync(SHOTS, { recursive: true });
  await page.setViewportSize(PHONE);
  await page.waitForTimeout(150);
  await page.screenshot({ path: path.join(SHOTS, `${name}-390.png`), fullPage: true });
  await page.setViewportSize(DESKTOP);
  await page.waitForTimeout(150);
  await page.screenshot({ path: path.join(SHOTS, `${name}-1440.png`), fullPage: true });
  await page.setViewportSize(PHONE);
  await settleLayout(page);
}

/**
 * Waits until the page has drawn at its current width: two animation frames after the resize, so
 * a layout that swaps at a breakpoint (phone and wide) has re-rendered before the next tap lands.
 * Without it a tap can reach an element of the old layout as React removes it.
 */
export async function settleLayout(page: Page) {
  const width = page.viewportSize()?.width ?? 0;
  await page.waitForFunction((w) => window.innerWidth === w, width);
  await page.evaluate(() => new Promise<void>((resolve) => requestAnimationFrame(() => requestAnimationFrame(() => resolve()))));
}

/**
 * Collects uncaught page errors and console errors; call the returned check at the end. `expected`
 * lists console messages a test provokes on purpose (a stopped server's refused connections).
 */
export function watchErrors(page: Page, expected: RegExp[] = []) {
  const errors: string[] = [];
  page.on('pageerror', (error) => errors.push(`pageerror: ${error.message}`));
  page.on('console', (message) => {
    if (message.type() !== 'error') return;
    const text = message.text();
    // Failed API calls that the test provokes on purpose show up as resource errors.
    if (/Failed to load resource: the server responded with a status of (401|404|409)/.test(text)) return;
    if (expected.some((pattern) => pattern.test(text))) return;
    errors.push(`console: ${text}`);
  });
  return () => expect(errors, errors.join('\n')).toEqual([]);
}

export interface ApiCoach {
  email: string;
  password: string;
  teamId: string;
  token: string;
}

async function call<T>(base: string, path: string, init: { method?: string; token?: string; body?: unknown } = {}): Promise<T> {
  const response = await fetch(`${base}${path}`, {
    method: init.method ?? (init.body ? 'POST' : 'GET'),
    headers: {
      'content-type': 'application/json',
      origin: base,
      ...(init.token ? { authorization: `Bearer ${init.token}` } : {}),
    },
    body: init.body ? JSON.stringify(init.body) : undefined,
  });
  if (!response.ok) throw new Error(`${path}: ${response.status} ${await response.text()}`);
  return (await response.json()) as T;
}

/** A head coach with a fresh team, made through the API (faster than the forms, which onboarding covers). */
export async function apiCoachWithSkaters(base: string, names: string[]) {
  const email = uniqueEmail('board');
  const password = 'gloves-on-the-boards';
  const session = await call<{ accessToken: string; memberships: { teamId: string }[] }>(base, '/api/auth/sign-up', {
    body: { email, password, displayName: 'Tjitske Hoogland', teamName: 'Board Test Squad' },
  });
  const coach: ApiCoach = { email, password, teamId: session.memberships[0].teamId, token: session.accessToken };
  const skaters: { id: string; displayName: string }[] = [];
  for (const displayName of names) {
    skaters.push(await call(base, `/api/teams/${coach.teamId}/skaters`, { token: coach.token, body: { displayName } }));
  }
  const cues = await call<{ id: string; label: string; phase: string }[]>(base, `/api/teams/${coach.teamId}/cues`, { token: coach.token });
  return { coach, skaters, cues };
}

/**
 * Someone invited by the head coach (as a skater or a guardian of `skaterId`) who accepts through
 * the link in their mail, as in real life. Returns the new account's e-mail and password.
 */
export async function inviteAndAccept(
  base: string,
  coach: ApiCoach,
  invite: { label: string; role: 'skater' | 'guardian' | 'coach'; skaterId?: string; displayName: string; password: string },
) {
  const email = uniqueEmail(invite.label);
  await call(base, `/api/teams/${coach.teamId}/invitations`, {
    token: coach.token,
    body: { email, role: invite.role, ...(invite.skaterId ? { skaterId: invite.skaterId } : {}) },
  });
  const token = new URL(await linkFromMail(email)).searchParams.get('token');
  await call(base, '/api/invitations/accept', { body: { token, displayName: invite.displayName, password: invite.password } });
  return { email, password: invite.password };
}

/** Signs a skater or guardian in through the form and waits for their page. */
export async function signInToToday(page: Page, base: string, email: string, password: string, timeout = 30_000) {
  await page.goto(`${base}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(password);
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('skater-home')).toBeVisible({ timeout });
}

/** Opens the sync panel, syncs by hand, waits until nothing is left to send and no error shows, closes it. */
export async function syncNow(page: Page) {
  await page.getByTestId('sync-summary').first().click();
  await page.getByTestId('sync-now').click();
  await expect(page.getByTestId('sync-panel-pending')).toHaveText('0 changes waiting to be sent', { timeout: 20_000 });
  await expect(page.getByTestId('sync-error')).toHaveCount(0);
  await expect(page.getByTestId('sync-panel-last')).toContainText('Synced');
  await page.getByTestId('sync-close').click();
}

/**
 * Signs in through the form and waits for the board. The first sign-in of a fresh browser opens the
 * device database and runs a first sync, which on a busy 2-core machine can take well over 10 s.
 */
export async function signInThroughForm(page: Page, base: string, email: string, password: string, timeout = 30_000) {
  await page.goto(`${base}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(password);
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('coach-home')).toBeVisible({ timeout });
}

/**
 * A server of the test's own on `port`, which the test can stop and start again (the shared one
 * on E2E_BASE_URL must stay up). Same database and settings as the shared one, from the env.
 */
export function ownServer(port: number) {
  const base = `http://127.0.0.1:${port}`;
  const root = path.resolve(__dirname, '../..');
  let child: ChildProcess | undefined;
  const up = () => fetch(`${base}/api/health`).then((r) => r.ok, () => false);
  return {
    base,
    async start() {
      child = spawn(path.join(root, 'node_modules/.bin/tsx'), ['server/main.ts'], {
        cwd: root,
        env: { ...process.env, PORT: String(port), PUBLIC_URL: base, WEB_DIST: path.join(root, 'dist'), LOG_LEVEL: 'warn', TSX_TSCONFIG_PATH: 'server/tsconfig.json' },
        stdio: 'inherit',
      });
      await expect.poll(up, { timeout: 30_000, message: `the test server on ${base} did not start` }).toBe(true);
    },
    async stop() {
      if (!child || child.exitCode !== null) return;
      const exited = new Promise((resolve) => child!.once('exit', resolve));
      child.kill('SIGTERM');
      await exited;
      await expect.poll(up).toBe(false);
    },
  };
}

const axeSource = readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

type AxeViolation = {
  id: string;
  impact: string | null;
  help: string;
  nodes: { target: unknown[]; html: string; failureSummary?: string }[];
};

/**
 * Runs axe-core (shipped in node_modules, injected into the page: nothing is fetched) on the page
 * as it is now, at its current width, and fails on any violation, listing each rule with the
 * elements that break it. `label` names the screen in the failure message. The check is soft: the
 * test goes on to its other screens and fails at its end, with every violation found listed.
 */
export async function expectNoA11yViolations(page: Page, label: string) {
  const injected = await page.evaluate(() => typeof (window as { axe?: unknown }).axe !== 'undefined');
  if (!injected) {
    // The app's content security policy refuses inline scripts; evaluating the source through the
    // browser's debugging protocol is not subject to it.
    await page.evaluate(axeSource);
  }
  const violations = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (context: Document, options: object) => Promise<{ violations: AxeViolation[] }> } }).axe;
    const result = await axe.run(document, { resultTypes: ['violations'] });
    return result.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      help: v.help,
      nodes: v.nodes.map((n) => ({ target: n.target, html: n.html.slice(0, 200), failureSummary: n.failureSummary })),
    }));
  });
  const width = page.viewportSize()?.width ?? 0;
  const report = violations
    .map((v) => `${v.impact ?? 'unknown'} ${v.id}: ${v.help}\n${v.nodes.map((n) => `    ${JSON.stringify(n.target)} ${n.html}`).join('\n')}`)
    .join('\n');
  // Soft: every screen of a test is checked and reported before the test fails.
  expect.soft(violations, `accessibility violations on ${label} at ${width} px:\n${report}`).toEqual([]);
}

/** Checks the screen with axe at phone and desktop width, waiting for `ready` after each resize; ends at phone width. */
export async function checkA11yAtBothWidths(page: Page, label: string, ready: () => Promise<unknown>) {
  for (const size of [PHONE, DESKTOP]) {
    await page.setViewportSize(size);
    await ready();
    await expectNoA11yViolations(page, label);
  }
  await page.setViewportSize(PHONE);
  await settleLayout(page);
}

/**
 * Every visible tap target inside the element with test id `rootTestId` (buttons, switches,
 * radios, links, and text fields with `fields`) is at least `min` px wide and high (48 unless
 * told); fails naming each one that is smaller, with its size.
 */
export async function expectTapTargetsAtLeast(page: Page, rootTestId: string, { min = 48, fields = false }: { min?: number; fields?: boolean } = {}) {
  const small = await page.getByTestId(rootTestId).evaluate(
    (root, { min, fields }) =>
      [...root.querySelectorAll(`[role="button"], button, [role="switch"], [role="radio"], a${fields ? ', input' : ''}`)]
        .map((el) => ({ el, box: el.getBoundingClientRect() }))
        .filter(({ box }) => box.width > 0 && box.height > 0 && (box.width < min || box.height < min))
        .map(
          ({ el, box }) =>
            `${el.getAttribute('data-testid') || el.getAttribute('aria-label') || el.textContent?.trim() || el.tagName} ${Math.round(box.width)}x${Math.round(box.height)}`,
        ),
    { min, fields },
  );
  expect(small, `tap targets under ${min} px inside ${rootTestId}:\n${small.join('\n')}`).toEqual([]);
}

/** The user id inside an access token (its `sub`), for a note's author. */
export const userIdOf = (token: string) => JSON.parse(Buffer.from(token.split('.')[1], 'base64url').toString('utf8')).sub as string;

/**
 * The team was made a minute ago, and the server refuses records from before a team existed. A
 * squad that has kept notes for months is what the review is for: its start is moved back in the
 * test database (the one the e2e server uses: DATABASE_URL, or the file `scripts/test.sh --setup`
 * writes), as tests/integration/review-helpers.ts does.
 */
export async function teamFromLastSeason(teamId: string) {
  const url = process.env.DATABASE_URL ?? readFileSync(path.resolve(__dirname, '../../.data/secrets/test-database-url'), 'utf8').trim();
  const db = new Client({ connectionString: url });
  await db.connect();
  try {
    await db.query(`UPDATE teams SET created_at = now() - interval '300 days' WHERE id = $1`, [teamId]);
  } finally {
    await db.end();
  }
}
