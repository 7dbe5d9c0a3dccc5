/**
 * Shared pieces of the browser tests: Debian's Chromium through playwright-core, a real server
 * on a free port with a throw-away data folder, and signing in through the UI.
 */
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll } from 'vitest';
import { start, type ServerHandle, type StartOptions } from '../../server/index';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));

/** Password of the seeded demo accounts (server/config.ts DEFAULT_DEMO_PASSWORD). */
export const DEMO_PASSWORD = 'aftercue-demo';

/** A 1366x768 laptop screen: the size the client is designed for. */
export const LAPTOP_VIEWPORT = { width: 1366, height: 768 };

export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.AFTERCUE_CHROMIUM ?? '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
      '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
}

export interface TestServer {
  url: string;
  handle: ServerHandle;
  stop(): Promise<void>;
}

/**
 * Start Aftercue on port 0 with a fresh data folder (seeded demo accounts); stop removes the
 * folder. `options` adds start options (e.g. the embedded simulator's speed).
 */
export async function startTestServer(options: Omit<StartOptions, 'port' | 'dataDir'> = {}): Promise<TestServer> {
  const dataDir = mkdtempSync(join(tmpdir(), 'aftercue-e2e-'));
  const handle = await start({ quiet: true, ...options, port: 0, dataDir });
  return {
    url: handle.url,
    handle,
    async stop() {
      await handle.stop();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

/** A fresh browser context (own cookies) at laptop size, with browser console errors collected. */
export async function newPage(browser: Browser): Promise<{ context: BrowserContext; page: Page; consoleErrors: string[] }> {
  const context = await browser.newContext({ viewport: LAPTOP_VIEWPORT });
  const page = await context.newPage();
  const consoleErrors: string[] = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(msg.text());
  });
  page.on('pageerror', (err) => consoleErrors.push(err.message));
  return { context, page, consoleErrors };
}

/** Sign in through the sign-in form, starting from `path` (the guard sends us to sign-in first). */
export async function signInThroughUi(page: Page, baseUrl: string, email: string, path = '/studies'): Promise<void> {
  await page.goto(`${baseUrl}${path}`);
  await page.waitForURL(/\/sign-in\?redirect=/);
  await page.locator('input[name="email"]').fill(email);
  await page.locator('input[name="password"]').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => u.pathname === path);
}

/** A page of its own (see newPage). */
export type TestPage = Awaited<ReturnType<typeof newPage>>;

/** What a browser-test file works with: its server, its browser, and fresh pages in them. */
export interface BrowserTestEnv {
  readonly server: TestServer;
  readonly browser: Browser;
  /** The server's base URL. */
  readonly url: string;
  /** A fresh context and page (newPage). */
  newPage(): Promise<TestPage>;
  /** A fresh context and page, signed in as `email` through the UI and left at `path`. */
  signedInPage(email: string, path?: string): Promise<TestPage>;
}

/**
 * The set-up every browser-test file shares, registered in the calling describe: before its tests
 * a server (startTestServer with `options`) and a browser start; after them both stop.
 */
export function useBrowserTestEnv(options: Omit<StartOptions, 'port' | 'dataDir'> = {}): BrowserTestEnv {
  let server: TestServer | undefined;
  let browser: Browser | undefined;

  beforeAll(async () => {
    server = await startTestServer(options);
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });

  const env: BrowserTestEnv = {
    get server() {
      if (!server) throw new Error('The test server has not started');
      return server;
    },
    get browser() {
      if (!browser) throw new Error('The browser has not started');
      return browser;
    },
    get url() {
      return env.server.url;
    },
    newPage: () => newPage(env.browser),
    async signedInPage(email, path = '/studies') {
      const opened = await newPage(env.browser);
      await signInThroughUi(opened.page, env.url, email, path);
      return opened;
    },
  };
  return env;
}

/** Where a test saves a screenshot: test-results/e2e/<name>.png (folder created). */
export function screenshotPath(name: string): string {
  const file = join(ROOT, 'test-results', 'e2e', `${name}.png`);
  mkdirSync(dirname(file), { recursive: true });
  return file;
}
