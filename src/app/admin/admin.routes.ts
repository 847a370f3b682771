import { Routes } from '@angular/router';

/** `/admin/...`: the parent route in app.routes.ts guards these with signedIn + hasRole('admin'). */
export default [
  { path: '', pathMatch: 'full', redirectTo: 'users' },
  {
    path: 'users',
    title: 'Users · Driftmark',
    loadComponent: () => import('./user-list/user-list').then((m) => m.UserList),
  },
  {
    path: 'settings',
    title: 'Instance settings · Driftmark',
    loadComponent: () => import('./instance-settings/instance-settings').then((m) => m.InstanceSettings),
  },
] satisfies Routes;
