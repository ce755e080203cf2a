/**
 * Shared helpers for the browser tests: captured mail from the sink's folder, screenshots at the
 * two widths we design for, and watching the page for errors a person would notice.
 */
import { mkdirSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { expect, type Page } from '@playwright/test';
import { simpleParser } from 'mailparser';

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
}

/** Collects uncaught page errors and console errors; call the returned check at the end. */
export function watchErrors(page: Page) {
  const errors: string[] = [];
  page.on('pageerror', (error) => errors.push(`pageerror: ${error.message}`));
  page.on('console', (message) => {
    if (message.type() !== 'error') return;
    const text = message.text();
    // Failed API calls that the test provokes on purpose show up as resource errors.
    if (/Failed to load resource: the server responded with a status of (401|404|409)/.test(text)) return;
    errors.push(`console: ${text}`);
  });
  return () => expect(errors, errors.join('\n')).toEqual([]);
}
