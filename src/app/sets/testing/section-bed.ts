import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Type } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';

/** Spec helper: TestBed with the app's interceptors, stubbed HTTP and a signed-in technician (account 7); `null`: nobody signed in. */
export function configureBed(roles: Parameters<typeof sessionFor>[0] | null = ['technician']): HttpTestingController {
  clearAuthStorage();
  TestBed.configureTestingModule({
    providers: [provideRouter([]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
  });
  if (roles) TestBed.inject(Auth).begin(sessionFor(roles, 1, 7));
  return TestBed.inject(HttpTestingController);
}

/** Spec helper: a component with its inputs set, stable, and a harness loader. */
export async function mount<T>(type: Type<T>, inputs: Record<string, unknown>): Promise<{ fixture: ComponentFixture<T>; loader: HarnessLoader; text: () => string }> {
  const fixture = TestBed.createComponent(type);
  for (const [k, v] of Object.entries(inputs)) fixture.componentRef.setInput(k, v);
  await fixture.whenStable();
  return { fixture, loader: TestbedHarnessEnvironment.loader(fixture), text: () => (fixture.nativeElement as HTMLElement).textContent ?? '' };
}
