import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import type { ClassSummary } from '@domain/class-format';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { apiError, classBed, mountPage } from '../testing/class-bed';
import { classDetail } from '../testing/class-fixtures';
import { ClassList } from './class-list';

const summary = (over: Partial<ClassSummary> = {}): ClassSummary => {
  const { students: _s, invitations: _i, assignments: _a, ...rest } = classDetail();
  return { ...rest, ...over };
};

describe('ClassList', () => {
  let http: HttpTestingController;
  let navigations: string[];

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  describe('as an instructor', () => {
    beforeEach(() => ({ http, navigations } = classBed(['instructor'], 7)));

    it('lists the classes with counts, hides archived ones until asked', async () => {
      const { fixture, loader, el, text } = await mountPage(ClassList);
      (await nextRequest(http, '/api/classes')).flush({ items: [summary(), summary({ id: 4, name: 'Old autumn group', archived: true })] });
      await fixture.whenStable();
      expect(text()).toContain('Bench practice, evening group');
      expect(text().replace(/\s+/g, ' ')).toContain('you teach · 2 students · 1 assignment');
      expect(el.querySelector('a[href="/classes/3"]')).not.toBeNull();
      expect(text()).not.toContain('Old autumn group');
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Show 1 archived' }))).click();
      expect(text()).toContain('Old autumn group');
    });

    it('refuses a class without a name (no request), then creates one and opens it', async () => {
      const { fixture, loader, text } = await mountPage(ClassList);
      (await nextRequest(http, '/api/classes')).flush({ items: [] });
      await fixture.whenStable();
      await (await loader.getHarness(MatButtonHarness.with({ text: /New class/ }))).click();
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the class' }))).click();
      await fixture.whenStable();
      expect(text()).toContain('Name the class');
      http.expectNone((r) => r.method === 'POST');

      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('  Bench practice  ');
      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=term]' }))).setValue('Spring 2027');
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the class' }))).click();
      const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/classes');
      expect(req.request.body).toEqual({ name: 'Bench practice', term: 'Spring 2027' });
      req.flush(classDetail({ id: 9 }), { status: 201, statusText: 'Created' });
      await fixture.whenStable();
      expect(navigations).toContain('/classes/9');
    });

    it('puts the API\'s field error beside the field', async () => {
      const { fixture, loader, text } = await mountPage(ClassList);
      (await nextRequest(http, '/api/classes')).flush({ items: [] });
      await fixture.whenStable();
      await (await loader.getHarness(MatButtonHarness.with({ text: /New class/ }))).click();
      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('x');
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the class' }))).click();
      (await nextRequest(http, (r) => r.method === 'POST')).flush(...apiError(400, 'invalid', 'The name has a character that is not allowed.', 'name'));
      await fixture.whenStable();
      expect(text()).toContain('The name has a character that is not allowed.');
      expect(navigations.length).toBe(0);
    });
  });

  describe('as a student', () => {
    beforeEach(() => ({ http, navigations } = classBed(['student'], 21)));

    it('shows the classes they are in, no create button, and a link to their competencies', async () => {
      const { fixture, loader, el, text } = await mountPage(ClassList);
      (await nextRequest(http, '/api/classes')).flush({ items: [summary({ myRole: 'student' })] });
      await fixture.whenStable();
      expect(text()).toContain('taught by Ada Voss');
      expect(text()).not.toContain('2 students');
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /New class/ }))).toEqual([]);
      expect(el.querySelector('a[href="/competencies"]')).not.toBeNull();
    });

    it('explains how to join when in no class', async () => {
      const { fixture, text } = await mountPage(ClassList);
      (await nextRequest(http, '/api/classes')).flush({ items: [] });
      await fixture.whenStable();
      expect(text()).toContain('The invitation link in your instructor');
    });
  });
});
