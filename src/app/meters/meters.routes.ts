import { Routes } from '@angular/router';

/** `/meters/...`: the caller's own meter profiles (the parent route guards these with signedIn). */
export default [
  {
    path: '',
    pathMatch: 'full',
    title: 'Meter profiles · Driftmark',
    loadComponent: () => import('./meter-list/meter-list').then((m) => m.MeterList),
  },
  {
    path: 'new',
    title: 'New meter profile · Driftmark',
    loadComponent: () => import('./meter-form/meter-form').then((m) => m.MeterForm),
  },
  {
    path: ':id',
    title: 'Meter profile · Driftmark',
    loadComponent: () => import('./meter-form/meter-form').then((m) => m.MeterForm),
  },
] satisfies Routes;
