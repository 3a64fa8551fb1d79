import { chromiumPath } from '../../scripts/chromium';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createTestDatabase } from '@tierscope/db/testing';
import { seedDemo } from '@tierscope/db/seed';
import { startMailCatcher, type MailCatcher } from '@tierscope/mail-catcher';
import { chromium, type Browser, type Locator, type Page } from 'playwright-core';
import { startApiProcess } from '../../scripts/processes';

const ROOT = new URL('../..', import.meta.url).pathname;
export const ARTIFACTS = join(ROOT, 'test-results');

/** The real API as a separate process serving the built web app, on a seeded database of its own. */
export interface Harness {
  baseUrl: string;
  browser: Browser;
  /** the suite's own seeded database, to set up what a flow starts from */
  database: Awaited<ReturnType<typeof createTestDatabase>>;
  /** the local SMTP catcher the API mails to */
  mail: MailCatcher;
  stop(): Promise<void>;
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
  const mail = await startMailCatcher();
  const dataDir = mkdtempSync(join(tmpdir(), 'tierscope-e2e-data-'));
  const api = await startApiProcess(
    {
      DATABASE_URL: database.url,
      JWT_SECRET: 'e2e-secret-e2e-secret-e2e-secret-e2e-secret',
      WEB_DIST: webDist,
      SMTP_URL: `smtp://127.0.0.1:${mail.smtpPort}`,
      MAIL_CATCHER_URL: mail.httpUrl,
      EXCEPTION_MAIL_SECONDS: '1',
      DATA_DIR: dataDir,
    },
    { stdio: ['ignore', 'inherit', 'inherit'] },
  );
  const baseUrl = api.baseUrl;
  const browser = await chromium.launch({
    executablePath: chromiumPath(),
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
    database,
    mail,
    async stop() {
      await browser.close();
      await api.stop();
      await mail.close();
      await database.drop();
      rmSync(dataDir, { recursive: true, force: true });
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

/**
 * Saves a full-page screenshot, and checks the same state with axe-core: every state a browser test shows
 * must have no serious or critical accessibility finding (pass `checks: false` only for pages that are not
 * ours, such as the API document's viewer).
 */
export async function screenshot(
  page: Page,
  name: string,
  { checks = true }: { checks?: boolean } = {},
): Promise<void> {
  await page.screenshot({ path: join(ARTIFACTS, `${name}.png`), fullPage: true });
  if (checks) await expectAccessible(page, name);
}

/**
 * The open dialog, once its opening has finished: Angular writes its form's first values on the first
 * change detection, and text typed before that would be wiped.
 */
export async function openedDialog(page: Page): Promise<Locator> {
  await page.locator('mat-dialog-container.mdc-dialog--open').waitFor();
  return page.getByRole('dialog');
}

/**
 * Waits for a dialog to close after its form was sent; if it shows an error instead, fails with
 * the words it shows (a timeout alone says nothing about why the dialog stayed open).
 */
export async function dialogCloses(dialog: Locator): Promise<void> {
  const complaint = dialog.locator('[role=alert], mat-error').first();
  await Promise.race([
    dialog.waitFor({ state: 'detached' }),
    complaint.waitFor().then(async () => {
      throw new Error(`the dialog stayed open: ${await complaint.innerText()}`);
    }),
  ]);
}

/** One serious or critical axe-core finding, as a line a person can act on. */
export interface AccessibilityFinding {
  page: string;
  rule: string;
  impact: string;
  help: string;
  targets: string[];
}

const AXE_SOURCE = readFileSync(
  createRequire(import.meta.url).resolve('axe-core/axe.min.js'),
  'utf8',
);

/**
 * Runs axe-core (WCAG 2 A/AA rules and best practices) on the page as it stands and returns its serious and
 * critical findings, each with the first few elements it names; `label` says which page and width.
 */
export async function accessibilityFindings(
  page: Page,
  label: string,
): Promise<AccessibilityFinding[]> {
  // Evaluated through the browser's debugging protocol: the app's Content Security Policy rightly refuses
  // an injected <script>.
  await page.evaluate(AXE_SOURCE);
  const violations = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run(context: Document): Promise<AxeResults> } }).axe;
    interface AxeResults {
      violations: {
        id: string;
        impact: string | null;
        help: string;
        nodes: { target: string[] }[];
      }[];
    }
    const results = await axe.run(document);
    return results.violations.map((v) => ({
      id: v.id,
      impact: v.impact ?? '',
      help: v.help,
      targets: v.nodes.slice(0, 3).map((n) => n.target.join(' ')),
    }));
  });
  return violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => ({ page: label, rule: v.id, impact: v.impact, help: v.help, targets: v.targets }));
}

/** The findings as lines for a failed assertion: page, rule, what it asks, the elements it names. */
export function describeFindings(findings: AccessibilityFinding[]): string {
  return findings
    .map((f) => `${f.page}: [${f.impact}] ${f.rule} — ${f.help}\n    ${f.targets.join('\n    ')}`)
    .join('\n');
}

/** Fails with axe-core's words when the page as it stands has a serious or critical finding. */
export async function expectAccessible(page: Page, label: string): Promise<void> {
  const findings = await accessibilityFindings(page, label);
  if (findings.length > 0) throw new Error(`accessibility:\n${describeFindings(findings)}`);
}
