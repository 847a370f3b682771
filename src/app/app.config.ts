import { provideHttpClient, withFetch, withInterceptors } from '@angular/common/http';
import {
  ApplicationConfig,
  inject,
  isDevMode,
  provideAppInitializer,
  provideBrowserGlobalErrorListeners,
  provideZonelessChangeDetection,
} from '@angular/core';
import { MatIconRegistry } from '@angular/material/icon';
import { provideRouter, withComponentInputBinding, withInMemoryScrolling } from '@angular/router';
import { provideServiceWorker } from '@angular/service-worker';
import { routes } from './app.routes';
import { Auth } from './core/auth/auth';
import { authToken } from './core/http/auth-token';
import { httpErrors } from './core/http/http-errors';

export const appConfig: ApplicationConfig = {
  providers: [
    provideBrowserGlobalErrorListeners(),
    provideZonelessChangeDetection(),
    provideRouter(routes, withComponentInputBinding(), withInMemoryScrolling({ scrollPositionRestoration: 'enabled' })),
    // httpErrors outermost: it sees the result after authToken's refresh-and-retry.
    provideHttpClient(withFetch(), withInterceptors([httpErrors, authToken])),
    provideAppInitializer(() => {
      inject(MatIconRegistry).setDefaultFontSetClass('material-symbols-outlined');
      // A stored session may carry roles an admin has changed since: refresh it in the background
      // (offline, or on a network error, the stored session stands).
      const auth = inject(Auth);
      if (auth.hasRefreshToken() && (typeof navigator === 'undefined' || navigator.onLine)) {
        auth.refresh().subscribe({ error: () => undefined });
      }
    }),
    provideServiceWorker('ngsw-worker.js', {
      enabled: !isDevMode(),
      registrationStrategy: 'registerWhenStable:30000',
    }),
  ],
};
