import { HttpTestingController } from '@angular/common/http/testing';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { configureBed, mount } from '../testing/section-bed';
import { ADA, gatesView, setDetail, surveyView } from '../testing/set-fixtures';
import { recordStages, rowLabel } from './record-rows';
import { SetRecord } from './set-record';

describe('recordStages', () => {
  it('groups the points by stage in bench order, each with its current reading (a follow-up supersedes what it follows)', () => {
    const stages = recordStages(surveyView());
    expect(stages.map((s) => s.name)).toEqual(['Detector and first audio']);
    const rows = stages[0].rows;
    expect(rows.map((r) => r.testPointKey)).toEqual(['tp-r1', 'tp-r2', 'tp-v1p']);
    expect(rows[0]).toEqual(jasmine.objectContaining({ label: 'R1', readingText: '14M', method: 'out-of-circuit', verdict: 'high', driftPct: 40, superseded: 1 }));
    expect(rows[1]).toEqual(jasmine.objectContaining({ label: 'R2', readingText: '240k', verdict: 'in-band', superseded: 0 }));
    expect(rows[2]).toEqual(jasmine.objectContaining({ readingText: '', verdict: null }));
    expect(rows[2].label).toContain('B+1');
  });

  it('follows the order a survey carried over', () => {
    const v = { ...surveyView(), order: ['tp-v1p', 'tp-r2', 'tp-r1'] };
    expect(recordStages(v)[0].rows.map((r) => r.testPointKey)).toEqual(['tp-v1p', 'tp-r2', 'tp-r1']);
  });

  it('rowLabel falls back to the test point key', () => {
    expect(rowLabel({ testPointKey: 'tp-x', component: null, from: null, to: null, pair: null, socket: null, kind: 'pair-relation' } as never)).toBe('tp-x');
  });
});

describe('SetRecord', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('prints each survey stage by stage with verdicts in words, the amendments, parts, gates, leads and bring-up', async () => {
    const { fixture, text } = await mount(SetRecord, { id: '5' });
    (await nextRequest(http, '/api/sets/5/record')).flush({
      generatedAt: '2026-03-05T10:00:00Z',
      set: setDetail({
        deviations: [{ key: 'dv-1', kind: 'non-original', componentKey: 'c-r2', nominal: { ohms: 220000, text: '220k' }, tolerancePct: null, note: 'replaced before intake' }],
        tubeRecords: [{ socketKey: 'so-v1', status: 'wrong-type', foundType: '12AT6', testResult: '82 %', note: '', recordedBy: ADA, updatedAt: '2024-03-02T10:00:00Z' }],
      }),
      surveys: [surveyView()],
      partsRecord: [{ id: 1, componentKey: 'c-r1', componentRef: 'R1', action: 'replaced', newPart: { text: '10M', ohms: 10e6, uF: null, watts: 0.5, volts: null, kind: 'carbon film', measuredText: '9M9', measuredOhms: 9.9e6 }, readingId: 102, reason: '', note: '', recordedBy: ADA, createdAt: '2024-03-04T10:00:00Z' }],
      gates: gatesView(),
      liftedLeads: [],
      bringUp: [],
    });
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelectorAll('section.stage').length).toBe(1);
    const stage = el.querySelector('section.stage')!.textContent!;
    expect(stage).toContain('Detector and first audio');
    expect(stage).toContain('14M (after 1 earlier)');
    expect(stage).toContain('high');
    expect(stage).toContain('in band');
    expect(text()).toContain('typo in the value');
    expect(text()).toContain('10M, 0.5 W, carbon film; measured 9M9');
    expect(text()).toContain('✓ signed');
    expect(text()).toContain('○ open');
    expect(text()).toContain('It certifies nothing');
    expect(text()).toContain('R2: non-original part found, 220 kΩ');
    expect(text()).toContain('V1 (12AV6): wrong type, found 12AT6, tube test 82 %');
    expect(el.querySelector('.no-print')).not.toBeNull();
  });

  it('says not shared with you for a 404', async () => {
    const { fixture, text } = await mount(SetRecord, { id: '9' });
    (await nextRequest(http, '/api/sets/9/record')).flush({ error: { code: 'not-found', message: 'Not found.' } }, { status: 404, statusText: 'Not Found' });
    await fixture.whenStable();
    expect(text()).toContain('No such set, or it is not shared with you.');
  });
});
