import { Routes } from '@angular/router';
import { signedOut } from '../core/auth/guards';
import { openSignUp } from './open-sign-up';

/** The account pages; each page is its own lazy chunk. Mail links: /reset-password/<token>, /invitation/<token>. */
export const AUTH_ROUTES: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in · Driftmark',
    canActivate: [signedOut],
    loadComponent: () => import('./sign-in/sign-in').then((m) => m.SignIn),
  },
  {
    path: 'sign-up',
    title: 'Create an account · Driftmark',
    canActivate: [signedOut, openSignUp],
    loadComponent: () => import('./sign-up/sign-up').then((m) => m.SignUp),
  },
  {
    path: 'reset-password',
    title: 'Reset your password · Driftmark',
    loadComponent: () => import('./reset-request/reset-request').then((m) => m.ResetRequest),
  },
  {
    path: 'reset-password/:token',
    title: 'Choose a new password · Driftmark',
    loadComponent: () => import('./reset-confirm/reset-confirm').then((m) => m.ResetConfirm),
  },
  {
    path: 'invitation/:token',
    title: 'Accept your invitation · Driftmark',
    loadComponent: () => import('./invitation-accept/invitation-accept').then((m) => m.InvitationAccept),
  },
];
