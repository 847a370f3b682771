/**
 * Every route of the app, as the user it is for, loaded as a deep link (a full page load: the
 * server answers the app shell for any HTML GET) and reloaded, its lazy chunks included — with
 * no request leaving 127.0.0.1, no console error, no uncaught error and no CSP violation.
 */
import type { Page } from 'playwright-core';
import { DEMO, apiSignIn, e2e, linkIn, makeUser, newPage, shot, signIn, uniqueEmail, type PageWatch } from '../support/e2e-env';

async function api(path: string, token: string, method = 'GET', body?: unknown): Promise<Response> {
  return fetch(e2e().baseUrl + path, {
    method,
    headers: { authorization: `Bearer ${token}`, ...(body ? { 'content-type': 'application/json' } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });
}

/** Loads `path` as a deep link and waits for its page heading. */
async function visit(page: Page, path: string, heading: string | RegExp, title: string | RegExp): Promise<void> {
  await page.goto(e2e().baseUrl + path);
  await expectAsync(page.getByRole('heading', { level: 1, name: heading }).waitFor()).toBeResolved();
  await page.waitForFunction((t) => (typeof t === 'string' ? document.title === t : new RegExp(t).test(document.title)), typeof title === 'string' ? title : title.source);
  expect(await page.title()).toMatch(title);
}

const chunks = (watch: PageWatch) => new Set(watch.requests.filter((u) => /\/chunk-[A-Z0-9]+\.js$/.test(u)));

function expectClean(watch: PageWatch, who: string): void {
  expect(watch.foreign).withContext(`${who}: requests off 127.0.0.1`).toEqual([]);
  expect(watch.consoleErrors).withContext(`${who}: console errors`).toEqual([]);
  expect(watch.pageErrors).withContext(`${who}: uncaught errors`).toEqual([]);
  expect(watch.csp).withContext(`${who}: CSP violations`).toEqual([]);
  expect(watch.failures).withContext(`${who}: failed requests`).toEqual([]);
}

describe('Every route of the app', () => {
  let invitationPath: string;
  let resetPath: string;
  let inviteeEmail: string;

  beforeAll(async () => {
    // Real tokens for the two mail-link routes, from real mail.
    const admin = await apiSignIn(DEMO.admin);
    inviteeEmail = uniqueEmail('routes-invitee');
    const invited = await api('/api/admin/invitations', admin.accessToken, 'POST', { email: inviteeEmail, roles: ['student'] });
    expect(invited.status).toBe(201);
    invitationPath = linkIn(await e2e().mail.waitFor(inviteeEmail, /invited/)).pathname;
    const resetUser = await makeUser(['technician'], 'routes-password-1');
    const asked = await fetch(e2e().baseUrl + '/api/auth/password-reset', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: resetUser.email }),
    });
    expect(asked.status).toBe(202);
    resetPath = linkIn(await e2e().mail.waitFor(resetUser.email, /reset/)).pathname;
  });

  it('renders the public routes to a visitor, as deep links and after a reload', async () => {
    const { page, watch } = await newPage();
    await visit(page, '/', 'Driftmark', 'Driftmark');
    await expectAsync(page.getByText(/survey the DC resistance of the\s+parts around each tube socket/).waitFor()).toBeResolved();
    await shot(page, 'landing');
    await visit(page, '/sign-in', 'Sign in', 'Sign in · Driftmark');
    await shot(page, 'sign-in');
    await visit(page, '/reset-password', 'Reset your password', 'Reset your password · Driftmark');
    expect(resetPath).toMatch(/^\/reset-password\/[A-Za-z0-9_-]{16,}$/);
    await visit(page, resetPath, 'Choose a new password', 'Choose a new password · Driftmark');
    expect(invitationPath).toMatch(/^\/invitation\/[A-Za-z0-9_-]{16,}$/);
    await visit(page, invitationPath, 'Accept your invitation', 'Accept your invitation · Driftmark');
    await expectAsync(page.getByText(inviteeEmail).waitFor()).toBeResolved();
    await visit(page, '/calc', 'Quick check', 'Quick check · Driftmark');
    await visit(page, '/no/such/page', 'Page not found', 'Not found · Driftmark');
    await expectAsync(page.getByText('/no/such/page').waitFor()).toBeResolved();

    // A reload of a deep link renders the same page again.
    await page.goto(e2e().baseUrl + invitationPath);
    await page.reload();
    await expectAsync(page.getByRole('heading', { level: 1, name: 'Accept your invitation' }).waitFor()).toBeResolved();
    expect(new URL(page.url()).pathname).toBe(invitationPath);

    // Every route above but the not-found page is its own lazy chunk (plus their shared ones).
    expect(chunks(watch).size).toBeGreaterThanOrEqual(6);
    expectClean(watch, 'visitor');
  });

  it('renders the home page to a technician and the admin pages to the admin, as deep links and after a reload', async () => {
    const tech = await newPage();
    await signIn(tech.page, DEMO.tech);
    await shot(tech.page, 'home-technician');
    await tech.page.reload();
    await expectAsync(tech.page.getByRole('heading', { level: 1, name: 'Welcome, Carmen Vidalje' }).waitFor()).toBeResolved();
    await expectAsync(tech.page.getByRole('heading', { level: 2, name: 'At the bench' }).waitFor()).toBeResolved();
    expectClean(tech.watch, 'technician');

    const admin = await newPage();
    await signIn(admin.page, DEMO.admin);
    await visit(admin.page, '/admin/users', 'Users', 'Users · Driftmark');
    await expectAsync(admin.page.getByRole('cell', { name: DEMO.student, exact: true }).waitFor()).toBeResolved();
    await shot(admin.page, 'admin-users');
    await admin.page.reload();
    await expectAsync(admin.page.getByRole('cell', { name: DEMO.student, exact: true }).waitFor()).toBeResolved();
    await visit(admin.page, '/admin/settings', 'Instance settings', 'Instance settings · Driftmark');
    await expectAsync(admin.page.getByRole('switch', { name: /may create an account/ }).waitFor()).toBeResolved();
    // `/admin` itself goes to the users page.
    await admin.page.goto(e2e().baseUrl + '/admin');
    await admin.page.waitForURL(e2e().baseUrl + '/admin/users');
    expect(chunks(admin.watch).size).toBeGreaterThanOrEqual(4);
    expectClean(admin.watch, 'admin');
  });

  it('renders the sign-up page while the admin has sign-up open, and sends a visitor to sign in while it is closed', async () => {
    const admin = await newPage();
    await signIn(admin.page, DEMO.admin);
    await visit(admin.page, '/admin/settings', 'Instance settings', 'Instance settings · Driftmark');
    const toggle = admin.page.getByRole('switch', { name: /may create an account/ });
    expect(await toggle.getAttribute('aria-checked')).toBe('false');

    // Closed (the default): to sign in, with the reason.
    const visitor = await newPage();
    await visitor.page.goto(e2e().baseUrl + '/sign-up');
    await visitor.page.waitForURL(e2e().baseUrl + '/sign-in');
    await expectAsync(visitor.page.getByText('This Driftmark instance does not take sign-ups.', { exact: false }).waitFor()).toBeResolved();

    try {
      await toggle.click();
      await expectAsync(admin.page.getByText('Sign-up is open.').waitFor()).toBeResolved();
      expect(await toggle.getAttribute('aria-checked')).toBe('true');

      await visit(visitor.page, '/sign-up', 'Create an account', 'Create an account · Driftmark');
      await visitor.page.reload();
      await expectAsync(visitor.page.getByRole('heading', { level: 1, name: 'Create an account' }).waitFor()).toBeResolved();
    } finally {
      const token = (await apiSignIn(DEMO.admin)).accessToken;
      await api('/api/admin/settings', token, 'PUT', { openSignUp: false });
    }
    expectClean(visitor.watch, 'visitor');
    expectClean(admin.watch, 'admin');
  });

  it('fits the landing, sign-in, home and users pages into a phone-width screen without sideways scrolling', async () => {
    const { page, watch } = await newPage({ viewport: { width: 390, height: 844 } });
    const fits = () => page.evaluate(() => document.documentElement.scrollWidth <= document.documentElement.clientWidth);
    await visit(page, '/', 'Driftmark', 'Driftmark');
    expect(await fits()).withContext('landing').toBeTrue();
    await shot(page, 'phone-landing');
    await visit(page, '/sign-in', 'Sign in', 'Sign in · Driftmark');
    expect(await fits()).withContext('sign-in').toBeTrue();
    await shot(page, 'phone-sign-in');
    await signIn(page, DEMO.admin);
    expect(await fits()).withContext('home').toBeTrue();
    await shot(page, 'phone-home-admin');
    await visit(page, '/admin/users', 'Users', 'Users · Driftmark');
    // On a phone the e-mail sits under the name, and the navigation folds into a menu.
    await page.locator('td .sub', { hasText: DEMO.student }).waitFor();
    expect(await page.getByRole('button', { name: 'Menu' }).count()).toBe(1);
    expect(await fits()).withContext('admin users').toBeTrue();
    await shot(page, 'phone-admin-users');
    expectClean(watch, 'phone');
  });

  it('has watchers that do catch a request to another host and a CSP violation', async () => {
    const { page, watch } = await newPage();
    await page.goto(e2e().baseUrl + '/');
    await page.getByRole('heading', { level: 1, name: 'Driftmark' }).waitFor();
    expect(watch.foreign).toEqual([]);
    expect(watch.csp).toEqual([]);
    // The same server under another host name counts as leaving 127.0.0.1.
    const other = e2e().baseUrl.replace('127.0.0.1', 'localhost');
    await page.goto(other + '/');
    expect(watch.foreign).toContain(other + '/');
    // An image from elsewhere is refused by the CSP (img-src 'self' data: blob:) and reported.
    await page.evaluate(() => {
      const img = document.createElement('img');
      img.src = 'http://192.0.2.1/tube.png';
      document.body.append(img);
    });
    await page.waitForFunction(() => true);
    await expectAsync(waitUntil(() => watch.csp.length > 0)).toBeResolved();
    expect(watch.csp[0]).toContain('img-src http://192.0.2.1/tube.png');
  });
});

async function waitUntil(test: () => boolean, ms = 5000): Promise<void> {
  const end = Date.now() + ms;
  while (!test()) {
    if (Date.now() > end) throw new Error('condition not met in time');
    await new Promise((r) => setTimeout(r, 50));
  }
}
