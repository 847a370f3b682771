import { Routes } from '@angular/router';
import { hasRole } from '../core/auth/guards';

/** `/classes/...`: the parent route in app.routes.ts guards these with signedIn. */
export default [
  {
    path: '',
    pathMatch: 'full',
    title: 'Classes · Driftmark',
    loadComponent: () => import('./class-list/class-list').then((m) => m.ClassList),
  },
  {
    path: ':id',
    title: 'Class · Driftmark',
    canActivate: [hasRole('instructor', 'student', 'admin')],
    loadComponent: () => import('./class-page/class-page').then((m) => m.ClassPage),
  },
] satisfies Routes;
