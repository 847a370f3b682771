import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, TestRequest, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { checkNetwork, type NetworkRequest } from '@domain/quick-check';
import { CALC_CONFIRM_DELAY_MS } from '../confirmation';
import { NetworkCheck } from './network-check';

describe('NetworkCheck', () => {
  let fixture: ComponentFixture<NetworkCheck>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const el = () => fixture.nativeElement as HTMLElement;
  const text = (test: string) => el().querySelector(`[data-test=${test}]`)?.textContent?.trim() ?? '';
  const pending = (): TestRequest[] => http.match('/api/calc/network');
  async function settle(): Promise<void> {
    await fixture.whenStable();
    await new Promise<void>((resolve) => setTimeout(resolve, 5));
    await fixture.whenStable();
  }
  async function answerAsServer(): Promise<void> {
    for (const req of pending()) if (!req.cancelled) req.flush(checkNetwork(req.request.body as NetworkRequest));
    await fixture.whenStable();
  }

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting(), { provide: CALC_CONFIRM_DELAY_MS, useValue: 0 }],
    });
    fixture = TestBed.createComponent(NetworkCheck);
    loader = TestbedHarnessEnvironment.loader(fixture);
    http = TestBed.inject(HttpTestingController);
    await settle();
  });

  afterEach(() => http.verify());

  it('shows the expected reading, healthy range and implied value of the worked example', async () => {
    // Worked by hand (series and parallel resistors, any circuits textbook; the component-check
    // formula R_x = R0·R_m/(R0 − R_m) of DESIGN.md §3.5 is the parallel rule solved for R_x):
    // R6 = 470 kΩ across V1.6–B+2. Without R6 the meter's other path is V1.6 → R7 220k → chassis
    // → R9 47k → B+1 → R8 22k → B+2 = 289 kΩ in series (R5 hangs off B+2 and carries nothing; C4 is
    // open at DC). Expected reading: 470 ∥ 289 = 470·289/759 = 178.959 kΩ → "179 kΩ".
    expect(text('effective')).toBe('179 kΩ');
    // Healthy range, every part −10 % then +10 %: 423 ∥ 260.1 = 161.063 kΩ; 517 ∥ 317.9 = 196.855 kΩ.
    expect(text('healthy')).toBe('161.1 kΩ to 196.9 kΩ');
    // Reading 205 kΩ, no meter U: R6 = 289·205/(289 − 205) = 59 245/84 = 705.298 kΩ.
    expect(text('implied')).toBe('705.3 kΩ');
    // Interval: the others high (R0 = 317.9 kΩ): 317.9·205/112.9 = 577.232 kΩ; the others low
    // (R0 = 260.1 kΩ): 260.1·205/55.1 = 967.704 kΩ.
    expect(text('interval')).toBe('577.2 kΩ to 967.7 kΩ');
    // Wholly above R6's band 423 … 517 kΩ: high, though the reading is far below 470 kΩ.
    expect(el().querySelector('[data-test=network-verdict]')?.getAttribute('data-verdict')).toBe('high');
    expect(text('explainable')).toContain('Explained by this part');
    expect(text('paths')).toContain('Without R6, the network reads 289 kΩ between V1.6 and B+2');
    await answerAsServer();
    expect(el().querySelector('dm-confirmation-status')?.textContent).toContain('Confirmed by the server');
  });

  it('says "not explained by this part" for a reading the part cannot give', async () => {
    // With R6 open the network reads 289 kΩ (317.9 kΩ with every other part at +10 %): 400 kΩ is
    // more than R6 can explain, whatever its value.
    await (await loader.getHarness(MatInputHarness.with({ selector: '[data-test=network-reading]' }))).setValue('400k');
    await settle();
    expect(text('explainable')).toContain('Not explained by this part.');
    expect(text('implied')).toBe('none');
    await answerAsServer();
  });

  it('previews pasted lines, flags a bad one, and takes the rows only once every line reads', async () => {
    await answerAsServer();
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'Paste as text' }))).check();
    const paste = await loader.getHarness(MatInputHarness.with({ selector: '[data-test=paste]' }));
    await paste.setValue('R1, V2.2, chassis, 1M, carbon-composition, 20\nR2, V2.2, V2.5, 4kk7\nR3, V2.5, chassis, 2k2, , 10');
    await fixture.whenStable();
    const bad = el().querySelector('[data-test=preview] tr[data-line="2"]')!;
    expect(bad.classList).toContain('bad');
    expect(bad.textContent).toContain("Problem: ohms: '4kk7': two multiplier letters");
    const good = el().querySelector('[data-test=preview] tr[data-line="1"]')!;
    expect(good.classList).not.toContain('bad');
    expect(good.textContent).toContain('1 MΩ');
    const use = await loader.getHarness(MatButtonHarness.with({ text: 'Use these rows' }));
    expect(await use.isDisabled()).toBeTrue();

    await paste.setValue('R1, V2.2, chassis, 1M, carbon-composition, 20\nR2, V2.2, V2.5, 4k7\nR3, V2.5, chassis, 2k2, , 10');
    await fixture.whenStable();
    expect(el().querySelectorAll('[data-test=preview] tr.bad').length).toBe(0);
    expect(await use.isDisabled()).toBeFalse();
    await use.click();
    await settle();
    // The table now holds the three pasted parts (the probes V1.6/B+2 of the example no longer exist).
    expect(el().querySelectorAll('.row').length).toBe(3);
    expect(text('network-problems')).toContain("unknown node 'V1.6'");
    expect(pending().length).toBe(0);
  });

  it('adds a row with Enter in the last cell and puts the cursor in its id', async () => {
    await answerAsServer();
    const tolerances = el().querySelectorAll<HTMLInputElement>('input[formcontrolname=tolerance]');
    expect(tolerances.length).toBe(6);
    tolerances[5].focus();
    tolerances[5].dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true }));
    await settle();
    const ids = el().querySelectorAll<HTMLInputElement>('input[formcontrolname=id]');
    expect(ids.length).toBe(7);
    expect(document.activeElement).toBe(ids[6]);
    // An empty row is a problem the page names, not a crash.
    expect(text('network-problems')).toContain('row 7: id');
  });
});
