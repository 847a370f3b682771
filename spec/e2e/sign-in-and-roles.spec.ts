/**
 * Sign-in through the form, the one message for a wrong password, sign-out, and what each role
 * sees and may use — in the browser, with the API refusing on its own.
 */
import { DEMO, DEMO_PASSWORD, apiSignIn, e2e, fillSignIn, newPage, signIn } from '../support/e2e-env';

const WRONG = 'Wrong e-mail or password.';

describe('Sign-in', () => {
  it('lands a technician on the home page of their role', async () => {
    const { page, watch } = await newPage();
    await signIn(page, DEMO.tech);
    expect(page.url()).toBe(e2e().baseUrl + '/home');
    await expectAsync(page.getByRole('heading', { level: 1, name: 'Welcome, Carmen Vidalje' }).waitFor()).toBeResolved();
    const sections = page.locator('mat-card[data-role]');
    expect(await sections.evaluateAll((cards) => cards.map((c) => c.getAttribute('data-role')))).toEqual(['technician']);
    await expectAsync(page.getByRole('heading', { level: 2, name: 'At the bench' }).waitFor()).toBeResolved();
    expect(await page.getByRole('banner').getByText('Carmen Vidalje').count()).toBe(1);
    expect(watch.consoleErrors).toEqual([]);
  });

  it('lands the admin and an author on the home pages of their roles', async () => {
    const admin = await newPage();
    await signIn(admin.page, DEMO.admin);
    expect(await admin.page.locator('mat-card[data-role]').evaluateAll((cards) => cards.map((c) => c.getAttribute('data-role')))).toEqual(['admin']);
    await expectAsync(admin.page.getByRole('heading', { level: 2, name: 'Administration' }).waitFor()).toBeResolved();

    const author = await newPage();
    await signIn(author.page, DEMO.author);
    expect(await author.page.locator('mat-card[data-role]').evaluateAll((cards) => cards.map((c) => c.getAttribute('data-role')))).toEqual([
      'author',
      'technician',
    ]);
  });

  it('shows one message for a wrong password and the same one for an unknown e-mail, and stays on the sign-in page', async () => {
    const { page } = await newPage();
    await fillSignIn(page, DEMO.tech, 'not-the-password');
    const alert = page.getByRole('alert');
    await expectAsync(alert.filter({ hasText: WRONG }).waitFor()).toBeResolved();
    expect(await alert.count()).toBe(1);
    expect(page.url()).toBe(e2e().baseUrl + '/sign-in');
    const wrongPasswordText = (await page.getByRole('main').innerText()).trim();

    await fillSignIn(page, 'nobody-here@driftmark.example', 'not-the-password');
    await expectAsync(page.getByRole('alert').filter({ hasText: WRONG }).waitFor()).toBeResolved();
    expect(await page.getByRole('alert').count()).toBe(1);
    // Nothing on the page tells the two apart.
    expect((await page.getByRole('main').innerText()).trim()).toBe(wrongPasswordText);

    // The right password in the same form signs in.
    await page.getByLabel('Email').fill(DEMO.tech);
    await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await page.getByRole('main').getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(e2e().baseUrl + '/home');
    expect(await page.getByRole('alert').count()).toBe(0);
  });

  it('signs out to the public page, ends the session on the server, and a protected URL then asks to sign in and leads back', async () => {
    const { page } = await newPage();
    await signIn(page, DEMO.tech);
    const refreshToken = await page.evaluate(() => localStorage.getItem('driftmark.refreshToken'));
    expect(refreshToken).toMatch(/^[A-Za-z0-9_-]{16,}$/);

    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(e2e().baseUrl + '/');
    await expectAsync(page.getByRole('heading', { level: 1, name: 'Driftmark' }).waitFor()).toBeResolved();
    await expectAsync(page.getByRole('banner').getByRole('link', { name: 'Sign in' }).waitFor()).toBeResolved();
    expect(await page.getByRole('button', { name: 'Sign out' }).count()).toBe(0);
    expect(await page.evaluate(() => localStorage.getItem('driftmark.refreshToken'))).toBeNull();

    // The server revoked the refresh token (sign-out is sent best effort: allow it to arrive).
    let status = 0;
    for (let i = 0; i < 20 && status !== 401; i++) {
      const r = await page.request.post(e2e().baseUrl + '/api/auth/refresh', { data: { refreshToken } });
      status = r.status();
      if (status !== 401) await page.waitForTimeout(100);
    }
    expect(status).toBe(401);

    await page.goto(e2e().baseUrl + '/home');
    await page.waitForURL(/\/sign-in\?returnUrl=%2Fhome$/);
    await expectAsync(page.getByRole('heading', { level: 1, name: 'Sign in' }).waitFor()).toBeResolved();
    // Signing in from there leads back to the page asked for.
    await page.getByLabel('Email').fill(DEMO.tech);
    await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await page.getByRole('main').getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(e2e().baseUrl + '/home');
  });

  it('refreshes a live session with its refresh token: the twin of the revoked one', async () => {
    const { page } = await newPage();
    await signIn(page, DEMO.tech);
    const refreshToken = await page.evaluate(() => localStorage.getItem('driftmark.refreshToken'));
    const r = await page.request.post(e2e().baseUrl + '/api/auth/refresh', { data: { refreshToken } });
    expect(r.status()).toBe(200);
  });
});

describe('Roles', () => {
  it('does not show the admin pages to a student, sends them home from /admin/users, and the API answers 403', async () => {
    const { page } = await newPage();
    await signIn(page, DEMO.student);
    const nav = page.getByRole('navigation', { name: 'Main' });
    await expectAsync(nav.getByRole('link', { name: 'Home' }).waitFor()).toBeResolved();
    expect(await nav.getByRole('link', { name: 'Users' }).count()).toBe(0);
    expect(await nav.getByRole('link', { name: 'Settings' }).count()).toBe(0);
    await expectAsync(page.getByRole('heading', { level: 2, name: 'Your assignments' }).waitFor()).toBeResolved();
    expect(await page.getByRole('link', { name: 'Instance settings' }).count()).toBe(0);

    await page.goto(e2e().baseUrl + '/admin/users');
    await page.waitForURL(e2e().baseUrl + '/home');
    await expectAsync(page.getByText('That page is for: Admin.').waitFor()).toBeResolved();
    expect(await page.getByRole('heading', { level: 1, name: 'Users' }).count()).toBe(0);

    const student = await apiSignIn(DEMO.student);
    const refused = await page.request.get(e2e().baseUrl + '/api/admin/users', { headers: { authorization: `Bearer ${student.accessToken}` } });
    expect(refused.status()).toBe(403);
    expect((await refused.json()).error.code).toEqual(jasmine.any(String));
    const refusedSettings = await page.request.get(e2e().baseUrl + '/api/admin/settings', { headers: { authorization: `Bearer ${student.accessToken}` } });
    expect(refusedSettings.status()).toBe(403);
  });

  it('shows the admin pages to the admin, who uses them, and the API answers 200', async () => {
    const { page } = await newPage();
    await signIn(page, DEMO.admin);
    const nav = page.getByRole('navigation', { name: 'Main' });
    await nav.getByRole('link', { name: 'Users' }).click();
    await page.waitForURL(e2e().baseUrl + '/admin/users');
    await expectAsync(page.getByRole('heading', { level: 1, name: 'Users' }).waitFor()).toBeResolved();
    await expectAsync(page.getByRole('cell', { name: DEMO.student, exact: true }).waitFor()).toBeResolved();
    // The search narrows the table.
    await page.getByLabel('Search by name or email').fill('Pohlmann');
    await expectAsync(page.getByRole('cell', { name: DEMO.tech, exact: true }).waitFor({ state: 'detached' })).toBeResolved();
    expect(await page.getByRole('cell', { name: DEMO.student, exact: true }).count()).toBe(1);
    await nav.getByRole('link', { name: 'Settings' }).click();
    await expectAsync(page.getByRole('heading', { level: 1, name: 'Instance settings' }).waitFor()).toBeResolved();

    const admin = await apiSignIn(DEMO.admin);
    const allowed = await page.request.get(e2e().baseUrl + '/api/admin/users', { headers: { authorization: `Bearer ${admin.accessToken}` } });
    expect(allowed.status()).toBe(200);
    expect((await allowed.json()).items.length).toBeGreaterThanOrEqual(5);
  });
});
