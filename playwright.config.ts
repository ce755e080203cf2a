/**
 * End-to-end tests in Debian's headless Chromium (never a downloaded browser). scripts/test.sh
 * starts the real server with the built web app and passes its address in E2E_BASE_URL.
 */
import { execSync } from 'node:child_process';
import { defineConfig } from '@playwright/test';

const chromium = process.env.CHROMIUM_PATH ?? execSync('command -v chromium', { encoding: 'utf8' }).trim();

export default defineConfig({
  testDir: 'tests/e2e',
  outputDir: 'tests/e2e/artifacts/results',
  // Generous: a 2-core machine running the whole suite is slow to open a fresh browser's device database.
  timeout: 120_000,
  expect: { timeout: 20_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  use: {
    baseURL: process.env.E2E_BASE_URL ?? 'http://127.0.0.1:8431',
    screenshot: 'only-on-failure',
    trace: 'retain-on-failure',
    launchOptions: {
      executablePath: chromium,
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    },
  },
});
