import { HttpTestingController } from '@angular/common/http/testing';
import { ComponentFixture } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { attempt, reviewView, studentReviewView } from '../testing/class-fixtures';
import { apiError, classBed, mountPage } from '../testing/class-bed';
import { ReviewPage } from './review-page';
import type { ReviewView } from '@domain/class-format';

describe('ReviewPage', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<ReviewPage>;
  let loader: HarnessLoader;
  let el: HTMLElement;
  let text: () => string;

  async function open(view: ReviewView): Promise<void> {
    ({ fixture, loader, el, text } = await mountPage(ReviewPage, { id: String(view.attempt.id) }));
    (await nextRequest(http, `/api/attempts/${view.attempt.id}/review`)).flush(view);
    await fixture.whenStable();
  }
  const row = (key: string) => el.querySelector(`tr[data-key="${key}"]`) as HTMLElement;
  const button = (text: string | RegExp) => loader.getHarness(MatButtonHarness.with({ text }));

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  describe('as the instructor', () => {
    beforeEach(() => ({ http } = classBed(['instructor'], 7)));

    it('names the class and the assignment in the breadcrumb, each a link back', async () => {
      await open(reviewView());
      const crumbs = Array.from(el.querySelectorAll('nav.crumbs a')).map((a) => [a.textContent?.trim(), a.getAttribute('href')]);
      expect(crumbs).toEqual([
        ['Classes', '/classes'],
        ['Bench practice, evening group', '/classes/3'],
        ['Wren 3: the audio stage', '/assignments/41'],
      ]);
    });

    it('shows each test point beside the reference with E_n, the agreement and the not-comparable reason', async () => {
      await open(reviewView());
      expect(el.querySelector('[data-test=reference-col]')).not.toBeNull();
      expect(row('tp-r7').textContent).toContain('470 kΩ');
      expect(row('tp-r7').textContent).toContain('468 kΩ');
      expect(row('tp-r7').textContent).toContain('0.15');
      expect(row('tp-r7').textContent).toContain('U ±9.4 kΩ');
      expect(row('tp-r7').querySelector('[data-agreement]')?.textContent?.trim()).toContain('agree');
      expect(row('tp-r9').querySelector('[data-agreement]')?.getAttribute('data-agreement')).toBe('disagree');
      expect(row('tp-r9').textContent).toContain('different verdict');
      expect(row('tp-r9').textContent).toContain('fingers across the probes');
      expect(row('tp-v2').textContent).toContain('not comparable');
      expect(row('tp-v2').textContent).toContain('measured by a different method than the reference');
      expect(row('tp-r7').textContent).toContain('450k');
      expect(row('tp-r7').textContent).toContain('off by −4.3 %');
    });

    it('prefills the score with the suggestion and accepts with the changed score and the comment', async () => {
      await open(reviewView());
      const score = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=score]' }));
      expect(await score.getValue()).toBe('50');
      await score.setValue('65');
      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=comment]' }))).setValue('Good work on the plate loads.');
      await (await button(/Accept/)).click();
      const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/attempts/81/review');
      expect(req.request.body).toEqual({ decision: 'accepted', score: 65, comment: 'Good work on the plate loads.', remeasureKeys: [] });
      req.flush({ id: 95, decision: 'accepted', score: 65, suggestedScore: 50, comment: 'Good work on the plate loads.', remeasureKeys: [], reviewer: { id: 7, name: 'Ada Voss' }, createdAt: '2030-04-03T10:00:00Z' });
      const reviewed = attempt({ review: { id: 95, decision: 'accepted', score: 65, suggestedScore: 50, comment: 'Good work on the plate loads.', remeasureKeys: [], reviewer: { id: 7, name: 'Ada Voss' }, createdAt: '2030-04-03T10:00:00Z' } });
      (await nextRequest(http, '/api/attempts/81/review')).flush(reviewView({ attempt: reviewed, attempts: [reviewed], surveyState: 'accepted' }));
      await fixture.whenStable();
      expect(text()).toContain('Accepted. The student is told.');
      expect(text()).toContain('Score 65 (suggested 50)');
      expect(el.querySelector('mat-checkbox')).toBeNull();
    });

    it('refuses a score above 100 without a request, and refuses to return with nothing to re-measure', async () => {
      await open(reviewView());
      const score = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=score]' }));
      await score.setValue('140');
      await (await button(/Accept/)).click();
      await fixture.whenStable();
      expect(text()).toContain('A whole number from 0 to 100');
      http.expectNone('/api/attempts/81/review');

      await score.setValue('40');
      await (await button(/Return for re-measure/)).click();
      await fixture.whenStable();
      expect(el.querySelector('[data-test=decision-error]')?.textContent).toContain('Choose at least one test point to re-measure');
      http.expectNone((r) => r.method === 'POST');
    });

    it('returns with the chosen test points to re-measure (the twin of the refusal)', async () => {
      await open(reviewView());
      const boxes = await loader.getAllHarnesses(MatCheckboxHarness);
      expect(boxes.length).toBe(3);
      await (await button(/Mark the 1 disagreeing/)).click();
      expect(await boxes[1].isChecked()).toBeTrue();
      await boxes[2].check();
      await (await button(/Return for re-measure/)).click();
      const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/attempts/81/review');
      expect(req.request.body).toEqual({ decision: 'returned', score: 50, comment: '', remeasureKeys: ['tp-r9', 'tp-v2'] });
      req.flush({});
      (await nextRequest(http, '/api/attempts/81/review')).flush(reviewView());
      await fixture.whenStable();
      expect(text()).toContain('Returned with 2 test points to re-measure.');
    });

    it('adds a comment on a reading and deletes one, and refuses an empty comment', async () => {
      await open(reviewView());
      await (await button(/Comment on R7 plate load/)).click();
      await fixture.whenStable();
      await (await button('Add')).click();
      expect(text()).toContain('Write the comment first.');
      http.expectNone((r) => r.method === 'POST');

      await (await loader.getHarness(MatInputHarness.with({ selector: 'textarea[data-comment]' }))).setValue('Zero the leads first.');
      await (await button('Add')).click();
      const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/attempts/81/comments');
      expect(req.request.body).toEqual({ testPointKey: 'tp-r7', readingId: 501, text: 'Zero the leads first.' });
      req.flush({ id: 302, attemptId: 81, testPointKey: 'tp-r7', readingId: 501, author: { id: 7, name: 'Ada Voss' }, text: 'Zero the leads first.', createdAt: '2030-04-02T12:00:00Z' });
      await fixture.whenStable();
      expect(row('tp-r7').textContent).toContain('Zero the leads first.');

      (row('tp-r9').querySelector('button[aria-label="Delete the comment on R9 grid leak"]') as HTMLButtonElement).click();
      const del = await nextRequest(http, (r) => r.method === 'DELETE');
      expect(del.request.url).toBe('/api/attempts/81/comments/301');
      del.flush(null, { status: 204, statusText: 'No Content' });
      await fixture.whenStable();
      expect(row('tp-r9').textContent).not.toContain('Hands off the probe tips.');
    });

    it('shows a refused decision (409) without losing the form', async () => {
      await open(reviewView());
      await (await button(/Accept/)).click();
      (await nextRequest(http, (r) => r.method === 'POST')).flush(...apiError(409, 'survey-not-submitted', 'The survey is not waiting for review.'));
      await fixture.whenStable();
      expect(el.querySelector('[data-test=decision-error]')?.textContent).toContain('The survey is not waiting for review.');
      expect(el.querySelector('mat-checkbox')).not.toBeNull();
    });

    it('says a later attempt exists on an older attempt, and offers no decision there', async () => {
      const newer = attempt({ id: 83, number: 2 });
      await open(reviewView({ attempts: [newer, attempt()] }));
      expect(text()).toContain('A later attempt exists');
      expect(el.querySelector('a[href="/attempts/83/review"]')).not.toBeNull();
      expect(el.querySelector('mat-checkbox')).toBeNull();
    });

    it('says "not yours to see" for a 404', async () => {
      ({ fixture, el, text } = await mountPage(ReviewPage, { id: '99' }));
      (await nextRequest(http, '/api/attempts/99/review')).flush(...apiError(404, 'not-found', 'Not found.'));
      await fixture.whenStable();
      expect(text()).toContain('No such attempt, or it is not yours to see.');
    });
  });

  describe('as the student', () => {
    beforeEach(() => ({ http } = classBed(['student'], 21)));

    it('hides the reference columns before acceptance and lists the re-measure request with a link to the survey', async () => {
      await open(studentReviewView());
      expect(el.querySelector('[data-test=reference-col]')).toBeNull();
      expect(el.querySelector('[data-test=reference-hidden]')?.textContent).toContain('once your survey is accepted');
      expect(text()).not.toContain('468 kΩ');
      expect(el.querySelector('mat-checkbox')).toBeNull();
      expect(el.querySelector('[formControlName=score]')).toBeNull();
      expect(text()).toContain('Hands off the probe tips.');
      expect(text()).toContain('Re-measure R9 without touching the tips.');
      expect(el.querySelector('[data-test=remeasure-list]')?.textContent?.trim()).toBe('R9 grid leak');
      const link = el.querySelector('a[href="/surveys/91"]');
      expect(Array.from(el.querySelectorAll('a')).some((a) => a.textContent?.includes('Re-measure now'))).toBeTrue();
      expect(link).not.toBeNull();
      expect(el.querySelector('button[aria-label^="Delete the comment"]')).toBeNull();
    });

    it('shows the reference once accepted (the twin)', async () => {
      const a = attempt({ review: { id: 95, decision: 'accepted', score: 90, suggestedScore: 80, comment: '', remeasureKeys: [], reviewer: { id: 7, name: 'Ada Voss' }, createdAt: '2030-04-03T10:00:00Z' } });
      await open(reviewView({ attempt: a, attempts: [a], surveyState: 'accepted' }));
      expect(el.querySelector('[data-test=reference-col]')).not.toBeNull();
      expect(text()).toContain('468 kΩ');
      expect(el.querySelector('[data-test=reference-hidden]')).toBeNull();
      expect(Array.from(el.querySelectorAll('a')).some((x) => x.textContent?.includes('Re-measure now'))).toBeFalse();
    });
  });
});

describe('ReviewPage, the row filter', () => {
  let http: HttpTestingController;
  beforeEach(() => ({ http } = classBed(['instructor'], 7)));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('shows all points, only those read, or those needing attention (disagreement, other verdict, hints, comments, marks)', async () => {
    const rows = reviewView().rows;
    const unread = { ...rows[0], testPointKey: 'tp-c2', label: 'C2 can section', student: { reading: null, verdict: null, uncertaintyOhms: null }, prediction: null, comparison: null };
    const { fixture, loader, el } = await mountPage(ReviewPage, { id: '81' });
    (await nextRequest(http, '/api/attempts/81/review')).flush(reviewView({ rows: [...rows, unread] }));
    await fixture.whenStable();
    const keys = () => Array.from(el.querySelectorAll('tr[data-key]')).map((r) => r.getAttribute('data-key'));
    expect(keys()).toEqual(['tp-r7', 'tp-r9', 'tp-v2', 'tp-c2']);
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: /^Read/ }))).check();
    expect(keys()).toEqual(['tp-r7', 'tp-r9', 'tp-v2']);
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: /^Needing attention/ }))).check();
    expect(keys()).toEqual(['tp-r9']);
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: /^All/ }))).check();
    await (await loader.getAllHarnesses(MatCheckboxHarness))[0].check();
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: /^Needing attention/ }))).check();
    expect(keys()).toEqual(['tp-r7', 'tp-r9']);
  });
});
