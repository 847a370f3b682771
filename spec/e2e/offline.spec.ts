/**
 * The app-shell service worker: after one visit on http://127.0.0.1 (a secure context), the
 * app still loads with the server gone — a reload and a deep link render from the worker's cache.
 * A server of its own, which the spec closes.
 */
import type { Page } from 'playwright-core';
import type { RunningServer } from '../../api/server';
import { newContext, newPage, startAppServer } from '../support/e2e-env';

/**
 * Waits until the worker controls the page and its app-shell cache holds every file of its
 * manifest's "app-shell" group (read from the worker's own store, so a rebuild of dist/ during
 * the run cannot confuse the check).
 */
async function shellCached(page: Page): Promise<void> {
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

describe('Offline reload of the app shell', () => {
  let server: RunningServer;

  beforeAll(async () => {
    server = await startAppServer();
  });

  afterAll(async () => {
    await server.close();
  });

  it('renders the landing page on a reload and a deep link after the server has stopped; a browser without the worker cannot', async () => {
    const base = server.url;
    const { context } = await newContext();
    const page = await context.newPage();
    await page.goto(base + '/');
    await page.getByRole('heading', { level: 1, name: 'Driftmark' }).waitFor();
    expect(await page.evaluate(() => window.isSecureContext)).toBeTrue();
    await shellCached(page);

    // A browser that never visited is served too while the server is up (the twin) …
    const fresh = await newPage({ serviceWorkers: 'block' });
    await fresh.page.goto(base + '/');
    await expectAsync(fresh.page.getByRole('heading', { level: 1, name: 'Driftmark' }).waitFor()).toBeResolved();

    await server.close();
    // … and not once it is gone.
    await expectAsync(fresh.page.reload()).toBeRejectedWithError(/ERR_CONNECTION_REFUSED/);
    await expectAsync(fetch(base + '/')).toBeRejected();

    await page.reload();
    await expectAsync(page.getByRole('heading', { level: 1, name: 'Driftmark' }).waitFor()).toBeResolved();
    await expectAsync(page.getByText(/survey the DC resistance of the\s+parts around each tube socket/).waitFor()).toBeResolved();
    await expectAsync(page.getByRole('heading', { name: 'Caution: this work can hurt you' }).waitFor()).toBeResolved();

    // A deep link to a lazy route also renders from the cache.
    await page.goto(base + '/calc');
    await expectAsync(page.getByRole('heading', { level: 1, name: 'Quick check' }).waitFor()).toBeResolved();
  });
});
