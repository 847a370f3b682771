import { Routes } from '@angular/router';

/** The quick check (`/calc`); the placeholder page is replaced by the real one. */
export default [
  {
    path: '',
    title: 'Quick check · Driftmark',
    loadComponent: () => import('./calc-placeholder/calc-placeholder').then((m) => m.CalcPlaceholder),
  },
] satisfies Routes;
