import { HttpTestingController } from '@angular/common/http/testing';
import { ComponentFixture } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import type { AssignmentDetail } from '@domain/class-format';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { apiError, classBed, mountPage } from '../testing/class-bed';
import { assignmentDetail, attempt } from '../testing/class-fixtures';
import { AssignmentPage, queueOrder } from './assignment-page';

describe('AssignmentPage', () => {
  let http: HttpTestingController;
  let navigations: string[];
  let fixture: ComponentFixture<AssignmentPage>;
  let loader: HarnessLoader;
  let el: HTMLElement;
  let text: () => string;

  async function open(a: AssignmentDetail): Promise<void> {
    ({ fixture, loader, el, text } = await mountPage(AssignmentPage, { id: String(a.id) }));
    (await nextRequest(http, `/api/assignments/${a.id}`)).flush(a);
    await fixture.whenStable();
  }

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  describe('as the instructor', () => {
    beforeEach(() => ({ http, navigations } = classBed(['instructor'], 7)));

    it('lists the queue with "late" on a submission after the due date, waiting reviews first, and links to the review', async () => {
      await open(assignmentDetail());
      const rows = Array.from(el.querySelectorAll('table[aria-label="Submission queue"] tbody tr'));
      expect(rows.map((r) => r.getAttribute('data-status'))).toEqual(['submitted', 'accepted', 'not-started']);
      expect(rows[0].textContent).toContain('Tomas Brell');
      expect(rows[0].querySelector('[data-status=late]')?.textContent).toContain('late');
      expect(rows[1].querySelector('[data-status=late]')).toBeNull();
      expect(rows[1].textContent).toContain('88');
      expect(rows[2].querySelector('[data-status=late]')).toBeNull();
      expect(rows[0].querySelector('a[href="/attempts/81/review"]')?.textContent).toContain('Review');
      expect(rows[2].querySelector('a')).toBeNull();
      expect(text()).toContain('1 submission waits for review.');
      expect(el.querySelector('a[href="/surveys/70"]')?.textContent).toContain('reference survey');
    });

    it('marks a student who has not handed in after the due date late too, not before it', async () => {
      await open(assignmentDetail({ dueAt: '2020-01-01T10:00:00Z' }));
      const rows = Array.from(el.querySelectorAll('table[aria-label="Submission queue"] tbody tr'));
      expect(rows[2].getAttribute('data-status')).toBe('not-started');
      expect(rows[2].querySelector('[data-status=late]')).not.toBeNull();
      expect(rows[1].querySelector('[data-status=late]')).toBeNull();
    });

    it('says so when there is no reference survey yet', async () => {
      await open(assignmentDetail({ referenceSurveyId: null }));
      expect(text()).toContain('No reference survey yet');
    });

    it('says "not one of your classes" for a 404', async () => {
      ({ fixture, el, text } = await mountPage(AssignmentPage, { id: '404' }));
      (await nextRequest(http, '/api/assignments/404')).flush(...apiError(404, 'not-found', 'Not found.'));
      await fixture.whenStable();
      expect(text()).toContain('No such assignment, or it is not one of your classes.');
    });
  });

  describe('as a student', () => {
    beforeEach(() => ({ http, navigations } = classBed(['student'], 21)));

    const mine = (over: Partial<AssignmentDetail> = {}) => assignmentDetail({ queue: [], referenceSurveyId: null, myStatus: 'not-started', mySurveyId: null, awaitingReview: null, ...over });

    it('shows the due date, the training set card with the hot-chassis caution, and no queue', async () => {
      await open(mine());
      (await nextRequest(http, '/api/meter-profiles')).flush({ items: [] });
      expect(text()).toContain('Bench Wren A');
      expect(text()).toContain('serial QW3-118');
      expect(el.querySelector('[data-test=hot-chassis]')?.textContent).toContain('Hot chassis: the chassis may be at mains potential');
      expect(el.querySelector('[data-test=hot-chassis]')?.textContent).toContain('local codes');
      expect(el.querySelector('table[aria-label="Submission queue"]')).toBeNull();
      expect(el.querySelector('a[href="/sets/5"]')).toBeNull();
      expect(text()).toContain('Predict first');
    });

    it('leaves the caution out for a transformer set', async () => {
      await open(mine({ set: { ...assignmentDetail().set, hotChassis: false } }));
      (await nextRequest(http, '/api/meter-profiles')).flush({ items: [] });
      expect(el.querySelector('[data-test=hot-chassis]')).toBeNull();
    });

    it('starts the class survey with the chosen meter and opens the grid', async () => {
      await open(mine());
      (await nextRequest(http, '/api/meter-profiles')).flush({ items: [] });
      await (await loader.getHarness(MatButtonHarness.with({ text: /Start the survey/ }))).click();
      const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/assignments/41/survey');
      expect(req.request.body).toEqual({});
      req.flush({ surveyId: 91 }, { status: 201, statusText: 'Created' });
      await fixture.whenStable();
      expect(navigations).toContain('/surveys/91');
    });

    it('shows a refused start and stays', async () => {
      await open(mine());
      (await nextRequest(http, '/api/meter-profiles')).flush({ items: [] });
      await (await loader.getHarness(MatButtonHarness.with({ text: /Start the survey/ }))).click();
      (await nextRequest(http, (r) => r.method === 'POST')).flush(...apiError(403, 'not-a-member', 'You are no longer in this class.'));
      await fixture.whenStable();
      expect(text()).toContain('You are no longer in this class.');
      expect(navigations).not.toContain('/surveys/91');
    });

    it('offers "Re-measure now" on a returned survey and lists the attempts with their reviews', async () => {
      const first = attempt({ review: { id: 95, decision: 'returned', score: 40, suggestedScore: 50, comment: 'Re-measure R9.', remeasureKeys: ['tp-r9'], reviewer: { id: 7, name: 'Ada Voss' }, createdAt: '2030-04-03T10:00:00Z' }, late: true });
      await open(mine({ myStatus: 'returned', mySurveyId: 91, myAttempts: [first] }));
      const link = el.querySelector('a[href="/surveys/91"]');
      expect(link?.textContent).toContain('Re-measure now');
      expect(text()).toContain('Attempt 1');
      expect(text()).toContain('1 test point to re-measure');
      expect(text()).toContain('Re-measure R9.');
      expect(el.querySelector('a[href="/attempts/81/review"]')).not.toBeNull();
    });
  });
});

describe('queueOrder', () => {
  it('orders the queue: waiting first (oldest first), then returned, accepted, in progress, not started', () => {
    const q = assignmentDetail().queue;
    const late = { ...q[0], student: { id: 30, name: 'Ada Late' }, latestAttempt: { ...q[0].latestAttempt!, submittedAt: '2030-04-05T10:00:00Z' } };
    expect(queueOrder([q[2], late, q[1], q[0]]).map((e) => e.student.name)).toEqual(['Tomas Brell', 'Ada Late', 'Ines Marlow', 'Pell Orrin']);
  });
});

describe('AssignmentPage, changing the assignment', () => {
  let http: HttpTestingController;

  beforeEach(() => ({ http } = classBed(['instructor'], 7)));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('refuses a due date moved into the past, then sends only the changed fields', async () => {
    const { fixture, loader, text } = await mountPage(AssignmentPage, { id: '41' });
    (await nextRequest(http, '/api/assignments/41')).flush(assignmentDetail());
    await fixture.whenStable();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Change the assignment/ }))).click();
    (await nextRequest(http, '/api/sets/5/surveys')).flush({ items: [] });
    await fixture.whenStable();
    const due = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=dueAt]' }));
    await due.setValue('2001-01-01T10:00');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    await fixture.whenStable();
    expect(text()).toContain('The due date is in the past.');
    http.expectNone((r) => r.method === 'PATCH');

    await due.setValue('2031-05-01T18:00');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'PATCH');
    expect(req.request.url).toBe('/api/assignments/41');
    expect(req.request.body).toEqual({ dueAt: new Date('2031-05-01T18:00').toISOString() });
    req.flush(assignmentDetail({ dueAt: new Date('2031-05-01T18:00').toISOString() }));
    await fixture.whenStable();
    expect(text()).toContain('Assignment saved.');
    expect(text()).toContain('2031');
  });
});
