import { HttpTestingController } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import type { InvitationPreview } from '@domain/class-format';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { apiError, classBed, mountPage } from '../testing/class-bed';
import { JoinPage } from './join-page';

const preview = (over: Partial<InvitationPreview> = {}): InvitationPreview => ({
  className: 'Bench practice, evening group',
  term: 'Spring 2027',
  instructorName: 'Ada Voss',
  email: 'pell.orrin@example.org',
  state: 'open',
  accountExists: false,
  ...over,
});

describe('JoinPage', () => {
  let http: HttpTestingController;
  let navigations: string[];
  let fixture: ComponentFixture<JoinPage>;
  let loader: HarnessLoader;
  let el: HTMLElement;
  let text: () => string;

  async function open(p: InvitationPreview | null): Promise<void> {
    ({ fixture, loader, el, text } = await mountPage(JoinPage, { token: 'tok-abc' }));
    const req = await nextRequest(http, '/api/class-invitations/tok-abc');
    if (p) req.flush(p);
    else req.flush(...apiError(404, 'not-found', 'Not found.'));
    await fixture.whenStable();
  }

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  describe('signed out', () => {
    beforeEach(() => ({ http, navigations } = classBed(null)));

    it('shows the class and creates a student account that joins, then goes to the classes', async () => {
      await open(preview());
      expect(text()).toContain('Bench practice, evening group');
      expect(text()).toContain('taught by Ada Voss');
      expect(text()).toContain('pell.orrin@example.org');
      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Pell Orrin');
      await (await loader.getHarness(MatInputHarness.with({ selector: 'input[autocomplete=new-password]' }))).setValue('copper valve lantern');
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the account and join' }))).click();
      const req = await nextRequest(http, (r) => r.method === 'POST');
      expect(req.request.url).toBe('/api/class-invitations/tok-abc/accept');
      expect(req.request.body).toEqual({ name: 'Pell Orrin', password: 'copper valve lantern' });
      req.flush({ ...sessionFor(['student'], 1, 23), user: { id: 23, email: 'pell.orrin@example.org', name: 'Pell Orrin', roles: ['student'] } });
      await fixture.whenStable();
      expect(TestBed.inject(Auth).user()?.name).toBe('Pell Orrin');
      expect(navigations).toContain('/classes');
    });

    it('refuses a short password without a request', async () => {
      await open(preview());
      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Pell Orrin');
      await (await loader.getHarness(MatInputHarness.with({ selector: 'input[autocomplete=new-password]' }))).setValue('short');
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the account and join' }))).click();
      await fixture.whenStable();
      expect(text()).toContain('Use at least 10 characters');
      http.expectNone((r) => r.method === 'POST');
    });

    it('turns a 409 (the e-mail has an account) into "sign in and join"', async () => {
      await open(preview());
      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Pell Orrin');
      await (await loader.getHarness(MatInputHarness.with({ selector: 'input[autocomplete=new-password]' }))).setValue('copper valve lantern');
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the account and join' }))).click();
      (await nextRequest(http, (r) => r.method === 'POST')).flush(...apiError(409, 'email-taken', 'An account with this e-mail exists.'));
      await fixture.whenStable();
      expect(el.querySelector('[data-test=form-error]')?.textContent).toContain('An account with this e-mail exists.');
      const link = el.querySelector('a[href^="/sign-in"]') as HTMLAnchorElement;
      expect(link.textContent).toContain('Sign in and join');
      expect(decodeURIComponent(link.getAttribute('href') ?? '')).toContain('returnUrl=/join/tok-abc');
      expect(el.querySelector('[formControlName=name]')).toBeNull();
    });

    it('offers "sign in and join" at once when the account exists', async () => {
      await open(preview({ accountExists: true }));
      expect(el.querySelector('[formControlName=name]')).toBeNull();
      expect(el.querySelector('a[href^="/sign-in"]')?.textContent).toContain('Sign in and join');
    });

    it('says why an expired invitation or an unknown link cannot be used', async () => {
      await open(preview({ state: 'expired' }));
      expect(text()).toContain('This invitation has expired.');
      expect(el.querySelector('form')).toBeNull();
      fixture.destroy();
      await open(null);
      expect(text()).toContain('This invitation link is not valid');
    });
  });

  describe('signed in', () => {
    beforeEach(() => ({ http, navigations } = classBed(['technician'], 7)));

    it('joins with the same e-mail and refreshes the session for the new role', async () => {
      await open(preview({ email: 'Ada.Voss@example.org', accountExists: true }));
      await (await loader.getHarness(MatButtonHarness.with({ text: /Join the class/ }))).click();
      const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/class-invitations/tok-abc/join');
      req.flush({ classId: 3 });
      await fixture.whenStable();
      expect(navigations).toContain('/classes/3');
      (await nextRequest(http, '/api/auth/refresh')).flush(sessionFor(['technician', 'student'], 2, 7));
      await fixture.whenStable();
    });

    it('tells a user signed in with another e-mail to switch accounts, offering no join', async () => {
      await open(preview({ accountExists: true }));
      expect(el.querySelector('[data-test=other-account]')?.textContent).toContain('this invitation is for pell.orrin@example.org');
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Join the class/ }))).toEqual([]);
    });
  });
});
