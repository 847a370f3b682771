/**
 * The admin manages a user in the browser: creates the account, changes its roles, deactivates it
 * — and the deactivated user's open session is refused at its next request, in their own page.
 */
import type { Locator, Page } from 'playwright-core';
import { DEMO, e2e, fillSignIn, newPage, signIn, uniqueEmail } from '../support/e2e-env';

/** Picks exactly these options in the open dialog's multiple "Roles" select. */
async function chooseRoles(page: Page, dialog: Locator, labels: string[]): Promise<void> {
  await dialog.getByRole('combobox', { name: 'Roles' }).click();
  const listbox = page.getByRole('listbox');
  await listbox.waitFor();
  for (const option of await listbox.getByRole('option').all()) {
    const label = (await option.innerText()).trim();
    const selected = (await option.getAttribute('aria-selected')) === 'true';
    if (selected !== labels.includes(label)) await option.click();
  }
  await page.keyboard.press('Escape');
  await listbox.waitFor({ state: 'detached' });
}

const row = (page: Page, email: string) => page.getByRole('row').filter({ has: page.getByRole('cell', { name: email, exact: true }) });

describe('Admin user management', () => {
  it('creates a user, changes their roles, deactivates them: their open session is refused at its next request', async () => {
    const email = uniqueEmail('managed');
    const password = 'managed-pass-42';
    const admin = await newPage();
    await signIn(admin.page, DEMO.admin);
    await admin.page.goto(e2e().baseUrl + '/admin/users');
    await admin.page.getByRole('heading', { level: 1, name: 'Users' }).waitFor();

    // Create, with a first password; a password too short is refused beside the field first.
    await admin.page.getByRole('button', { name: 'Create account' }).click();
    let dialog = admin.page.getByRole('dialog', { name: 'Create an account' });
    await dialog.getByLabel('Email').fill(email);
    await dialog.getByLabel('Name').fill('Farid Quellmann');
    await chooseRoles(admin.page, dialog, ['Technician']);
    await dialog.getByLabel('First password').fill('short');
    await dialog.getByRole('button', { name: 'Create account' }).click();
    await expectAsync(dialog.getByText('At least 10 characters.').waitFor()).toBeResolved();
    await dialog.getByLabel('First password').fill(password);
    await dialog.getByRole('button', { name: 'Create account' }).click();
    await expectAsync(admin.page.getByText(`Account created for ${email}.`).waitFor()).toBeResolved();
    await admin.page.getByLabel('Search by name or email').fill(email);
    await expectAsync(row(admin.page, email).getByRole('cell', { name: 'Technician', exact: true }).waitFor()).toBeResolved();

    // Change roles: none is refused in the form; Admin and Technician are saved.
    await row(admin.page, email).getByRole('button', { name: `Edit ${email}` }).click();
    dialog = admin.page.getByRole('dialog', { name: `Edit ${email}` });
    await chooseRoles(admin.page, dialog, []);
    await dialog.getByRole('button', { name: 'Save' }).click();
    await expectAsync(dialog.getByText('Choose at least one role.').waitFor()).toBeResolved();
    await chooseRoles(admin.page, dialog, ['Admin', 'Technician']);
    await dialog.getByRole('button', { name: 'Save' }).click();
    await dialog.waitFor({ state: 'detached' });
    await expectAsync(row(admin.page, email).getByRole('cell', { name: 'Admin, Technician', exact: true }).waitFor()).toBeResolved();

    // The user signs in in their own browser and uses an admin page (the positive twin).
    const user = await newPage();
    await signIn(user.page, email, password);
    expect(await user.page.locator('mat-card[data-role]').evaluateAll((cards) => cards.map((c) => c.getAttribute('data-role')))).toEqual([
      'admin',
      'technician',
    ]);
    const userNav = user.page.getByRole('navigation', { name: 'Main' });
    await userNav.getByRole('link', { name: 'Users' }).click();
    await expectAsync(user.page.getByRole('cell', { name: DEMO.student, exact: true }).waitFor()).toBeResolved();

    // Deactivate.
    await row(admin.page, email).getByRole('button', { name: `Deactivate ${email}` }).click();
    await expectAsync(admin.page.getByText('Farid Quellmann is deactivated.').waitFor()).toBeResolved();
    await expectAsync(row(admin.page, email).getByRole('cell', { name: 'Deactivated', exact: true }).waitFor()).toBeResolved();

    // Their next request, in their own page: signed out, on the sign-in page, with a message.
    await userNav.getByRole('link', { name: 'Settings' }).click();
    await user.page.waitForURL(/\/sign-in(\?|$)/);
    await expectAsync(user.page.getByRole('status').filter({ hasText: 'This account has been deactivated' }).waitFor()).toBeResolved();
    expect(await user.page.evaluate(() => localStorage.getItem('driftmark.refreshToken'))).toBeNull();
    expect(await user.page.getByRole('button', { name: 'Sign out' }).count()).toBe(0);
    expect(await user.page.getByRole('heading', { level: 1, name: 'Instance settings' }).count()).toBe(0);

    // Signing in again is refused with its own message …
    await fillSignIn(user.page, email, password);
    await expectAsync(user.page.getByRole('alert').filter({ hasText: 'This account has been deactivated.' }).waitFor()).toBeResolved();
    expect(user.page.url()).toBe(e2e().baseUrl + '/sign-in');

    // … until the admin reactivates the account.
    await row(admin.page, email).getByRole('button', { name: `Reactivate ${email}` }).click();
    await expectAsync(row(admin.page, email).getByRole('cell', { name: 'Active', exact: true }).waitFor()).toBeResolved();
    await signIn(user.page, email, password);
  });

  it('does not let the admin deactivate their own account from the table', async () => {
    const { page } = await newPage();
    await signIn(page, DEMO.admin);
    await page.goto(e2e().baseUrl + '/admin/users');
    await expectAsync(row(page, DEMO.admin).waitFor()).toBeResolved();
    expect(await row(page, DEMO.admin).getByRole('button', { name: `Deactivate ${DEMO.admin}` }).isDisabled()).toBeTrue();
    expect(await row(page, DEMO.student).getByRole('button', { name: `Deactivate ${DEMO.student}` }).isEnabled()).toBeTrue();
  });
});
