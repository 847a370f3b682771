import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../../testing/http-testing';
import { Auth } from '../../../core/auth/auth';
import { authToken } from '../../../core/http/auth-token';
import { httpErrors } from '../../../core/http/http-errors';
import { BRAM, gatesView, setDetail } from '../../testing/set-fixtures';
import { GatesSection } from './gates-section';

describe('GatesSection', () => {
  let fixture: ComponentFixture<GatesSection>;
  let loader: HarnessLoader;
  let http: HttpTestingController;
  const text = () => (fixture.nativeElement as HTMLElement).textContent ?? '';

  beforeEach(async () => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Auth).begin(sessionFor(['technician'], 1, 7));
    fixture = TestBed.createComponent(GatesSection);
    fixture.componentRef.setInput('set', setDetail());
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    (await nextRequest(http, '/api/sets/5/gates')).flush(gatesView());
    await fixture.whenStable();
  });
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('shows each item open or signed in words, with its caution and the safety caution; never calls the set safe', async () => {
    expect(text()).toContain('Caution: this work can hurt you');
    const items = Array.from((fixture.nativeElement as HTMLElement).querySelectorAll('.gate'));
    expect(items[0].textContent).toContain('Open');
    expect(items[0].textContent).toContain('Connect the speaker before power.');
    expect(items[1].textContent).toContain('Signed');
    expect(items[1].textContent).toContain('Signed by Bram Oduya');
    expect(items[1].textContent).toContain('1 A slow');
    // The shared caution says that nothing here means a set is safe; the items and the first-power block say nothing of safety.
    expect((fixture.nativeElement as HTMLElement).querySelector('ul[aria-label="Gate items"]')?.textContent).not.toMatch(/\bsafe\b/i);
    expect((fixture.nativeElement as HTMLElement).querySelector('section[aria-labelledby=first-power-title]')?.textContent).not.toMatch(/\bsafe\b/i);
  });

  it('signs an item with its note, and reopens a signed one', async () => {
    const notes = await loader.getAllHarnesses(MatInputHarness);
    await notes[0].setValue('8 Ω speaker on');
    await (await loader.getHarness(MatButtonHarness.with({ text: /^Sign/ }))).click();
    const sign = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/gates/load-connected/sign');
    expect(sign.request.body).toEqual({ note: '8 Ω speaker on' });
    sign.flush({});
    (await nextRequest(http, '/api/sets/5/gates')).flush(gatesView());
    await fixture.whenStable();
    // Reopening needs a reason: refused without one, sent with it.
    await (await loader.getHarness(MatButtonHarness.with({ text: /^Reopen/ }))).click();
    await fixture.whenStable();
    http.expectNone((r) => r.url.endsWith('/reopen'));
    expect((fixture.nativeElement as HTMLElement).querySelector('[role=alert]')?.textContent).toContain('Say why you reopen');
    await (await loader.getAllHarnesses(MatInputHarness))[1].setValue('fuse holder cracked');
    await (await loader.getHarness(MatButtonHarness.with({ text: /^Reopen/ }))).click();
    const reopen = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/gates/fuse-in-hot-lead/reopen');
    expect(reopen.request.body).toEqual({ note: 'fuse holder cracked' });
    reopen.flush({});
    (await nextRequest(http, '/api/sets/5/gates')).flush(gatesView());
  });

  it('shows the reasons of a refused "ready for first power", and records it once nothing is open', async () => {
    let changed = 0;
    fixture.componentInstance.changed.subscribe(() => changed++);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Ready for first power/ }))).click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/first-power')).flush(
      {
        error: {
          code: 'first-power-blocked',
          message: 'Not recorded as ready for first power: a lifted lead is not re-soldered: R12 (end at V3.7).',
          details: { blockers: [{ kind: 'lifted-lead', leadId: 3, componentRef: 'R12', end: 0, node: 'V3.7' }] },
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await fixture.whenStable();
    const alert = (fixture.nativeElement as HTMLElement).querySelector('[role=alert]');
    expect(alert?.textContent).toContain('Not recorded as ready for first power');
    expect(alert?.textContent).toContain('Lifted lead not re-soldered: R12 (end at V3.7)');
    expect(changed).toBe(0);

    await (await loader.getHarness(MatButtonHarness.with({ text: /Ready for first power/ }))).click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/first-power')).flush({});
    (await nextRequest(http, '/api/sets/5/gates')).flush(gatesView({ blockers: [], firstPower: { at: '2026-03-05T10:00:00Z', by: BRAM, note: '' } }));
    await fixture.whenStable();
    expect(changed).toBe(1);
    expect(text()).toContain('Recorded');
    expect((fixture.nativeElement as HTMLElement).querySelector('[role=alert]')).toBeNull();
  });
});
