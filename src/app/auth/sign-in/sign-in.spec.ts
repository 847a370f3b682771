import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router, provideRouter } from '@angular/router';
import { clearAuthStorage, sessionFor } from '../../../testing/http-testing';
import { Auth, REFRESH_TOKEN_KEY } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { SignIn } from './sign-in';

describe('SignIn', () => {
  let fixture: ComponentFixture<SignIn>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  async function setUp(openSignUp = false): Promise<void> {
    fixture = TestBed.createComponent(SignIn);
    loader = TestbedHarnessEnvironment.loader(fixture);
    http = TestBed.inject(HttpTestingController);
    await fixture.whenStable();
    http.expectOne('/api/settings/public').flush({ openSignUp });
    await fixture.whenStable();
  }

  const input = (placeholderLabel: 'Email' | 'Password') =>
    loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: placeholderLabel }));

  async function fill(email: string, password: string): Promise<void> {
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue(email);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue(password);
  }

  const submit = async () => (await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }))).click();
  const formError = () => (fixture.nativeElement as HTMLElement).querySelector('[data-test=form-error]')?.textContent?.trim();

  beforeEach(() => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([
          { path: 'home', children: [] },
          { path: 'admin/users', children: [] },
        ]),
        provideHttpClient(withInterceptors([httpErrors, authToken])),
        provideHttpClientTesting(),
      ],
    });
  });

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('does not send an empty form and says beside each field what is missing', async () => {
    await setUp();
    await submit();
    http.expectNone('/api/auth/sign-in');
    expect(await (await input('Email')).getTextErrors()).toEqual(['Enter your email address.']);
    expect(await (await input('Password')).getTextErrors()).toEqual(['Enter your password.']);
  });

  it('sends the email and password, keeps the session and goes where the user was heading', async () => {
    await setUp();
    fixture.componentRef.setInput('returnUrl', '/admin/users');
    await fill('ada.voss@example.org', 'correct horse battery');
    await submit();
    const req = http.expectOne('/api/auth/sign-in');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({ email: 'ada.voss@example.org', password: 'correct horse battery' });
    req.flush(sessionFor(['admin']));
    await fixture.whenStable();
    expect(TestBed.inject(Router).url).toBe('/admin/users');
    expect(TestBed.inject(Auth).user()?.name).toBe('Ada Voss');
    expect(localStorage.getItem(REFRESH_TOKEN_KEY)).toBe('refresh-1');
  });

  it("shows the server's one message for a wrong email or password, and stays signed out", async () => {
    await setUp();
    await fill('ada.voss@example.org', 'not my password');
    await submit();
    http
      .expectOne('/api/auth/sign-in')
      .flush({ error: { code: 'bad-credentials', message: 'Wrong email or password.' } }, { status: 401, statusText: 'Unauthorized' });
    await fixture.whenStable();
    expect(formError()).toBe('Wrong email or password.');
    expect(TestBed.inject(Auth).signedIn()).toBeFalse();
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }))).isDisabled()).toBeFalse();
  });

  it('tells a throttled user to wait', async () => {
    await setUp();
    await fill('ada.voss@example.org', 'guess number eleven');
    await submit();
    http
      .expectOne('/api/auth/sign-in')
      .flush({ error: { code: 'throttled', message: 'Too many attempts. Wait 5 minutes.' } }, { status: 429, statusText: 'Too Many Requests' });
    await fixture.whenStable();
    expect(formError()).toBe('Too many attempts. Wait 5 minutes.');
  });

  it('puts a server validation error beside the field it names', async () => {
    await setUp();
    await fill('ada.voss@example.org', 'whatever it is');
    await submit();
    http.expectOne('/api/auth/sign-in').flush(
      { error: { code: 'invalid', message: 'This email address is not valid.', details: { field: 'email' } } },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(await (await input('Email')).getTextErrors()).toEqual(['This email address is not valid.']);
    expect(formError()).toBeUndefined();
  });

  it('offers to create an account only when open sign-up is on', async () => {
    await setUp(false);
    const link = () => (fixture.nativeElement as HTMLElement).querySelector('a[href="/sign-up"]');
    expect(link()).toBeNull();
    fixture.destroy();
    await setUp(true);
    expect(link()).not.toBeNull();
  });
});
