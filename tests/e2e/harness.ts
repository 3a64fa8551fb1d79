import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync } from 'node:fs';
import { createServer } from 'node:net';
import { join } from 'node:path';
import { createTestDatabase } from '@tierscope/db/testing';
import { seedDemo } from '@tierscope/db/seed';
import { chromium, type Browser, type Page } from 'playwright-core';

const ROOT = new URL('../..', import.meta.url).pathname;
export const ARTIFACTS = join(ROOT, 'test-results');

/** The real API as a separate process serving the built web app, on a seeded database of its own. */
export interface Harness {
  baseUrl: string;
  browser: Browser;
  stop(): Promise<void>;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      server.close(() => {
        if (typeof address === 'object' && address) resolve(address.port);
        else reject(new Error('no port'));
      });
    });
  });
}

export async function startHarness(): Promise<Harness> {
  const webDist = join(ROOT, 'dist/web/browser');
  if (!existsSync(join(webDist, 'index.html'))) {
    throw new Error(
      'dist/web/browser is missing: `npm test` builds the web app before the browser suites',
    );
  }
  mkdirSync(ARTIFACTS, { recursive: true });
  const database = await createTestDatabase();
  await seedDemo(database.db);
  const port = await freePort();
  const api: ChildProcess = spawn(process.execPath, ['--import', 'tsx', 'apps/api/src/server.ts'], {
    cwd: ROOT,
    env: {
      ...process.env,
      DATABASE_URL: database.url,
      PORT: String(port),
      HOST: '127.0.0.1',
      JWT_SECRET: 'e2e-secret-e2e-secret-e2e-secret-e2e-secret',
      WEB_DIST: webDist,
    },
    stdio: ['ignore', 'inherit', 'inherit'],
    // Its own process group, so nothing it starts outlives the suite.
    detached: true,
  });
  const baseUrl = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  for (;;) {
    try {
      if ((await fetch(`${baseUrl}/api/health`)).ok) break;
    } catch {
      // Still starting.
    }
    if (Date.now() > deadline) throw new Error('the API did not start within 60 s');
    await new Promise((r) => setTimeout(r, 250));
  }
  const browser = await chromium.launch({
    executablePath: process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  return {
    baseUrl,
    browser,
    async stop() {
      await browser.close();
      const exited = new Promise((r) => api.once('exit', r));
      if (api.pid) process.kill(-api.pid, 'SIGTERM');
      await exited;
      await database.drop();
    },
  };
}

export async function signIn(
  page: Page,
  baseUrl: string,
  email: string,
  password = 'tierscope-demo',
): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

export async function screenshot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(ARTIFACTS, `${name}.png`), fullPage: true });
}
