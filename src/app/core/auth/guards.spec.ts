import { provideHttpClient } from '@angular/common/http';
import { provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { ActivatedRouteSnapshot, Router, RouterStateSnapshot, UrlTree, provideRouter } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { Component } from '@angular/core';
import { clearAuthStorage, sessionFor } from '../../../testing/http-testing';
import { Auth } from './auth';
import { hasRole, signedIn, signedOut } from './guards';

@Component({ selector: 'dm-page-stub', template: '<p>page</p>' })
class PageStub {}

describe('guards', () => {
  const route = {} as ActivatedRouteSnapshot;
  const state = (url: string) => ({ url }) as RouterStateSnapshot;

  beforeEach(() => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([
          { path: 'sign-in', component: PageStub },
          { path: 'home', component: PageStub, canActivate: [signedIn] },
          { path: 'admin/users', component: PageStub, canActivate: [signedIn, hasRole('admin')] },
        ]),
      ],
    });
  });

  afterEach(() => clearAuthStorage());

  const run = <T>(fn: () => T): T => TestBed.runInInjectionContext(fn);
  const urlOf = (result: unknown): string =>
    result instanceof UrlTree ? TestBed.inject(Router).serializeUrl(result) : String(result);

  it('signedIn sends a visitor to /sign-in with the way back, and lets a signed-in user pass', () => {
    expect(urlOf(run(() => signedIn(route, state('/admin/users'))))).toBe('/sign-in?returnUrl=%2Fadmin%2Fusers');
    TestBed.inject(Auth).begin(sessionFor(['student']));
    expect(run(() => signedIn(route, state('/admin/users')))).toBeTrue();
  });

  it('signedOut sends a signed-in user home, and lets a visitor pass', () => {
    expect(run(() => signedOut(route, state('/sign-in')))).toBeTrue();
    TestBed.inject(Auth).begin(sessionFor(['student']));
    expect(urlOf(run(() => signedOut(route, state('/sign-in'))))).toBe('/home');
  });

  it('hasRole refuses a user without the role (to /home) and admits one who holds it among others', () => {
    const auth = TestBed.inject(Auth);
    auth.begin(sessionFor(['technician', 'author']));
    expect(urlOf(run(() => hasRole('admin')(route, state('/admin/users'))))).toBe('/home');
    auth.begin(sessionFor(['technician', 'admin']));
    expect(run(() => hasRole('admin')(route, state('/admin/users')))).toBeTrue();
  });

  it('through the router: a technician asking for /admin/users lands on /home, an admin gets the page', async () => {
    const auth = TestBed.inject(Auth);
    const harness = await RouterTestingHarness.create();
    auth.begin(sessionFor(['technician']));
    await harness.navigateByUrl('/admin/users');
    expect(TestBed.inject(Router).url).toBe('/home');
    auth.begin(sessionFor(['admin']));
    await harness.navigateByUrl('/admin/users');
    expect(TestBed.inject(Router).url).toBe('/admin/users');
  });
});
