import { Routes } from '@angular/router';
import { hasRole } from '../core/auth/guards';

/** `/sets/...`: the parent route in app.routes.ts guards these with signedIn. */
export default [
  {
    path: '',
    pathMatch: 'full',
    title: 'Sets · Driftmark',
    loadComponent: () => import('./set-list/set-list').then((m) => m.SetList),
  },
  {
    path: 'new',
    title: 'New set · Driftmark',
    canActivate: [hasRole('technician', 'instructor', 'admin')],
    loadComponent: () => import('./new-set/new-set').then((m) => m.NewSet),
  },
  {
    path: ':id',
    title: 'Set · Driftmark',
    loadComponent: () => import('./set-page/set-page').then((m) => m.SetPage),
  },
  {
    path: ':id/surveys/new',
    title: 'Start a survey · Driftmark',
    loadComponent: () => import('./new-survey/new-survey').then((m) => m.NewSurvey),
  },
  {
    path: ':id/record',
    title: 'Record of the set · Driftmark',
    loadComponent: () => import('./set-record/set-record').then((m) => m.SetRecord),
  },
  {
    path: ':id/label',
    title: 'Provenance label · Driftmark',
    loadComponent: () => import('../provenance/set-label/set-label').then((m) => m.SetLabel),
  },
] satisfies Routes;
