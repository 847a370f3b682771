import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, nextTask, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { Correction, TemplateView } from '../templates-api';
import { TUBE, sampleDocument, view } from '../testing/template-fixtures';
import { TemplateDetail } from './template-detail';

const CORRECTION: Correction = {
  id: 5,
  targetLabel: 'component R2',
  templateId: 11,
  versionNumber: 2,
  target: { kind: 'component', key: 'c-r2' },
  change: { tolerancePct: 5 },
  note: 'Sheet says 5 %.',
  author: { id: 8, name: 'Bea Lindqvist' },
  state: 'open',
  decisionNote: null,
  decidedAt: null,
  createdAt: '2026-03-02T10:00:00Z',
};

describe('TemplateDetail', () => {
  let fixture: ComponentFixture<TemplateDetail>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  beforeEach(() => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  async function open(t: TemplateView, corrections: Correction[] = [], power: 'ac-dc' | 'transformer' = 'ac-dc'): Promise<void> {
    TestBed.inject(Auth).begin(sessionFor(['author'], 1, t.canEdit ? 7 : 9));
    fixture = TestBed.createComponent(TemplateDetail);
    fixture.componentRef.setInput('id', '11');
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    (await nextRequest(http, '/api/templates/11')).flush(t);
    (await nextRequest(http, '/api/templates/11/corrections')).flush({ items: corrections });
    const doc = sampleDocument();
    doc.chassis.power = power;
    doc.chassis.hotChassis = power === 'ac-dc';
    (await nextRequest(http, '/api/templates/11/versions/2')).flush({ ...t.versions[0], templateId: 11, content: doc });
    (await nextRequest(http, '/api/tube-types/12AV6')).flush(TUBE);
    // One list of files for the page's strips (the template's and each stage's).
    (await nextRequest(http, '/api/templates/11/files')).flush({ templateId: 11, items: [] });
    await nextTask();
    await fixture.whenStable();
  }

  const text = () => ((fixture.nativeElement as HTMLElement).textContent ?? '').replace(/\s+/g, ' ');

  it('shows the latest version: the hot-chassis caution, versions by word, components, test points in bench order, the socket', async () => {
    await open(view());
    expect(text()).toContain('the chassis may be at mains potential');
    expect(text()).toContain('a variac isolates nothing');
    expect(text()).toContain('verified published');
    const el = fixture.nativeElement as HTMLElement;
    expect(Array.from(el.querySelectorAll('#points-title ~ .table-wrap tbody tr')).map((tr) => tr.querySelector('td:nth-child(3)')?.textContent?.trim())).toEqual([
      'R1: V1.1 to chassis',
      'R2: V1.7 to B+1',
      'V1.7 to B+1',
    ]);
    expect(el.querySelector('dm-socket-view [data-pin="7"]')?.getAttribute('aria-label')).toBe('pin 7, plate');
    expect(text()).toContain('bottom view');
  });

  it('leaves the caution out for a transformer set', async () => {
    await open(view({ power: 'transformer' }), [], 'transformer');
    expect(text()).not.toContain('the chassis may be at mains potential');
  });

  it('offers a reader Copy, Export and a correction, and none of the owner’s actions', async () => {
    await open(view());
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Copy/ }))).not.toBeNull();
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Send a correction/ }))).not.toBeNull();
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Sharing/ }))).toBeNull();
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /^Retire/ }))).toBeNull();
  });

  it('gives the owner the inbox; accepting sends the decision and shows it', async () => {
    await open(view({ canEdit: true, own: true, draft: null, sharedWith: [], revision: 4 }), [CORRECTION]);
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Sharing/ }))).not.toBeNull();
    expect(text()).toContain('Corrections inbox');
    expect(text()).toContain('On version 2, component R2, from Bea Lindqvist');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Accept' }))).click();
    await nextTask();
    const confirm = document.querySelector('mat-dialog-container button[type=submit]') as HTMLButtonElement;
    expect(confirm.textContent).toContain('Accept into the draft');
    confirm.click();
    const decision = await nextRequest(http, '/api/templates/11/corrections/5/decision');
    expect(decision.request.body).toEqual({ decision: 'accept' });
    decision.flush({ correction: { ...CORRECTION, state: 'accepted' }, draft: { revision: 5 } });
    // The template reloads to show the draft bumped.
    (await nextRequest(http, '/api/templates/11')).flush(view({ canEdit: true, own: true, draft: { revision: 5, updatedAt: '2026-03-03T10:00:00Z' }, revision: 5 }));
    (await nextRequest(http, '/api/templates/11/corrections')).flush({ items: [{ ...CORRECTION, state: 'accepted' }] });
    await fixture.whenStable();
    expect(text()).toContain('Revision 5');
    expect(text()).toContain('check_circle accepted');
  });
});
