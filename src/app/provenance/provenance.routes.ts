import { Routes } from '@angular/router';

/** `/p/...`: public, no sign-in. The label page itself lives under `/sets/:id/label`. */
export default [
  {
    path: ':token',
    title: 'Provenance record · Driftmark',
    loadComponent: () => import('./public-record/public-record').then((m) => m.PublicRecordPage),
  },
] satisfies Routes;
