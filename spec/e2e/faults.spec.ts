/**
 * Faults under a survey in Chromium (issue #7): PostgreSQL stopped mid-survey while the API stays
 * up, and the API process killed (SIGKILL, not a graceful stop) while readings wait. The browser
 * keeps what was typed across a reload of the tab; when the database and the process return,
 * every reading arrives once, in order.
 *
 * Both cases run on a private PostgreSQL cluster of this spec's own (stopping the shared spec
 * cluster would take the other specs' database away) and an API of their own in a child process
 * (`node api/server.ts`), so that it can be killed for real. The API's JWT secret is fixed, so a
 * session outlives the restart, as in production.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { createDatabase } from '../../api/db';
import { portInUse, PROJECT_ROOT, startCluster, stopCluster, type Cluster } from '../../scripts/cluster';
import { runMigrations } from '../../scripts/migrate';
import { seedDemo } from '../../seeds/seed';
import { apiSignIn, DEMO, e2e, freePort, newContext, shellCached, signIn } from '../support/e2e-env';

const JWT_SECRET = 'faults-spec-secret-faults-spec-secret-0123456789';

/** The API as a process of its own on the private cluster, listening on `port`. */
class ApiProcess {
  private child: ChildProcess | null = null;
  private output = '';

  constructor(
    readonly port: number,
    private readonly databaseUrl: string,
    private readonly dataDir: string,
  ) {}

  get base(): string {
    return `http://127.0.0.1:${this.port}`;
  }

  async start(): Promise<void> {
    const child = spawn(process.execPath, ['--import', 'tsx', join(PROJECT_ROOT, 'api', 'server.ts')], {
      cwd: PROJECT_ROOT,
      env: {
        ...process.env,
        NODE_ENV: 'test',
        PORT: String(this.port),
        DATABASE_URL: this.databaseUrl,
        SMTP_URL: e2e().mail.url,
        JWT_SECRET,
        DRIFTMARK_DATA_DIR: this.dataDir,
        BCRYPT_COST: '10',
        SIGN_IN_SLOW_STEP_MS: '0',
        SIGN_IN_IP_LIMIT: '1000',
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    this.child = child;
    child.stdout!.on('data', (d: Buffer) => (this.output += d.toString()));
    child.stderr!.on('data', (d: Buffer) => (this.output += d.toString()));
    const end = Date.now() + 45_000;
    while (Date.now() < end) {
      if (child.exitCode !== null) throw new Error(`the API process exited (${child.exitCode}): ${this.output}`);
      if (/listening on/i.test(this.output)) return;
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error(`the API process did not start listening: ${this.output}`);
  }

  /** SIGKILL: no shutdown handler runs, open connections are cut. */
  async kill(): Promise<void> {
    const child = this.child;
    this.child = null;
    if (!child || child.exitCode !== null || child.signalCode !== null) return;
    const gone = new Promise<void>((r) => child.once('exit', () => r()));
    child.kill('SIGKILL');
    await gone;
  }

  /** The process is still running (it did not crash). */
  alive(): boolean {
    return this.child !== null && this.child.exitCode === null && this.child.signalCode === null;
  }
}

async function setAndSurvey(base: string, label: string): Promise<number> {
  const s = await apiSignIn(DEMO.tech, undefined, base);
  const headers = { 'content-type': 'application/json', authorization: `Bearer ${s.accessToken}` };
  const lib = (await (await fetch(`${base}/api/templates?q=QA-10`, { headers })).json()) as { items: { id: number; model: string }[] };
  const template = lib.items.find((t) => t.model === 'QA-10')!;
  const set = await fetch(`${base}/api/sets`, { method: 'POST', headers, body: JSON.stringify({ templateId: template.id, label, serial: 'E2E-F' }) });
  expect(set.status).withContext(await set.clone().text()).toBe(201);
  const setId = ((await set.json()) as { id: number }).id;
  const survey = await fetch(`${base}/api/sets/${setId}/surveys`, { method: 'POST', headers, body: JSON.stringify({ purpose: 'intake' }) });
  expect(survey.status).withContext(await survey.clone().text()).toBe(201);
  return ((await survey.json()) as { survey: { id: number } }).survey.id;
}

async function storedReadings(base: string, surveyId: number): Promise<{ testPointKey: string; text: string }[]> {
  const s = await apiSignIn(DEMO.tech, undefined, base);
  const r = await fetch(`${base}/api/surveys/${surveyId}`, { headers: { authorization: `Bearer ${s.accessToken}` } });
  expect(r.status).toBe(200);
  return ((await r.json()) as { readings: { testPointKey: string; text: string }[] }).readings;
}

const inputs = (page: Page) => page.locator('input.reading-input');

/** Types each reading into the focused row and moves on with Enter. */
async function typeReadings(page: Page, texts: string[]): Promise<void> {
  for (const text of texts) {
    await page.keyboard.type(text);
    await page.keyboard.press('Enter');
  }
}

/** Focuses the row of a test point. */
const focusRow = (page: Page, key: string) => page.locator(`input.reading-input[data-key="${key}"]`).focus();

/** Waits for "N writes wait" (N ≥ 1). */
const waiting = (page: Page, n: number) =>
  page.locator('[data-test="waiting"]').getByText(`${n} ${n === 1 ? 'write waits' : 'writes wait'}`).waitFor();

/** No snackbar or dialog took the page over: a wait is shown in place, never as an error to dismiss. */
async function noErrorPopups(page: Page): Promise<void> {
  expect(await page.locator('mat-snack-bar-container, mat-dialog-container, [role="alertdialog"]').count()).toBe(0);
}

const row = (page: Page, key: string) => page.locator('tr', { has: page.locator(`input.reading-input[data-key="${key}"]`) });

/** The readings shown in the rows of these test points (the row's current value). */
const shownValues = (page: Page, keys: string[]) =>
  Promise.all(keys.map(async (k) => (await row(page, k).locator('[data-test="current"]').innerText()).trim()));

/** How many of these rows carry the "waiting" mark (kept in the browser, not confirmed by the API). */
const waitingMarks = async (page: Page, keys: string[]) =>
  (await Promise.all(keys.map((k) => row(page, k).locator('[data-mark="waiting"]').count()))).reduce((a, b) => a + b, 0);

describe('Faults under a survey (private PostgreSQL, API in a process of its own)', () => {
  let cluster: Cluster;
  let dataDir: string;
  let api: ApiProcess;

  const startPg = () => startCluster({ dataDir, port: cluster.port, throwaway: true, log: () => undefined });

  beforeAll(async () => {
    dataDir = mkdtempSync(join(tmpdir(), 'driftmark-faults-'));
    let port = Number(process.env.DRIFTMARK_FAULTS_PG_PORT || 15460);
    while (await portInUse(port)) port++;
    cluster = await startCluster({ dataDir, port, throwaway: true, log: () => undefined });
    await runMigrations(cluster.url);
    const database = createDatabase(cluster.url, { max: 2 });
    try {
      await seedDemo(database.db, { NODE_ENV: 'test' });
    } finally {
      await database.close();
    }
    api = new ApiProcess(await freePort(), cluster.url, join(dataDir, 'app'));
    await api.start();
  }, 120_000);

  afterAll(async () => {
    await api?.kill();
    if (cluster) stopCluster(cluster, 'immediate');
    if (dataDir) rmSync(dataDir, { recursive: true, force: true });
  }, 30_000);

  it('PostgreSQL stopped mid-survey: the API answers 503 with the error shape, the readings wait across a reload, and arrive once, in order, when it returns (no API restart)', async () => {
    const base = api.base;
    const surveyId = await setAndSurvey(base, 'E2E faults: database');
    const { context, watch } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.tech, undefined, base);
    await page.goto(`${base}/surveys/${surveyId}`);
    await inputs(page).first().waitFor();
    await shellCached(page);
    const keys = await inputs(page).evaluateAll((els) => els.map((e) => e.getAttribute('data-key')!));

    // The twin: with the database up, a reading is stored at once.
    await focusRow(page, keys[0]);
    await typeReadings(page, ['1k']);
    await page.locator(`tr:has(input[data-key="${keys[0]}"]) [data-mark="confirmed"]`).waitFor();
    expect((await storedReadings(base, surveyId)).map((r) => r.text)).toEqual(['1k']);

    stopCluster(cluster, 'fast');
    // The API stays up and says what is wrong, in the error shape, without crashing.
    const signInDown = await fetch(`${base}/api/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: DEMO.tech, password: 'whatever-password' }),
    });
    expect(signInDown.status).toBe(503);
    expect(signInDown.headers.get('retry-after')).toBe('5');
    expect(((await signInDown.json()) as { error: { code: string; message: string } }).error.code).toBe('database-unavailable');
    const health = await fetch(`${base}/api/health`);
    expect(health.status).toBe(503);
    expect(await health.json()).toEqual({ status: 'degraded', database: 'down' });

    await focusRow(page, keys[1]);
    await typeReadings(page, ['2k2', '3k3', '4k7']);
    await waiting(page, 3);
    await page.locator('[data-test="offline"]').waitFor();
    expect(await shownValues(page, keys.slice(1, 4))).toEqual(['2k2', '3k3', '4k7']);
    expect(await waitingMarks(page, keys.slice(1, 4))).toBe(3);
    await noErrorPopups(page);
    // The saves the browser tried were answered 503 by a live API, not refused as wrong.
    expect(watch.failures.some((f) => f.startsWith(`503 POST ${base}/api/surveys/${surveyId}/readings`))).toBeTrue();
    expect(watch.failures.filter((f) => /^4\d\d POST .*\/readings/.test(f))).toEqual([]);

    // A reload while the database is down: the survey and its waiting readings from this browser.
    await page.reload();
    await inputs(page).first().waitFor();
    await waiting(page, 3);
    await page.locator('[data-test="offline"]').waitFor();
    expect(await shownValues(page, keys.slice(0, 4))).toEqual(['1k', '2k2', '3k3', '4k7']);
    expect(await waitingMarks(page, keys.slice(0, 4))).toBe(3);
    await noErrorPopups(page);
    expect(api.alive()).toBeTrue();

    // The database returns; the same API process reconnects, and the sender's next retry sends them.
    await startPg();
    await page.locator('[data-test="waiting"]').waitFor({ state: 'detached', timeout: 45_000 });
    expect(api.alive()).toBeTrue();
    const stored = await storedReadings(base, surveyId);
    expect(stored.map((r) => r.text)).toEqual(['1k', '2k2', '3k3', '4k7']);
    expect(stored.map((r) => r.testPointKey)).toEqual(keys.slice(0, 4));
    expect((await fetch(`${base}/api/health`)).status).toBe(200);
    expect(watch.pageErrors).toEqual([]);
  }, 150_000);

  it('the API process killed (SIGKILL) while readings wait: kept across a reload, and each arrives once, in order, when PostgreSQL and the API are both back', async () => {
    const base = api.base;
    const surveyId = await setAndSurvey(base, 'E2E faults: process');
    const { context, watch } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.tech, undefined, base);
    await page.goto(`${base}/surveys/${surveyId}`);
    await inputs(page).first().waitFor();
    await shellCached(page);
    const keys = await inputs(page).evaluateAll((els) => els.map((e) => e.getAttribute('data-key')!));

    // Readings wait on a database that is down …
    stopCluster(cluster, 'fast');
    await focusRow(page, keys[0]);
    await typeReadings(page, ['10', '22']);
    await waiting(page, 2);
    // … when the API process is killed outright, and more are typed with it gone.
    await api.kill();
    await typeReadings(page, ['33', '47']);
    await waiting(page, 4);
    await noErrorPopups(page);

    await page.reload();
    await inputs(page).first().waitFor();
    await waiting(page, 4);
    await page.locator('[data-test="offline"]').waitFor();
    expect(await shownValues(page, keys.slice(0, 4))).toEqual(['10', '22', '33', '47']);
    expect(await waitingMarks(page, keys.slice(0, 4))).toBe(4);

    // PostgreSQL alone back: nothing can arrive yet, nothing is lost.
    await startPg();
    await focusRow(page, keys[4]);
    await typeReadings(page, ['56']);
    await waiting(page, 5);

    await api.start();
    await page.locator('[data-test="waiting"]').waitFor({ state: 'detached', timeout: 45_000 });
    const stored = await storedReadings(base, surveyId);
    expect(stored.map((r) => r.text)).toEqual(['10', '22', '33', '47', '56']);
    expect(stored.map((r) => r.testPointKey)).toEqual(keys.slice(0, 5));
    await row(page, keys[4]).locator('[data-mark="confirmed"]').waitFor();
    expect(await waitingMarks(page, keys.slice(0, 5))).toBe(0);
    await noErrorPopups(page);
    expect(watch.pageErrors).toEqual([]);
  }, 150_000);
});
