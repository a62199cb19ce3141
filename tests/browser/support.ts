// Shared pieces of the browser tests: Debian's chromium driven by playwright-core against the
// static web export (dist/) served by a real Fluxwright server on a throwaway database.
import { existsSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { startTestServer, type TestServer } from '../support/testServer';

export const ROOT = path.resolve(__dirname, '..', '..');
export const DIST = path.join(ROOT, 'dist');
export const SCREENSHOT_DIR = path.join(ROOT, 'test-artifacts', 'screenshots');

export const PHONE = { width: 390, height: 844 } as const;
export const WIDE = { width: 1440, height: 900 } as const;

// Seeded demo accounts (notes/api-foundation.md; printed by npm start).
export const DEMO = {
  lab_lead: { email: 'lead@demo.fluxwright.test', password: 'demo-lead-2026', name: 'Mira Okonkwo-Lind', label: 'Lab lead' },
  device_engineer: { email: 'engineer@demo.fluxwright.test', password: 'demo-engineer-2026', name: 'Tomas Vireo', label: 'Device engineer' },
  experimentalist: { email: 'experimentalist@demo.fluxwright.test', password: 'demo-exp-2026', name: 'Asha Pellworth', label: 'Experimentalist' },
} as const;
export type DemoRole = keyof typeof DEMO;

export const SESSION_KEY = 'fluxwright.session.v1';

/** The tests need the export; building it inside a test would take minutes on two cores. */
export function requireExport(): string {
  if (!existsSync(path.join(DIST, 'index.html')) || !existsSync(path.join(DIST, 'sign-in.html'))) {
    throw new Error(`no web export in ${DIST}: run \`npm run web:export\` (expo export --platform web) before the browser tests`);
  }
  return DIST;
}

export async function launchChromium(): Promise<Browser> {
  // launch() gives every run a fresh temporary profile (Playwright creates and removes the user-data-dir).
  return chromium.launch({
    executablePath: process.env.FW_CHROMIUM || '/usr/bin/chromium',
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
  });
}

export interface Tracked {
  context: BrowserContext;
  page: Page;
  /** Uncaught page errors and console errors seen so far. */
  errors: string[];
  /** Every request URL the page made. */
  requests: string[];
}

export async function openPage(browser: Browser, viewport: { width: number; height: number }): Promise<Tracked> {
  const context = await browser.newContext({ viewport });
  const page = await context.newPage();
  page.setDefaultTimeout(30_000);
  const errors: string[] = [];
  const requests: string[] = [];
  page.on('pageerror', (e) => errors.push(`pageerror: ${e.message}`));
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(`console: ${m.text()}`);
  });
  page.on('request', (r) => requests.push(r.url()));
  return { context, page, errors, requests };
}

export async function signInThroughUi(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(password);
  await page.getByTestId('sign-in-submit').click();
  await page.waitForURL((u) => u.pathname.startsWith('/devices'));
  await page.getByTestId('shell-role').waitFor();
}

export async function sessionToken(page: Page): Promise<string> {
  const raw = await page.evaluate((k) => window.localStorage.getItem(k), SESSION_KEY);
  if (!raw) throw new Error(`no ${SESSION_KEY} in localStorage: the UI did not keep a session`);
  return (JSON.parse(raw) as { token: string }).token;
}

export async function horizontalOverflow(page: Page): Promise<{ scrollWidth: number; innerWidth: number }> {
  return page.evaluate(() => ({ scrollWidth: document.documentElement.scrollWidth, innerWidth: window.innerWidth }));
}

export async function shot(page: Page, name: string): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const vp = page.viewportSize();
  const file = path.join(SCREENSHOT_DIR, `${name}-${vp?.width}x${vp?.height}.png`);
  // Let fonts and the last query settle so the picture shows the finished screen.
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  await page.waitForTimeout(250);
  await page.screenshot({ path: file });
  return file;
}

/** First URL in the message text that points at the given path of the app. */
export function linkIn(text: string, pathname: string): string {
  const urls = text.match(/https?:\/\/[^\s<>"')]+/g) ?? [];
  const hit = urls.find((u) => new URL(u).pathname === pathname);
  if (!hit) throw new Error(`no ${pathname} link in the e-mail; links found: ${JSON.stringify(urls)}`);
  return hit;
}

/**
 * Registers the usual beforeAll/afterAll of a browser test file: a seeded test server over the web
 * export and one headless Chromium, handed to `use` once started, both closed after the file.
 */
export function demoSite(use: (server: TestServer, browser: Browser) => void): void {
  let server: TestServer | undefined;
  let browser: Browser | undefined;
  beforeAll(async () => {
    server = await startTestServer({ seedDemo: true, staticDir: requireExport() });
    browser = await launchChromium();
    use(server, browser);
  });
  afterAll(async () => {
    await browser?.close();
    // Fit jobs run on a worker pool that outlives the HTTP server unless closed.
    await (server?.app.locals.jobs as { close?: () => Promise<void> } | undefined)?.close?.();
    await server?.close();
  });
}
