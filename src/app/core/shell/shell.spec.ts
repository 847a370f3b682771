import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../auth/auth';
import { Shell } from './shell';

describe('Shell', () => {
  beforeEach(() => {
    clearAuthStorage();
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
  });

  afterEach(() => clearAuthStorage());

  const navLinks = (el: HTMLElement) =>
    Array.from(el.querySelectorAll('nav a')).map((a) => a.textContent?.replace(/^\s*\S+\s+/, '').trim());

  it('offers a visitor sign-in and the quick check only', async () => {
    const fixture = TestBed.createComponent(Shell);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(navLinks(el)).toEqual(['Quick check']);
    expect(el.querySelector('a.sign-in')?.textContent?.trim()).toBe('Sign in');
    expect(el.querySelector('[data-test=user-name]')).toBeNull();
  });

  it("shows an admin's name, the admin pages and a sign-out that ends the session", async () => {
    const auth = TestBed.inject(Auth);
    auth.begin(sessionFor(['admin', 'technician']));
    const fixture = TestBed.createComponent(Shell);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('[data-test=user-name]')?.textContent?.trim()).toBe('Ada Voss');
    expect(navLinks(el)).toEqual(['Home', 'Sets', 'Templates', 'Meters', 'Classes', 'Users', 'Settings', 'Quick check']);

    const loader = TestbedHarnessEnvironment.loader(fixture);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Sign out/ }))).click();
    TestBed.inject(HttpTestingController).expectOne('/api/auth/sign-out').flush(null, { status: 204, statusText: 'No Content' });
    await fixture.whenStable();
    expect(auth.signedIn()).toBeFalse();
    expect(el.querySelector('[data-test=user-name]')).toBeNull();
    expect(navLinks(el)).toEqual(['Quick check']);
  });
});
