import { Routes } from '@angular/router';

/** `/surveys/...`: the parent route in app.routes.ts guards these with signedIn. A new survey starts under `/sets/:id/surveys/new`. */
export default [
  {
    path: ':id',
    title: 'Survey · Driftmark',
    loadComponent: () => import('./survey-page/survey-page').then((m) => m.SurveyPage),
  },
] satisfies Routes;
