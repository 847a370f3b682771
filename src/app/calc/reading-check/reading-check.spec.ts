import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, TestRequest, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { checkReading, type VerdictRequest } from '@domain/quick-check';
import { CALC_CONFIRM_DELAY_MS } from '../confirmation';
import { ReadingCheck } from './reading-check';

describe('ReadingCheck', () => {
  let fixture: ComponentFixture<ReadingCheck>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const el = () => fixture.nativeElement as HTMLElement;
  const verdict = () => el().querySelector('[data-test=verdict]')?.getAttribute('data-verdict') ?? null;
  const status = () => el().querySelector('dm-confirmation-status')?.textContent?.trim() ?? '';
  const readingInput = () => loader.getHarness(MatInputHarness.with({ selector: '[data-test=reading]' }));
  const nominalInput = () => loader.getHarness(MatInputHarness.with({ selector: '[data-test=nominal]' }));
  const pending = (): TestRequest[] => http.match('/api/calc/verdict');
  /** Lets the confirmation's timer (0 ms here) fire and the view settle. */
  async function settle(): Promise<void> {
    await fixture.whenStable();
    await new Promise<void>((resolve) => setTimeout(resolve, 5));
    await fixture.whenStable();
  }
  /** Answers every open verdict request as the server does (the same domain function). */
  async function answerAsServer(): Promise<void> {
    for (const req of pending()) if (!req.cancelled) req.flush(checkReading(req.request.body as VerdictRequest));
    await fixture.whenStable();
  }

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting(), { provide: CALC_CONFIRM_DELAY_MS, useValue: 0 }],
    });
    fixture = TestBed.createComponent(ReadingCheck);
    loader = TestbedHarnessEnvironment.loader(fixture);
    http = TestBed.inject(HttpTestingController);
    await settle();
    await answerAsServer();
  });

  afterEach(() => http.verify());

  it('opens on the prefilled example, judged here and confirmed by the server', async () => {
    // 100 kΩ ±10 %, reading 108.6 kΩ: drift +8.6 % (less 0.2 Ω of leads: +8.5998 %), beyond 0.75 × 10 % → near limit.
    expect(verdict()).toBe('near-limit');
    expect(el().querySelector('[data-test=drift]')?.textContent).toContain('+8.60 %');
    expect(status()).toContain('Confirmed by the server');
  });

  it('updates the verdict as a reading is typed, before any answer from the server', async () => {
    await (await readingInput()).setValue('120k');
    await fixture.whenStable();
    // 120 kΩ is above the band's upper limit 110 kΩ (100 kΩ + 10 %): high, shown with no HTTP answer yet.
    expect(verdict()).toBe('high');
    expect(status()).not.toContain('Confirmed');
    await settle();
    const requests = pending().filter((r) => !r.cancelled);
    expect(requests.length).toBe(1);
    expect((requests[0].request.body as VerdictRequest).reading).toBe('120k');
    requests[0].flush(checkReading(requests[0].request.body as VerdictRequest));
    await fixture.whenStable();
    expect(status()).toContain('Confirmed by the server');
    expect(verdict()).toBe('high');
  });

  it('keeps the focus and the typed text when the server answers, and says where it differs', async () => {
    const input = await readingInput();
    await input.focus();
    await input.setValue('104.2k');
    await settle();
    const field = el().querySelector<HTMLInputElement>('[data-test=reading]')!;
    expect(document.activeElement).toBe(field);
    const [req] = pending().filter((r) => !r.cancelled);
    // A server answer that disagrees (as a stale server might): the page shows the discrepancy.
    req.flush({ ...checkReading(req.request.body as VerdictRequest), verdict: 'high' });
    await fixture.whenStable();
    expect(document.activeElement).toBe(field);
    expect(field.value).toBe('104.2k');
    expect(verdict()).toBe('in-band');
    expect(status()).toContain('differs');
    expect(status()).toContain('the server says high, this page in-band');
  });

  it('shows the notation module’s message beside the reading, and no verdict, for text it cannot read', async () => {
    await (await readingInput()).setValue('4kk7');
    await settle();
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Reading' }));
    const errors = await field.getTextErrors();
    expect(errors.length).toBe(1);
    expect(errors[0]).toContain("'4kk7': two multiplier letters");
    expect(verdict()).toBeNull();
    expect(el().querySelector('[data-test=no-verdict]')).not.toBeNull();
    expect(pending().length).toBe(0);

    await (await readingInput()).setValue('4k7');
    await settle();
    expect(await field.getTextErrors()).toEqual([]);
    expect(verdict()).toBe('low');
    await answerAsServer();
  });

  it('explains a lower-case m in the nominal beside the nominal', async () => {
    await (await nominalInput()).setValue('1m');
    await settle();
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Nominal' }));
    expect((await field.getTextErrors())[0]).toContain('lower-case m is milli');
    expect(verdict()).toBeNull();

    await (await nominalInput()).setValue('1M');
    await settle();
    expect(await field.getTextErrors()).toEqual([]);
    // 108.6 kΩ against 1 MΩ ±10 %: far below the band.
    expect(verdict()).toBe('low');
    await answerAsServer();
  });

  it('takes the nominal and tolerance from the colour bands picked', async () => {
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'Pick colour bands' }))).check();
    await settle();
    // The picker opens on brown black yellow silver: 1, 0, ×10⁴, ±10 % = 100 kΩ ±10 % (IEC 60062:2016 colour table).
    expect(await (await nominalInput()).getValue()).toBe('100 kΩ ±10 %');
    await answerAsServer();

    const multiplier = await loader.getHarness(MatSelectHarness.with({ selector: '[data-band="2"]' }));
    await multiplier.open();
    await multiplier.clickOptions({ text: 'orange' });
    await settle();
    // brown black orange silver: 1, 0, ×10³, ±10 % = 10 kΩ ±10 % (IEC 60062:2016 colour table).
    expect(await (await nominalInput()).getValue()).toBe('10 kΩ ±10 %');
    const tolerance = await loader.getHarness(MatSelectHarness.with({ selector: '[data-test=tolerance]' }));
    expect(await tolerance.getValueText()).toBe('As marked (letter, ±N % or bands)');
    // The band is 9 kΩ … 11 kΩ, so the reading of 108.6 kΩ is high.
    expect(el().querySelector('.figures')?.textContent).toContain('9 kΩ – 11 kΩ');
    expect(verdict()).toBe('high');
    await answerAsServer();
  });

  it('moves the guard band in by U under the guarded rule', async () => {
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'Guarded' }))).check();
    await (await readingInput()).setValue('109.5k');
    await settle();
    // check-values.md §3 [CALC]: 100 kΩ ±10 %, 109.5 kΩ on the 200 k range of the worked 2000-count
    // meter: conditional pass, p_c ≈ 0.79 (normal approximation); acceptance limit 108.753 kΩ.
    expect(verdict()).toBe('inconclusive');
    expect(el().textContent).toContain('conditional pass');
    expect(el().querySelector('[data-test=band-bar] desc')?.textContent).toContain('Guard band: accepted from 91.06 kΩ to 108.8 kΩ');
    await answerAsServer();

    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'Simple' }))).check();
    await settle();
    expect(verdict()).toBe('near-limit');
    await answerAsServer();
  });
});
