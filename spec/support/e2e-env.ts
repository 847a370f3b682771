/**
 * The end-to-end specs' shared environment: the real server (api/server.ts startServer) serving
 * the built app (dist/driftmark/browser) and the API on the test cluster's database
 * (DATABASE_URL, set by `npm test -- e2e`), the in-process mail fake, the demo accounts, and one
 * Debian Chromium driven through playwright-core. spec/support/e2e-global.ts starts and stops it.
 *
 * Specs own their rows: every user they make has a unique e-mail; the demo accounts are only
 * signed in with, never changed.
 */
import { randomBytes } from 'node:crypto';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import bcrypt from 'bcrypt';
import { chromium, type Browser, type BrowserContext, type BrowserContextOptions, type Page } from 'playwright-core';
import { loadConfig } from '../../api/config';
import { createDatabase, type Database } from '../../api/db';
import { startMailFake, type CapturedMail, type MailFake } from '../../api/mail/mail-fake';
import { startServer, type RunningServer } from '../../api/server';
import { APP_DIST } from '../../scripts/app-build';
import { DEMO_PASSWORD, seedDemo } from '../../seeds/seed';
import { users, type Role } from '../../schema/index';

export { DEMO_PASSWORD };
export const DEMO = {
  admin: 'admin@driftmark.example',
  author: 'author@driftmark.example',
  tech: 'tech@driftmark.example',
  instructor: 'instructor@driftmark.example',
  student: 'student@driftmark.example',
} as const;

export const CHROMIUM_PATH = '/usr/bin/chromium';
export const SHOTS_DIR = '/tmp/e2e-shots';

/** The settings every e2e server starts with (more per server through `startAppServer(extra)`). */
export const E2E_SERVER_ENV: NodeJS.ProcessEnv = {
  NODE_ENV: 'test',
  BCRYPT_COST: '10',
  SIGN_IN_SLOW_STEP_MS: '0',
  // Every browser signs in from 127.0.0.1: the per-address limit must not trip across specs.
  SIGN_IN_IP_LIMIT: '1000',
};

export interface E2eEnv {
  /** The main server, e.g. http://127.0.0.1:41234 (no trailing slash). */
  baseUrl: string;
  server: RunningServer;
  mail: MailFake;
  database: Database;
  databaseUrl: string;
  browser: Browser;
}

let env: E2eEnv | null = null;
const extraServers: RunningServer[] = [];
const dataDirs: string[] = [];
let openContexts: BrowserContext[] = [];

/** The running environment (inside specs; started by the global beforeAll). */
export function e2e(): E2eEnv {
  if (!env) throw new Error('The e2e environment is not started: run the specs through `npm test -- e2e` (spec/support/e2e-global.ts).');
  return env;
}

/**
 * A port free on 127.0.0.1 right now. The main server listens on a port chosen here rather than
 * PORT=0: with PORT=0 the API builds its mail links from the configured port before listening,
 * so they point at port 0 (see the pending spec in spec/e2e/mail.spec.ts).
 */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

/**
 * Starts another real server on the same database and mail fake (e.g. with a short access-token
 * lifetime, or one a spec stops to take the server away). Closed in afterAll unless closed first.
 */
export async function startAppServer(extra: NodeJS.ProcessEnv = {}, port: number | 0 = 0): Promise<RunningServer> {
  const { mail, databaseUrl } = env ?? { mail: mailFake!, databaseUrl: process.env.DATABASE_URL! };
  const dataDir = mkdtempSync(join(tmpdir(), 'driftmark-e2e-data-'));
  dataDirs.push(dataDir);
  const config = loadConfig({ ...E2E_SERVER_ENV, PORT: String(port), ...extra }, { dataDir, appDistDir: APP_DIST });
  const running = await startServer({ config, databaseUrl, smtpUrl: mail.url });
  const server: RunningServer = {
    ...running,
    close: () => {
      const i = extraServers.indexOf(server);
      if (i >= 0) extraServers.splice(i, 1);
      return running.close();
    },
  };
  extraServers.push(server);
  return server;
}

let mailFake: MailFake | null = null;

export async function startE2e(): Promise<E2eEnv> {
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error('DATABASE_URL is not set: run the end-to-end specs through `npm test -- e2e`.');
  mkdirSync(SHOTS_DIR, { recursive: true });
  mailFake = await startMailFake();
  const database = createDatabase(databaseUrl, { max: 5 });
  await seedDemo(database.db, { NODE_ENV: 'test' });
  const server = await startAppServer({}, await freePort());
  extraServers.splice(extraServers.indexOf(server), 1); // the main server is closed last, by stopE2e
  const browser = await chromium.launch({
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: [
      '--disable-gpu',
      '--disable-dev-shm-usage',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--disable-quic',
      '--no-first-run',
    ],
  });
  env = { baseUrl: server.url, server, mail: mailFake, database, databaseUrl, browser };
  return env;
}

export async function stopE2e(): Promise<void> {
  const e = env;
  env = null;
  await closeContexts();
  for (const s of extraServers.splice(0)) await s.close().catch(() => undefined);
  if (e) {
    await e.browser.close().catch(() => undefined);
    await e.server.close().catch(() => undefined);
    await e.database.close().catch(() => undefined);
  }
  await mailFake?.close().catch(() => undefined);
  mailFake = null;
  for (const d of dataDirs.splice(0)) rmSync(d, { recursive: true, force: true });
}

/** Closes the browser contexts the last spec opened (the global afterEach calls it). */
export async function closeContexts(): Promise<void> {
  const list = openContexts;
  openContexts = [];
  for (const c of list) await c.close().catch(() => undefined);
}

/** What a watched page did that a spec may assert on. */
export interface PageWatch {
  /** Every request URL, in order. */
  requests: string[];
  /** Requests whose host is not 127.0.0.1 (data: and blob: URLs are not requests off the machine). */
  foreign: string[];
  consoleErrors: string[];
  pageErrors: string[];
  /** `securitypolicyviolation` events: "directive blocked-uri". */
  csp: string[];
  /** Responses with status ≥ 400 and failed requests (not aborted ones): "STATUS METHOD URL". */
  failures: string[];
}

/**
 * A fresh, isolated browser context (own storage, own service worker), with a CSP-violation
 * listener in every page and closed after the spec. `watch` lists what all its pages did.
 */
export async function newContext(options: BrowserContextOptions = {}): Promise<{ context: BrowserContext; watch: PageWatch }> {
  const context = await e2e().browser.newContext({ viewport: { width: 1280, height: 800 }, ...options });
  openContexts.push(context);
  // Fail a wait well inside jasmine's 60 s, with Playwright's own account of what it waited for.
  context.setDefaultTimeout(15_000);
  const watch: PageWatch = { requests: [], foreign: [], consoleErrors: [], pageErrors: [], csp: [], failures: [] };
  await context.exposeBinding('__driftmarkCspViolation', (_source, line: string) => void watch.csp.push(line));
  await context.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => {
      (globalThis as unknown as { __driftmarkCspViolation(s: string): void }).__driftmarkCspViolation(
        `${e.effectiveDirective} ${e.blockedURI} at ${e.sourceFile}:${e.lineNumber}`,
      );
    });
  });
  context.on('request', (req) => {
    const url = req.url();
    watch.requests.push(url);
    if (!/^(data|blob):/.test(url) && new URL(url).hostname !== '127.0.0.1') watch.foreign.push(url);
  });
  context.on('response', (res) => {
    if (res.status() >= 400) watch.failures.push(`${res.status()} ${res.request().method()} ${res.url()}`);
  });
  context.on('requestfailed', (req) => {
    const why = req.failure()?.errorText ?? '';
    // ERR_ABORTED: a navigation cancelled the request, or (seen with the app's service worker in
    // control) the page's side of a request the worker then made itself and answered.
    if (!why.includes('ERR_ABORTED')) watch.failures.push(`failed(${why}) ${req.method()} ${req.url()}`);
  });
  context.on('console', (msg) => {
    if (msg.type() === 'error') watch.consoleErrors.push(`${msg.text()} (${msg.location().url})`);
  });
  context.on('weberror', (err) => watch.pageErrors.push(String(err.error())));
  return { context, watch };
}

/** A new page in a new isolated context. */
export async function newPage(options: BrowserContextOptions = {}): Promise<{ page: Page; context: BrowserContext; watch: PageWatch }> {
  const { context, watch } = await newContext(options);
  const page = await context.newPage();
  return { page, context, watch };
}

/** The main server's URL for a path. */
export const url = (path: string, base = e2e().baseUrl): string => base + path;

/** Signs in through the sign-in form (the page goes to /sign-in first). Does not wait for the outcome. */
export async function fillSignIn(page: Page, email: string, password: string, base = e2e().baseUrl): Promise<void> {
  await page.goto(base + '/sign-in');
  await page.getByRole('heading', { name: 'Sign in', level: 1 }).waitFor();
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('main').getByRole('button', { name: 'Sign in' }).click();
}

/** Signs in through the form and waits for the home page. */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD, base = e2e().baseUrl): Promise<void> {
  await fillSignIn(page, email, password, base);
  await page.waitForURL(base + '/home');
  await page.getByRole('heading', { name: /^Welcome, / }).waitFor();
}

export interface ApiSession {
  accessToken: string;
  refreshToken: string;
  user: { id: number; email: string; name: string; roles: Role[] };
}

/** Signs in through the API (not the browser) — for setting a scene, never for what is tested. */
export async function apiSignIn(email: string, password = DEMO_PASSWORD, base = e2e().baseUrl): Promise<ApiSession> {
  const r = await fetch(base + '/api/auth/sign-in', {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  if (r.status !== 200) throw new Error(`API sign-in of ${email} answered ${r.status}: ${await r.text()}`);
  return (await r.json()) as ApiSession;
}

export const uniqueEmail = (label = 'user'): string => `${label}-${randomBytes(4).toString('hex')}@e2e.example`;

/** A user made directly in the database (a spec's own row), with a known password. */
export async function makeUser(roles: Role[], password: string, opts: { name?: string; email?: string } = {}) {
  const passwordHash = await bcrypt.hash(password, 10);
  const [u] = await e2e()
    .database.db.insert(users)
    .values({ email: opts.email ?? uniqueEmail(roles[0] ?? 'nobody'), name: opts.name ?? `E2E ${roles.join(' and ')}`, passwordHash, roles })
    .returning();
  return u;
}

/** The first http(s) link in a captured mail. */
export function linkIn(mail: CapturedMail): URL {
  const m = /https?:\/\/[^\s<>"]+/.exec(mail.text);
  if (!m) throw new Error(`no link in the mail "${mail.subject}": ${mail.text}`);
  return new URL(m[0]);
}

/** A screenshot into /tmp/e2e-shots (not committed), full page. */
export async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(SHOTS_DIR, `${name}.png`), fullPage: true });
}

/**
 * Waits until the worker controls the page and its app-shell cache holds every file of its
 * manifest's "app-shell" group (read from the worker's own store, so a rebuild of dist/ during
 * the run cannot confuse the check).
 */
export async function shellCached(page: Page): Promise<void> {
  const end = Date.now() + 45_000;
  let missing: string[] = ['(not checked)'];
  while (Date.now() < end) {
    // page.evaluate awaits the promise (waitForFunction would take the pending promise as truthy).
    missing = await page.evaluate(async () => {
      if (!navigator.serviceWorker?.controller) return ['(no controlling worker)'];
      const state = await fetch('/ngsw/state').then((r) => r.text(), () => '');
      const hash = /Latest manifest hash: ([0-9a-f]{40})/.exec(state)?.[1];
      if (!hash || !state.includes(`=== Version ${hash} ===`)) return ['(no version)'];
      const control = await (await caches.open('ngsw:/:db:control')).match('/manifests');
      const manifests = control ? ((await control.json()) as Record<string, { assetGroups?: { name: string; urls: string[] }[] }>) : {};
      const urls = manifests[hash]?.assetGroups?.find((g) => g.name === 'app-shell')?.urls ?? [];
      if (urls.length < 3) return ['(no app-shell group in the manifest)'];
      const name = (await caches.keys()).find((n) => n.endsWith(`${hash}:assets:app-shell:cache`));
      if (!name) return ['(no app-shell cache)'];
      const cached = new Set((await (await caches.open(name)).keys()).map((req) => new URL(req.url).pathname));
      return urls.filter((u) => !cached.has(u));
    });
    if (missing.length === 0) return;
    await page.waitForTimeout(250);
  }
  throw new Error(`the service worker did not cache the app shell; missing: ${missing.join(', ')}`);
}
