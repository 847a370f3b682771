import { HttpTestingController } from '@angular/common/http/testing';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { apiError, classBed, mountPage } from '../testing/class-bed';
import { competencyRecord } from '../testing/class-fixtures';
import { CompetenciesPage } from './competencies-page';

describe('CompetenciesPage', () => {
  let http: HttpTestingController;

  beforeEach(() => ({ http } = classBed(['student'], 21)));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it("shows the student's own record, read-only", async () => {
    const { fixture, el, text } = await mountPage(CompetenciesPage);
    (await nextRequest(http, '/api/students/21/competencies')).flush(competencyRecord(['meter-check', 'measures-in-circuit']));
    await fixture.whenStable();
    expect(text()).toContain('2 of 7 signed off.');
    expect(el.querySelector('[data-key=meter-check] [data-test=signed]')?.textContent).toContain('Seen on the Wren');
    expect(el.querySelector('[data-key=discharges-and-verifies] [data-test=open]')).not.toBeNull();
    expect(el.querySelector('button')).toBeNull();
    expect(text()).not.toMatch(/\bis safe\b/i);
  });

  it('says when the record cannot be loaded', async () => {
    const { fixture, text } = await mountPage(CompetenciesPage);
    (await nextRequest(http, '/api/students/21/competencies')).flush(...apiError(500, 'internal', 'The server ran into a problem.'));
    await fixture.whenStable();
    expect(text()).toContain('Your record could not be loaded');
  });
});
