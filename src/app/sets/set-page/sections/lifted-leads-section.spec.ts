import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { clearAuthStorage, nextRequest } from '../../../../testing/http-testing';
import type { LiftedLeadRecord } from '@domain/set-format';
import { configureBed, mount } from '../../testing/section-bed';
import { ADA, setDetail } from '../../testing/set-fixtures';
import { LiftedLeadsSection } from './lifted-leads-section';

const lead = (over: Partial<LiftedLeadRecord> = {}): LiftedLeadRecord => ({
  id: 3,
  setId: 5,
  surveyId: 31,
  componentKey: 'c-r1',
  componentRef: 'R1',
  end: 0,
  node: 'V1.1',
  promptedByReadingId: 101,
  liftedBy: ADA,
  liftedAt: '2026-03-02T10:00:00Z',
  resolderedBy: null,
  resolderedAt: null,
  recheckReadingId: null,
  note: '',
  ...over,
});

describe('LiftedLeadsSection', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('moves a lead from open to re-soldered, and says so when it already was (409)', async () => {
    const { fixture, loader, text } = await mount(LiftedLeadsSection, { set: setDetail({ openLiftedLeads: 1 }) });
    (await nextRequest(http, '/api/sets/5/lifted-leads')).flush({ items: [lead(), lead({ id: 4, componentRef: 'R2', node: 'V1.7' })] });
    await fixture.whenStable();
    expect(text()).toContain('Open (2)');
    let changed = 0;
    fixture.componentInstance.changed.subscribe(() => changed++);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Re-soldered R1/ }))).click();
    const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/lifted-leads/3/resolder');
    expect(req.request.body).toEqual({ note: '' });
    req.flush(lead({ resolderedBy: ADA, resolderedAt: '2026-03-02T11:00:00Z' }));
    await fixture.whenStable();
    expect(text()).toContain('Open (1)');
    expect(text()).toContain('Re-soldered (1)');
    expect(changed).toBe(1);

    await (await loader.getHarness(MatButtonHarness.with({ text: /Re-soldered R2/ }))).click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/lifted-leads/4/resolder')).flush(
      { error: { code: 'already-resoldered', message: 'Already re-soldered.' } },
      { status: 409, statusText: 'Conflict' },
    );
    (await nextRequest(http, '/api/sets/5/lifted-leads')).flush([lead({ resolderedAt: '2026-03-02T11:00:00Z' }), lead({ id: 4, componentRef: 'R2', resolderedAt: '2026-03-02T11:05:00Z' })]);
    await fixture.whenStable();
    expect(text()).toContain('That lead is already marked re-soldered.');
    expect(text()).toContain('Open (0)');
    expect(changed).toBe(1);
  });
});
