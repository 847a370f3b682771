import { Routes } from '@angular/router';

/** The quick check (`/calc`): public, no sign-in. */
export default [
  {
    path: '',
    title: 'Quick check · Driftmark',
    loadComponent: () => import('./quick-check/quick-check').then((m) => m.QuickCheck),
  },
] satisfies Routes;
