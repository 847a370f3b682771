import { Routes } from '@angular/router';
import { hasRole } from '../core/auth/guards';

/** `/templates/...`: the parent route in app.routes.ts guards these with signedIn. */
export default [
  {
    path: '',
    pathMatch: 'full',
    title: 'Template library · Driftmark',
    loadComponent: () => import('./library/library').then((m) => m.Library),
  },
  {
    path: 'tube-types',
    title: 'Tube types · Driftmark',
    loadComponent: () => import('./tube-types/tube-type-list').then((m) => m.TubeTypeList),
  },
  {
    path: 'tube-types/new',
    title: 'New tube type · Driftmark',
    canActivate: [hasRole('author', 'admin')],
    loadComponent: () => import('./tube-types/tube-type-editor').then((m) => m.TubeTypeEditor),
  },
  {
    path: 'tube-types/:designation',
    title: 'Tube type · Driftmark',
    loadComponent: () => import('./tube-types/tube-type-editor').then((m) => m.TubeTypeEditor),
  },
  {
    path: ':id',
    title: 'Template · Driftmark',
    loadComponent: () => import('./template-detail/template-detail').then((m) => m.TemplateDetail),
  },
  {
    path: ':id/diff',
    title: 'Changes between versions · Driftmark',
    loadComponent: () => import('./version-diff/version-diff').then((m) => m.VersionDiff),
  },
  {
    path: ':id/edit',
    loadComponent: () => import('./editor/template-editor').then((m) => m.TemplateEditor),
    // Leaving with unsaved changes asks first (they also stay in this browser to restore).
    canDeactivate: [(editor: { confirmLeave(): boolean }) => editor.confirmLeave()],
  },
] satisfies Routes;
