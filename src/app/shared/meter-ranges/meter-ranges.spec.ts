import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { ChangeDetectionStrategy, ChangeDetectorRef, Component, inject, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { FormArray, FormControl, FormGroup, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import type { MeterProfile } from '@domain/meter';
import { METER_PRESETS } from '../../calc/meter-editor/meter-presets';
import { MeterRanges } from './meter-ranges';
import { analogueRangeRow, AnalogueRangeRow, DigitalRangeRow, digitalRangeRow, loadMeterRanges, nextDigitalRange, presetOnSwitch, rangesPart } from './meter-range-rows';

/** A caller as the meter pages are: an OnPush form with controls of its own beside the ranges. */
@Component({
  imports: [ReactiveFormsModule, MeterRanges],
  template: `
    <form [formGroup]="form">
      <dm-meter-ranges
        [group]="ranges"
        [countsMax]="1000"
        leadHint="probes shorted together"
        digitalCaption="Digital ranges (caller's caption)"
        fullScaleHeading="Full scale (caller's heading)"
        [hideButtonsInPrint]="hideInPrint()"
        (rangeRemoved)="removed.push($event)"
      >
        <span class="projected">projected beside the lead</span>
      </dm-meter-ranges>
    </form>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
class Caller {
  private readonly fb = inject(NonNullableFormBuilder);
  readonly form = this.fb.group({
    name: ['', Validators.required],
    kind: this.fb.control<'digital' | 'analogue'>('digital'),
    autorange: [false],
    lead: [''],
    digital: this.fb.array<DigitalRangeRow>([]),
    analogue: this.fb.array<AnalogueRangeRow>([]),
  });
  readonly ranges = rangesPart(this.form);
  readonly hideInPrint = signal(false);
  readonly removed: number[] = [];
  /** The caller's own view, as its event handlers mark it. */
  readonly view = inject(ChangeDetectorRef);
  constructor() {
    loadMeterRanges(this.ranges, METER_PRESETS[0].profile, 1000);
  }
}

async function mountCaller() {
  const fixture = TestBed.createComponent(Caller);
  await fixture.whenStable();
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const el = fixture.nativeElement as HTMLElement;
  return { fixture, loader, el, caller: fixture.componentInstance };
}

const input = (loader: Awaited<ReturnType<typeof mountCaller>>['loader'], name: string) =>
  loader.getAllHarnesses(MatInputHarness.with({ selector: `[formControlName=${name}]` }));

describe('MeterRanges', () => {
  it("renders the caller's digital ranges with their labels, the caller's caption, heading and hint, and what the caller projects", async () => {
    const { loader, el } = await mountCaller();
    const digitalPreset = METER_PRESETS[0].profile;
    expect((await input(loader, 'fullScale')).length).toBe(digitalPreset.ranges.length);
    expect(el.querySelector('caption')?.textContent).toBe("Digital ranges (caller's caption)");
    expect(el.querySelector('thead')?.textContent).toContain("Full scale (caller's heading)");
    const lead = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Lead resistance' }));
    expect(await lead.getTextHints()).toEqual(['probes shorted together']);
    expect(await (await input(loader, 'lead'))[0].getValue()).toBe('0.2');
    expect(el.querySelector('.line .projected')?.textContent).toBe('projected beside the lead');
    expect(await loader.getHarness(MatCheckboxHarness.with({ label: 'Autoranging' }))).toBeTruthy();
  });

  it('edits the bound form: typed text and the autorange box land in its controls', async () => {
    const { loader, caller } = await mountCaller();
    await (await input(loader, 'counts'))[1].setValue('3');
    await (await loader.getHarness(MatCheckboxHarness.with({ label: 'Autoranging' }))).check();
    await (await input(loader, 'lead'))[0].setValue('0.15');
    const v = caller.form.getRawValue();
    expect(v.digital[1].counts).toBe('3');
    expect(v.autorange).toBeTrue();
    expect(v.lead).toBe('0.15');
  });

  it('adds a digital range as a copy of the last; removes one and says which; the last one cannot be removed', async () => {
    const { fixture, loader, caller } = await mountCaller();
    const n = caller.form.controls.digital.length;
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a range/ }))).click();
    expect(caller.form.controls.digital.length).toBe(n + 1);
    expect(caller.form.controls.digital.at(n).getRawValue()).toEqual(caller.form.controls.digital.at(n - 1).getRawValue());

    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Remove range 2"]' }))).click();
    expect(caller.removed).toEqual([1]);
    expect(caller.form.controls.digital.length).toBe(n);

    // Down to one row: its remove button is disabled; with two, it is not.
    while (caller.form.controls.digital.length > 2) caller.form.controls.digital.removeAt(0);
    caller.view.markForCheck();
    await fixture.whenStable();
    expect(await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Remove range 1"]' }))).isDisabled()).toBeFalse();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Remove range 2"]' }))).click();
    expect(await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Remove range 1"]' }))).isDisabled()).toBeTrue();
  });

  it("shows the analogue ranges when the caller's kind is analogue, without the autorange box; adds a row at 3 % of arc", async () => {
    const { fixture, loader, el, caller } = await mountCaller();
    caller.form.controls.kind.setValue('analogue');
    caller.form.controls.analogue.push(analogueRangeRow({ centre: '10', arcPct: '3' }));
    caller.view.markForCheck();
    await fixture.whenStable();
    expect(el.querySelector('caption')?.textContent).toBe('Analogue ranges: centre-scale value and arc error (% of full arc)');
    expect((await input(loader, 'fullScale')).length).toBe(0);
    expect(await loader.getAllHarnesses(MatCheckboxHarness.with({ label: 'Autoranging' }))).toEqual([]);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a range/ }))).click();
    expect(caller.form.controls.analogue.at(1).getRawValue()).toEqual({ centre: '', arcPct: '3' });
    expect((await input(loader, 'arcPct')).length).toBe(2);
  });

  it("words a field's error from the caller's save (all marked touched) though nothing of its own changed", async () => {
    const { fixture, loader, caller } = await mountCaller();
    caller.form.controls.digital.at(0).controls.resolution.setValue('');
    caller.form.controls.digital.at(0).controls.counts.setValue('5000');
    caller.form.controls.digital.at(1).controls.counts.setValue('999');
    const resolution = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Resolution 1' }));
    expect(await resolution.getTextErrors()).toEqual([]);
    // The caller's save: everything touched, the caller checked.
    caller.form.markAllAsTouched();
    caller.view.markForCheck();
    await fixture.whenStable();
    expect(await resolution.getTextErrors()).toEqual(['Required.']);
    // Over the caller's limit on counts is refused; its twin within it is not.
    expect(await (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Counts 1' }))).getTextErrors()).toEqual(['counts: a number from 0 to 1000']);
    expect(await (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Counts 2' }))).getTextErrors()).toEqual([]);
  });

  it('marks its buttons for hiding on paper only when the caller asks', async () => {
    const { fixture, el, caller } = await mountCaller();
    const buttons = () => Array.from(el.querySelectorAll('dm-meter-ranges button'));
    expect(buttons().length).toBeGreaterThan(1);
    expect(buttons().some((b) => b.classList.contains('no-print'))).toBeFalse();
    caller.hideInPrint.set(true);
    await fixture.whenStable();
    expect(buttons().every((b) => b.classList.contains('no-print'))).toBeTrue();
  });
});

describe('meter range rows', () => {
  const emptyForm = () =>
    rangesPart(
      new FormGroup({
        kind: new FormControl<'digital' | 'analogue'>('digital', { nonNullable: true }),
        autorange: new FormControl(false, { nonNullable: true }),
        lead: new FormControl('', { nonNullable: true }),
        digital: new FormArray<DigitalRangeRow>([]),
        analogue: new FormArray<AnalogueRangeRow>([]),
      }),
    );
  const analogueProfile: MeterProfile = { kind: 'analogue', leadOhms: 0.1, ranges: [{ centreOhms: 10, arcFraction: 0.03 }, { centreOhms: 1000, arcFraction: 0.025 }] };

  it("loads a profile's kind, lead and ranges with one value change, the other kind's rows emptied", () => {
    const form = emptyForm();
    loadMeterRanges(form, METER_PRESETS[0].profile, 1000);
    const seen: unknown[] = [];
    form.valueChanges.subscribe((v) => seen.push(v));
    loadMeterRanges(form, analogueProfile, 1000);
    expect(seen.length).toBe(1);
    const v = form.getRawValue();
    expect(v.kind).toBe('analogue');
    expect(v.autorange).toBeFalse();
    expect(v.lead).toBe('0.1');
    expect(v.digital).toEqual([]);
    expect(v.analogue.map((r) => r.arcPct)).toEqual(['3', '2.5']);
  });

  it('starts a kind from its preset only when the form has no ranges of that kind', () => {
    const form = emptyForm();
    loadMeterRanges(form, analogueProfile, 1000);
    expect(presetOnSwitch(form, 'digital')).toBe(METER_PRESETS.find((p) => p.profile.kind === 'digital')!.profile);
    expect(presetOnSwitch(form, 'analogue')).toBeNull();
  });

  it("refuses counts over the caller's limit and takes them within it; a new row copies the last or starts at 1 % + 2", () => {
    const row = digitalRangeRow({ fullScale: '1999', resolution: '1', pct: '0.8', counts: '1001' }, 1000);
    expect(row.controls.counts.errors).toEqual({ number: 'counts: a number from 0 to 1000' });
    expect(digitalRangeRow({ ...row.getRawValue(), counts: '1001' }, 100000).valid).toBeTrue();
    expect(digitalRangeRow({ ...row.getRawValue(), counts: '1000' }, 1000).valid).toBeTrue();

    const rows = new FormArray<DigitalRangeRow>([]);
    expect(nextDigitalRange(rows)).toEqual({ fullScale: '', resolution: '', pct: '1', counts: '2' });
    rows.push(row);
    expect(nextDigitalRange(rows)).toEqual(row.getRawValue());
  });
});
