/**
 * Two tabs of one browser (shared localStorage, one refresh token) whose access tokens expire
 * together and then call the API at the same moment: the refresh is shared (a Web Lock and a
 * BroadcastChannel in the client, a grace window on the server), so neither tab is signed out.
 * A server of its own with the shortest access-token lifetime the config allows (10 s).
 */
import type { Page, Response } from 'playwright-core';
import type { RunningServer } from '../../api/server';
import { DEMO, newContext, signIn, startAppServer } from '../support/e2e-env';

const ACCESS_SECONDS = 10;

describe('Two tabs refreshing together', () => {
  let server: RunningServer;

  beforeAll(async () => {
    server = await startAppServer({ ACCESS_TOKEN_SECONDS: String(ACCESS_SECONDS) });
  });

  afterAll(async () => {
    await server.close();
  });

  it('keeps both tabs signed in and showing data when both call the API after the access token expired', async () => {
    const base = server.url;
    // No service worker here: it passes /api/ through anyway, and without it every exchange is
    // seen once, from the page.
    const { context, watch } = await newContext({ serviceWorkers: 'block' });
    const answers: { path: string; status: number }[] = [];
    context.on('response', (r: Response) => {
      const path = new URL(r.url()).pathname;
      if (path.startsWith('/api/')) answers.push({ path, status: r.status() });
    });
    const since = (n: number) => answers.slice(n);

    const a = await context.newPage();
    await signIn(a, DEMO.admin, undefined, base);
    await a.goto(base + '/admin/users');
    await a.getByRole('cell', { name: DEMO.student, exact: true }).waitFor();
    // The second tab opens after sign-in and starts from the shared refresh token.
    const b = await context.newPage();
    await b.goto(base + '/admin/users');
    await b.getByRole('cell', { name: DEMO.student, exact: true }).waitFor();

    const signedIn = async (p: Page) => {
      expect(new URL(p.url()).pathname).not.toBe('/sign-in');
      expect(await p.getByRole('button', { name: 'Sign out' }).count()).toBe(1);
      expect(await p.getByText('Your session has ended').count()).toBe(0);
    };

    // Round 1: in-app navigation in both tabs at once, both holding an expired access token.
    await a.waitForTimeout((ACCESS_SECONDS + 1.5) * 1000);
    let mark = answers.length;
    await Promise.all([
      a.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Settings' }).click(),
      b.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Settings' }).click(),
    ]);
    for (const p of [a, b]) {
      await expectAsync(p.getByRole('switch', { name: /may create an account/ }).waitFor()).toBeResolved();
      await signedIn(p);
    }
    let round = since(mark);
    // The expired tokens were refused, and refreshed — never refused a refresh.
    expect(round.filter((x) => x.path === '/api/admin/settings' && x.status === 401).length).toBeGreaterThanOrEqual(1);
    expect(round.filter((x) => x.path === '/api/auth/refresh' && x.status === 200).length).toBeGreaterThanOrEqual(1);
    expect(round.filter((x) => x.path === '/api/auth/refresh' && x.status !== 200)).toEqual([]);
    expect(round.filter((x) => x.path === '/api/admin/settings' && x.status === 200).length).toBe(2);

    // Round 2: both tabs reload at once (no access token in memory: both refresh at start).
    await a.waitForTimeout((ACCESS_SECONDS + 1.5) * 1000);
    mark = answers.length;
    await Promise.all([a.goto(base + '/admin/users'), b.goto(base + '/admin/users')]);
    for (const p of [a, b]) {
      await expectAsync(p.getByRole('cell', { name: DEMO.student, exact: true }).waitFor()).toBeResolved();
      await signedIn(p);
    }
    round = since(mark);
    expect(round.filter((x) => x.path === '/api/auth/refresh' && x.status === 200).length).toBeGreaterThanOrEqual(1);
    expect(round.filter((x) => x.path === '/api/auth/refresh' && x.status !== 200)).toEqual([]);

    // The shared refresh token is still live on the server (its family was not revoked).
    const stored = await a.evaluate(() => localStorage.getItem('driftmark.refreshToken'));
    expect(stored).toEqual(await b.evaluate(() => localStorage.getItem('driftmark.refreshToken')));
    const r = await a.request.post(base + '/api/auth/refresh', { data: { refreshToken: stored } });
    expect(r.status()).toBe(200);
    expect(watch.consoleErrors.filter((e) => !/status of 401/.test(e))).toEqual([]);
  }, 120_000);

  it('signs a tab out when its refresh token was revoked elsewhere: the refusal twin', async () => {
    const base = server.url;
    const { context } = await newContext({ serviceWorkers: 'block' });
    const a = await context.newPage();
    await signIn(a, DEMO.admin, undefined, base);
    await a.goto(base + '/admin/users');
    await a.getByRole('cell', { name: DEMO.student, exact: true }).waitFor();
    const stored = await a.evaluate(() => localStorage.getItem('driftmark.refreshToken'));
    // Sign-out from another client revokes the family.
    const out = await a.request.post(base + '/api/auth/sign-out', { data: { refreshToken: stored } });
    expect(out.status()).toBe(204);
    await a.waitForTimeout((ACCESS_SECONDS + 1.5) * 1000);
    await a.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Settings' }).click();
    await a.waitForURL(/\/sign-in(\?|$)/);
    await expectAsync(a.getByRole('status').filter({ hasText: 'Your session has ended' }).waitFor()).toBeResolved();
  }, 90_000);
});
