/**
 * The app-shell service worker: after one visit on http://127.0.0.1 (a secure context), the
 * app still loads with the server gone — a reload and a deep link render from the worker's cache.
 * A server of its own, which the spec closes.
 */
import type { RunningServer } from '../../api/server';
import { newContext, newPage, shellCached, startAppServer } from '../support/e2e-env';

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
