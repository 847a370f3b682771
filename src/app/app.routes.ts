import { Routes } from '@angular/router';
import { AUTH_ROUTES } from './auth/auth.routes';
import { hasRole, signedIn } from './core/auth/guards';

export const routes: Routes = [
  {
    path: '',
    pathMatch: 'full',
    title: 'Driftmark',
    loadComponent: () => import('./landing/landing').then((m) => m.Landing),
  },
  ...AUTH_ROUTES,
  {
    path: 'home',
    title: 'Home · Driftmark',
    canActivate: [signedIn],
    loadComponent: () => import('./home/home').then((m) => m.Home),
  },
  {
    path: 'admin',
    canActivate: [signedIn, hasRole('admin')],
    loadChildren: () => import('./admin/admin.routes'),
  },
  {
    path: 'templates',
    canActivate: [signedIn],
    loadChildren: () => import('./templates/templates.routes'),
  },
  {
    path: 'sets',
    canActivate: [signedIn],
    loadChildren: () => import('./sets/sets.routes'),
  },
  {
    path: 'surveys',
    canActivate: [signedIn],
    loadChildren: () => import('./surveys/surveys.routes'),
  },
  {
    path: 'meters',
    canActivate: [signedIn],
    loadChildren: () => import('./meters/meters.routes'),
  },
  {
    path: 'classes',
    canActivate: [signedIn],
    loadChildren: () => import('./classes/classes.routes'),
  },
  {
    path: 'assignments/:id',
    title: 'Assignment · Driftmark',
    canActivate: [signedIn],
    loadComponent: () => import('./classes/assignment-page/assignment-page').then((m) => m.AssignmentPage),
  },
  {
    path: 'attempts/:id/review',
    title: 'Review · Driftmark',
    canActivate: [signedIn],
    loadComponent: () => import('./classes/review-page/review-page').then((m) => m.ReviewPage),
  },
  {
    path: 'join/:token',
    title: 'Join a class · Driftmark',
    loadComponent: () => import('./classes/join-page/join-page').then((m) => m.JoinPage),
  },
  {
    path: 'competencies',
    title: 'My competencies · Driftmark',
    canActivate: [signedIn],
    loadComponent: () => import('./classes/competencies-page/competencies-page').then((m) => m.CompetenciesPage),
  },
  {
    path: 'p',
    loadChildren: () => import('./provenance/provenance.routes'),
  },
  {
    path: 'calc',
    loadChildren: () => import('./calc/calc.routes'),
  },
  {
    path: '**',
    title: 'Not found · Driftmark',
    loadComponent: () => import('./not-found/not-found').then((m) => m.NotFound),
  },
];
