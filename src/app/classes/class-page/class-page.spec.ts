import { HttpTestingController } from '@angular/common/http/testing';
import { ComponentFixture } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTabGroupHarness } from '@angular/material/tabs/testing';
import type { ClassDetail } from '@domain/class-format';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { apiError, classBed, mountPage } from '../testing/class-bed';
import { assignmentSummary, classDetail, competencyRecord, results } from '../testing/class-fixtures';
import { ClassPage } from './class-page';
import { emailListValidator, emailsOf } from './sections/students-section';
import { FormControl } from '@angular/forms';

describe('ClassPage', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<ClassPage>;
  let loader: HarnessLoader;
  let el: HTMLElement;
  let text: () => string;

  async function open(c: ClassDetail): Promise<void> {
    ({ fixture, loader, el, text } = await mountPage(ClassPage, { id: String(c.id) }));
    (await nextRequest(http, `/api/classes/${c.id}`)).flush(c);
    await fixture.whenStable();
  }
  const tab = async (label: RegExp | string) => {
    await (await loader.getHarness(MatTabGroupHarness)).selectTab({ label });
    await fixture.whenStable();
  };
  const button = (t: string | RegExp) => loader.getHarness(MatButtonHarness.with({ text: t }));

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  describe('as the instructor', () => {
    beforeEach(() => ({ http } = classBed(['instructor'], 7)));

    it('shows the roster and the invitations, and revokes an open one', async () => {
      await open(classDetail());
      expect(text()).toContain('Tomas Brell');
      expect(text()).toContain('ines.marlow@example.org');
      const rows = Array.from(el.querySelectorAll('table[aria-label=Invitations] tbody tr'));
      expect(rows.map((r) => r.getAttribute('data-state'))).toEqual(['open', 'accepted']);
      expect(rows[1].querySelector('button')).toBeNull();
      await (await button(/Revoke/)).click();
      const req = await nextRequest(http, (r) => r.method === 'DELETE');
      expect(req.request.url).toBe('/api/classes/3/invitations/61');
      req.flush(null, { status: 204, statusText: 'No Content' });
      (await nextRequest(http, '/api/classes/3')).flush(classDetail({ invitations: [{ ...classDetail().invitations[0], state: 'revoked' }] }));
      await fixture.whenStable();
      expect(text()).toContain('The invitation of pell.orrin@example.org is revoked.');
      expect(el.querySelector('table[aria-label=Invitations] tbody tr')?.getAttribute('data-state')).toBe('revoked');
    });

    it('refuses a malformed address without a request, then invites the corrected list', async () => {
      await open(classDetail());
      const field = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=emails]' }));
      await field.setValue('rue.halden@example.org, not-an-address');
      await (await button(/Send invitations/)).click();
      await fixture.whenStable();
      expect(text()).toContain('Not an e-mail address: not-an-address.');
      http.expectNone((r) => r.method === 'POST');

      await field.setValue('rue.halden@example.org\nkai.stroud@example.org, rue.halden@example.org');
      await (await button(/Send invitations/)).click();
      const req = await nextRequest(http, (r) => r.method === 'POST');
      expect(req.request.url).toBe('/api/classes/3/invitations');
      expect(req.request.body).toEqual({ emails: ['rue.halden@example.org', 'kai.stroud@example.org'] });
      req.flush({ items: [] }, { status: 201, statusText: 'Created' });
      (await nextRequest(http, '/api/classes/3')).flush(classDetail());
      await fixture.whenStable();
    });

    it('removes a student after a confirmation', async () => {
      await open(classDetail());
      await (await button(/Remove Ines Marlow/)).click();
      expect(text()).toContain('Remove Ines Marlow? Their surveys stay.');
      await (await button('Remove')).click();
      const req = await nextRequest(http, (r) => r.method === 'DELETE');
      expect(req.request.url).toBe('/api/classes/3/students/22');
      req.flush(null, { status: 204, statusText: 'No Content' });
      (await nextRequest(http, '/api/classes/3')).flush(classDetail({ students: [classDetail().students[0], { ...classDetail().students[1], removedAt: '2027-02-01T10:00:00Z' }] }));
      await fixture.whenStable();
      expect(el.querySelector('table[aria-label="Students of the class"]')?.textContent).not.toContain('Ines Marlow');
      expect(text()).toContain('Removed: Ines Marlow');
    });

    it('archives the class and brings it back', async () => {
      await open(classDetail());
      await (await button(/Archive the class/)).click();
      const req = await nextRequest(http, (r) => r.method === 'PATCH');
      expect(req.request.url).toBe('/api/classes/3');
      expect(req.request.body).toEqual({ archived: true });
      req.flush(classDetail({ archived: true }));
      await fixture.whenStable();
      expect(text()).toContain('· archived');
      expect(await (await button(/Bring the class back/)).getText()).toContain('Bring the class back');
    });

    it('lists the assignments with the submissions waiting', async () => {
      await open(classDetail());
      await tab(/Assignments/);
      const row = el.querySelector('table[aria-label=Assignments] tbody tr');
      expect(row?.querySelector('a[href="/assignments/41"]')).not.toBeNull();
      expect(row?.textContent).toContain('predict first');
      expect(row?.textContent).toContain('verdicts after submission');
      expect(row?.querySelector('td.num')?.textContent?.trim()).toBe('2');
    });

    it('shows the results table with late and scores, the per-point agreement in words, and downloads the CSV', async () => {
      await open(classDetail());
      await tab('Results');
      (await nextRequest(http, '/api/classes/3/results')).flush(results());
      await fixture.whenStable();
      const rows = Array.from(el.querySelectorAll('table[aria-label="Results: students by assignments"] tbody tr'));
      expect(rows[0].textContent).toContain('Tomas Brell');
      expect(rows[0].querySelector('[data-status=late]')).not.toBeNull();
      expect(rows[1].textContent).toContain('score 88');
      expect(rows[1].textContent).toContain('2 attempts');
      const points = el.querySelector('table[aria-label="Agreement with the reference per test point"]')?.textContent ?? '';
      const shares = Array.from(el.querySelectorAll('table[aria-label="Agreement with the reference per test point"] tbody tr')).map((r) => Array.from(r.querySelectorAll('td')).map((td) => td.textContent?.trim()).join(' | '));
      // Where students go wrong first; a point nobody could be compared at is named apart, not charted.
      expect(shares).toEqual(['R9 grid leak | 50 % (1 of 2)', 'R7 plate load | 100 % (2 of 2)']);
      expect(el.querySelector('[data-test=uncompared]')?.textContent).toContain('Not compared at 1 test point: V3 pin 2 to chassis.');
      expect(points).not.toContain('R1 surge resistor');

      const click = spyOn(HTMLAnchorElement.prototype, 'click');
      await (await button(/Download CSV/)).click();
      const csv = await nextRequest(http, '/api/classes/3/results.csv');
      csv.flush('student,assignment,status\n', { headers: { 'Content-Disposition': 'attachment; filename="class-3-results.csv"' } });
      await fixture.whenStable();
      expect(click).toHaveBeenCalled();
    });

    it('signs off a competency for the chosen student and withdraws one only with a reason', async () => {
      await open(classDetail());
      await tab('Competencies');
      (await nextRequest(http, '/api/students/21/competencies')).flush(competencyRecord(['meter-check']));
      await fixture.whenStable();
      expect(el.querySelector('[data-key=meter-check] [data-test=signed]')?.textContent).toContain('by Ada Voss');
      expect(await (await loader.getHarness(MatSelectHarness)).getValueText()).toBe('Tomas Brell');

      await (await button(/Sign off Discharges the filter capacitors/)).click();
      await (await loader.getHarness(MatInputHarness.with({ selector: '[data-note]' }))).setValue('Seen on the Wren, bleeder and meter');
      await (await button('Sign off')).click();
      const req = await nextRequest(http, (r) => r.method === 'POST');
      expect(req.request.url).toBe('/api/students/21/competencies');
      expect(req.request.body).toEqual({ competencyKey: 'discharges-and-verifies', classId: 3, note: 'Seen on the Wren, bleeder and meter' });
      req.flush({}, { status: 201, statusText: 'Created' });
      (await nextRequest(http, '/api/students/21/competencies')).flush(competencyRecord(['meter-check', 'discharges-and-verifies']));
      await fixture.whenStable();
      expect(text()).toContain('Signed off for Tomas Brell.');

      await (await button(/Withdraw Checks the meter/)).click();
      await (await button('Withdraw')).click();
      await fixture.whenStable();
      expect(text()).toContain('Say why the sign-off is withdrawn.');
      http.expectNone((r) => r.method === 'POST');
      await (await loader.getHarness(MatInputHarness.with({ selector: '[data-note]' }))).setValue('Signed for the wrong student');
      await (await button('Withdraw')).click();
      const w = await nextRequest(http, (r) => r.method === 'POST');
      expect(w.request.url).toBe('/api/competency-signoffs/702/withdraw');
      expect(w.request.body).toEqual({ note: 'Signed for the wrong student' });
      w.flush({});
      (await nextRequest(http, '/api/students/21/competencies')).flush(competencyRecord(['discharges-and-verifies']));
      await fixture.whenStable();
    });

    it('offers no withdrawal of another instructor\'s sign-off', async () => {
      await open(classDetail());
      await tab('Competencies');
      (await nextRequest(http, '/api/students/21/competencies')).flush(competencyRecord(['meter-check'], 8));
      await fixture.whenStable();
      expect(el.querySelector('[data-key=meter-check] [data-test=signed]')?.textContent).toContain('Rue Halden');
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Withdraw/ }))).toEqual([]);
    });
  });

  describe('as a student', () => {
    beforeEach(() => ({ http } = classBed(['student'], 21)));

    it('shows the assignments with due dates and own status, and no roster, invitations or tabs', async () => {
      await open(
        classDetail({
          myRole: 'student',
          students: [],
          invitations: [],
          assignments: [assignmentSummary({ myStatus: 'returned', awaitingReview: null, mySurveyId: 91 }), assignmentSummary({ id: 42, title: 'Wren 3: the rectifier', dueAt: '2020-01-01T10:00:00Z', myStatus: 'draft', awaitingReview: null })],
        }),
      );
      expect(el.querySelector('mat-tab-group')).toBeNull();
      expect(text()).not.toContain('Invitations');
      expect(el.querySelector('a[href="/assignments/41"]')).not.toBeNull();
      expect(el.querySelector('[data-status=returned]')?.textContent).toContain('returned');
      const cards = Array.from(el.querySelectorAll('ul[aria-label="Assignments of this class"] li'));
      expect(cards[1].textContent).toContain('past the due date');
      expect(cards[0].textContent).not.toContain('past the due date');
    });

    it('says "not in it" for a 404', async () => {
      ({ fixture, el, text } = await mountPage(ClassPage, { id: '12' }));
      (await nextRequest(http, '/api/classes/12')).flush(...apiError(404, 'not-found', 'Not found.'));
      await fixture.whenStable();
      expect(text()).toContain('No such class, or you are not in it.');
    });
  });
});

describe('The invitation address list', () => {
  it('reads an address list: split on commas and lines, duplicates once; 1 to 50 valid addresses', () => {
    expect(emailsOf(' a@example.org,b@example.org\n\na@example.org ')).toEqual(['a@example.org', 'b@example.org']);
    expect(emailListValidator(new FormControl('', { nonNullable: true }))).toEqual({ required: true });
    expect(emailListValidator(new FormControl('a@example.org', { nonNullable: true }))).toBeNull();
    const many = Array.from({ length: 51 }, (_, i) => `s${i}@example.org`).join(',');
    expect(emailListValidator(new FormControl(many, { nonNullable: true }))).toEqual({ tooMany: 51 });
  });
});
