/**
 * Invitation and password reset by e-mail, end to end: the mail is captured by the local mail
 * fake, its link is followed in the browser, and each link refuses a second use.
 */
import { DEMO, e2e, fillSignIn, linkIn, makeUser, newPage, signIn, startAppServer, uniqueEmail } from '../support/e2e-env';

describe('Invitation by e-mail', () => {
  it('lets an invited person choose a password and start with the invited role; the link then refuses a second use', async () => {
    const email = uniqueEmail('invited');
    const admin = await newPage();
    await signIn(admin.page, DEMO.admin);
    await admin.page.goto(e2e().baseUrl + '/admin/users');
    await admin.page.getByRole('button', { name: 'Invite' }).click();
    const dialog = admin.page.getByRole('dialog', { name: 'Invite a person' });
    await dialog.getByLabel('Email').fill(email);
    await dialog.getByRole('combobox', { name: 'Roles' }).click();
    await admin.page.getByRole('option', { name: 'Technician' }).click(); // the default: off
    await admin.page.getByRole('option', { name: 'Student' }).click();
    await admin.page.keyboard.press('Escape');
    await dialog.getByRole('button', { name: 'Send invitation' }).click();
    await expectAsync(admin.page.getByText(`Invitation sent to ${email}.`).waitFor()).toBeResolved();
    await expectAsync(admin.page.getByRole('listitem').filter({ hasText: email }).filter({ hasText: 'Student' }).waitFor()).toBeResolved();

    const mail = await e2e().mail.waitFor(email, /invited/);
    expect(mail.subject).toBe('Driftmark: you are invited');
    const link = linkIn(mail);
    expect(link.origin).toBe(e2e().baseUrl);
    expect(link.pathname).toMatch(/^\/invitation\/[A-Za-z0-9_-]{16,}$/);

    const invitee = await newPage();
    await invitee.page.goto(link.href);
    await expectAsync(invitee.page.getByRole('main').getByText(email).waitFor()).toBeResolved();
    expect(await invitee.page.getByRole('main').innerText()).toContain('with the role: Student.');
    await invitee.page.getByLabel('Your name').fill('Gwen Abernathy-Rios');
    await invitee.page.getByLabel('Password', { exact: true }).fill('invited-pass-42');
    await invitee.page.getByRole('button', { name: 'Accept and sign in' }).click();
    await invitee.page.waitForURL(e2e().baseUrl + '/home');
    await expectAsync(invitee.page.getByRole('heading', { level: 1, name: 'Welcome, Gwen Abernathy-Rios' }).waitFor()).toBeResolved();
    expect(await invitee.page.locator('mat-card[data-role]').evaluateAll((cards) => cards.map((c) => c.getAttribute('data-role')))).toEqual(['student']);

    // The same link a second time, in another browser: refused.
    const again = await newPage();
    await again.page.goto(link.href);
    await expectAsync(again.page.getByRole('alert').filter({ hasText: 'This invitation has been used or has expired.' }).waitFor()).toBeResolved();
    expect(await again.page.getByRole('button', { name: 'Accept and sign in' }).count()).toBe(0);

    // The chosen password works for a new sign-in.
    await invitee.page.getByRole('button', { name: 'Sign out' }).click();
    await signIn(invitee.page, email, 'invited-pass-42');
  });
});

describe('Password reset by e-mail', () => {
  it('sends a link from the reset page; the new password signs in, the old one fails, and the link works once', async () => {
    const oldPassword = 'old-password-42';
    const newPassword = 'new-password-43';
    const user = await makeUser(['technician'], oldPassword, { name: 'Hallam Strick' });
    const { page } = await newPage();

    await page.goto(e2e().baseUrl + '/sign-in');
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await page.waitForURL(e2e().baseUrl + '/reset-password');
    await page.getByLabel('Email').fill(user.email);
    await page.getByRole('button', { name: 'Send the link' }).click();
    await expectAsync(page.getByRole('status').filter({ hasText: `If an account exists for ${user.email}` }).waitFor()).toBeResolved();

    const mail = await e2e().mail.waitFor(user.email, /reset/);
    expect(mail.subject).toBe('Driftmark: reset your password');
    const link = linkIn(mail);
    expect(link.origin).toBe(e2e().baseUrl);
    expect(link.pathname).toMatch(/^\/reset-password\/[A-Za-z0-9_-]{16,}$/);

    await page.goto(link.href);
    await page.getByLabel('New password').fill(newPassword);
    await page.getByRole('button', { name: 'Save the new password' }).click();
    await page.waitForURL(e2e().baseUrl + '/sign-in');
    await expectAsync(page.getByRole('status').filter({ hasText: 'Your password is changed.' }).waitFor()).toBeResolved();

    // The new password signs in …
    await signIn(page, user.email, newPassword);
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(e2e().baseUrl + '/');
    // … the old one fails.
    await fillSignIn(page, user.email, oldPassword);
    await expectAsync(page.getByRole('alert').filter({ hasText: 'Wrong e-mail or password.' }).waitFor()).toBeResolved();
    expect(page.url()).toBe(e2e().baseUrl + '/sign-in');

    // The link a second time: refused, with the way to a new one.
    await page.goto(link.href);
    await page.getByLabel('New password').fill('third-password-44');
    await page.getByRole('button', { name: 'Save the new password' }).click();
    const refusal = page.getByRole('alert').filter({ hasText: 'A reset link works once' });
    await expectAsync(refusal.waitFor()).toBeResolved();
    expect(await refusal.getByRole('link', { name: 'Ask for a new link' }).count()).toBe(1);
    expect(page.url()).toBe(link.href);
    // The refused attempt changed nothing: the second password still signs in.
    await signIn(page, user.email, newPassword);
  });
});

describe('Mail links of a server started on port 0', () => {
  it('point at the port the server listens on', async () => {
    const server = await startAppServer({}, 0);
    try {
      const user = await makeUser(['technician'], 'port-zero-pass-1');
      const r = await fetch(server.url + '/api/auth/password-reset', {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ email: user.email }),
      });
      expect(r.status).toBe(202);
      const link = linkIn(await e2e().mail.waitFor(user.email, /reset/));
      expect(link.port).not.toBe('0');
      expect(link.origin).toBe(server.url);
    } finally {
      await server.close();
    }
  });
});
