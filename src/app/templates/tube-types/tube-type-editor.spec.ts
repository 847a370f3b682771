import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, nextTask, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { TUBE } from '../testing/template-fixtures';
import { TubeTypeEditor, pinsFromRows } from './tube-type-editor';

describe('TubeTypeEditor', () => {
  let fixture: ComponentFixture<TubeTypeEditor>;
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

  async function open(designation?: string): Promise<void> {
    TestBed.inject(Auth).begin(sessionFor(['author'], 1, 7));
    fixture = TestBed.createComponent(TubeTypeEditor);
    if (designation) fixture.componentRef.setInput('designation', designation);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  }

  const el = () => fixture.nativeElement as HTMLElement;
  const pinRows = () => Array.from(el().querySelectorAll('table.pins tbody tr')).map((tr) => tr.getAttribute('data-pin'));
  const drawnPin = (n: number) => el().querySelector(`dm-socket-view [data-pin="${n}"]`)?.getAttribute('aria-label');

  async function electrode(pin: number, text: RegExp): Promise<void> {
    const select = await loader.getHarness(MatSelectHarness.with({ selector: `tr[data-pin="${pin}"] mat-select` }));
    await select.open();
    await select.clickOptions({ text });
  }

  it('has one pin row per pin of the base, and follows a change of base', async () => {
    await open();
    expect(pinRows()).toEqual(['1', '2', '3', '4', '5', '6', '7', '8', '9']);
    const base = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=base]' }));
    await base.open();
    await base.clickOptions({ text: 'octal' });
    expect(pinRows()).toEqual(['1', '2', '3', '4', '5', '6', '7', '8']);
  });

  it('draws the socket live as electrodes are chosen, NC and IC marked', async () => {
    await open();
    expect(drawnPin(1)).toBe('pin 1, not listed');
    await electrode(1, /^p — plate/);
    expect(drawnPin(1)).toBe('pin 1, plate');
    await electrode(6, /^IC —/);
    expect(drawnPin(6)).toBe('pin 6, IC, internally connected, not a tie point');
    await electrode(9, /^NC —/);
    expect(drawnPin(9)).toBe('pin 9, NC, no connection');
  });

  it('adds a tube type with the pins chosen (unlisted pins left out) and its tie', async () => {
    await open();
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=designation]' }))).setValue('6av6');
    await electrode(1, /^g — grid$/);
    await electrode(3, /^h —/);
    await electrode(4, /^h —/);
    await electrode(5, /^d —/);
    await electrode(6, /^d —/);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a tie/ }))).click();
    const [a, b] = await loader.getAllHarnesses(MatSelectHarness.with({ selector: '.tie mat-select' }));
    await a.open();
    await a.clickOptions({ text: /^5 / });
    await b.open();
    await b.clickOptions({ text: /^6 / });
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add to the library' }))).click();
    const req = await nextRequest(http, '/api/tube-types');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({
      designation: '6AV6',
      base: 'noval',
      heating: 'indirect',
      heaterVolts: 6.3,
      heaterAmps: 0.3,
      pins: [
        { pin: 1, electrode: 'g', label: 'grid' },
        { pin: 3, electrode: 'h', label: 'heater' },
        { pin: 4, electrode: 'h', label: 'heater' },
        { pin: 5, electrode: 'd', label: 'diode plate' },
        { pin: 6, electrode: 'd', label: 'diode plate' },
      ],
      ties: [[5, 6]],
      notes: '',
    });
    req.flush({ ...TUBE, designation: '6AV6', canEdit: true }, { status: 201, statusText: 'Created' });
  });

  it("shows the API's problems naming the pin", async () => {
    await open();
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=designation]' }))).setValue('6X9');
    await electrode(2, /^h —/);
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add to the library' }))).click();
    (await nextRequest(http, '/api/tube-types')).flush(
      {
        error: {
          code: 'validation',
          message: 'The tube type has a problem: "pins" an indirectly heated tube needs two pins of electrode "h".',
          details: { field: 'pins[0].pin', problems: [{ path: 'pins[0].pin', message: 'a noval base has pins 1 to 9.' }] },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await nextTask();
    await fixture.whenStable();
    expect(el().querySelector('[role=alert]')?.textContent).toContain('pin 2 (pins[0].pin) — a noval base has pins 1 to 9.');
  });

  it('shows a type someone else entered read-only, drawn from its pins', async () => {
    await open('12av6');
    (await nextRequest(http, '/api/tube-types/12av6')).flush(TUBE);
    await fixture.whenStable();
    expect(pinRows()).toEqual(['1', '2', '3', '4', '5', '6', '7']);
    expect(drawnPin(7)).toBe('pin 7, plate');
    expect(el().textContent).toContain('Only they (as an author) or an admin may change it.');
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Save changes/ }))).toBeNull();
  });

  it('lets its creator change it', async () => {
    await open('12AV6');
    (await nextRequest(http, '/api/tube-types/12AV6')).flush({ ...TUBE, canEdit: true });
    await fixture.whenStable();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save changes' }))).click();
    const put = await nextRequest(http, '/api/tube-types/12AV6');
    expect(put.request.method).toBe('PUT');
    expect((put.request.body as { pins: unknown[] }).pins.length).toBe(7);
    put.flush({ ...TUBE, canEdit: true });
  });
});

describe('pinsFromRows', () => {
  it('leaves out pins without an electrode and gives a blank label its default word', () => {
    expect(
      pinsFromRows([
        { pin: 1, electrode: 'k', label: '' },
        { pin: 2, electrode: '', label: 'stale' },
        { pin: 3, electrode: 'p', label: 'plate (section 2)' },
      ]),
    ).toEqual([
      { pin: 1, electrode: 'k', label: 'cathode' },
      { pin: 3, electrode: 'p', label: 'plate (section 2)' },
    ]);
  });
});
