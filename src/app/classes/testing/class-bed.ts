import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Type } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { NavigationStart, Router, provideRouter } from '@angular/router';
import { clearAuthStorage, sessionFor } from '../../../testing/http-testing';
import type { Role } from '../../core/auth/roles';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';

/** Spec helper: TestBed with the app's interceptors, stubbed HTTP and a signed-in user (null: nobody). */
export function classBed(roles: Role[] | null, userId: number = 7): { http: HttpTestingController; navigations: string[] } {
  clearAuthStorage();
  TestBed.configureTestingModule({
    providers: [provideRouter([{ path: '**', children: [] }]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
  });
  if (roles) TestBed.inject(Auth).begin(sessionFor(roles, 1, userId));
  // Where the app navigated (each navigation's URL as it starts).
  const navigations: string[] = [];
  TestBed.inject(Router).events.subscribe((e) => {
    if (e instanceof NavigationStart) navigations.push(e.url);
  });
  return { http: TestBed.inject(HttpTestingController), navigations };
}

/** Spec helper: a component with its inputs set, stable, and a harness loader. */
export async function mountPage<T>(type: Type<T>, inputs: Record<string, unknown> = {}): Promise<{ fixture: ComponentFixture<T>; loader: HarnessLoader; el: HTMLElement; text: () => string }> {
  const fixture = TestBed.createComponent(type);
  for (const [k, v] of Object.entries(inputs)) fixture.componentRef.setInput(k, v);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  return { fixture, loader: TestbedHarnessEnvironment.loader(fixture), el, text: () => el.textContent ?? '' };
}

/** Spec helper: the error body the API answers. */
export function apiError(status: number, code: string, message: string, field?: string): [object, { status: number; statusText: string }] {
  return [{ error: { code, message, ...(field ? { details: { field } } : {}) } }, { status, statusText: 'Error' }];
}
