import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { BandFrom, RuleFields } from './rule-fields';

/** A form around the fields, holding one control more than they edit (as the assignment form does). */
@Component({
  imports: [ReactiveFormsModule, RuleFields],
  template: `
    <form [formGroup]="form">
      <fieldset>
        <legend>Acceptance rule</legend>
        <dm-rule-fields [group]="form" />
      </fieldset>
    </form>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
class Host {
  private readonly fb = inject(NonNullableFormBuilder);
  readonly form = this.fb.group({
    title: ['Wren 3 intake'],
    bandFrom: this.fb.control<BandFrom>('template'),
    allowanceLow: ['-20'],
    allowanceHigh: ['20'],
  });
}

describe('RuleFields', () => {
  async function mount() {
    const fixture = TestBed.createComponent(Host);
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const text = () => (fixture.nativeElement as HTMLElement).textContent ?? '';
    return { fixture, loader, text, form: fixture.componentInstance.form };
  }

  it('shows the allowance fields only while the band comes from an allowance, and writes the choice to the form', async () => {
    const { fixture, loader, text, form } = await mount();
    const template = await loader.getHarness(MatButtonToggleHarness.with({ text: "The template's tolerance" }));
    expect(await template.isChecked()).toBeTrue();
    expect(await loader.getAllHarnesses(MatInputHarness)).toEqual([]);
    expect(text()).not.toContain('Allowance below, %');

    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'A restoration allowance' }))).check();
    await fixture.whenStable();
    expect(form.controls.bandFrom.value).toBe('allowance');
    const low = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Allowance below, %' }));
    const high = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Allowance above, %' }));
    expect(await (await low.getControl(MatInputHarness))?.getValue()).toBe('-20');
    expect(await (await high.getControl(MatInputHarness))?.getValue()).toBe('20');

    await (await loader.getHarness(MatInputHarness.with({ selector: '[data-test=allowanceHigh]' }))).setValue('25');
    expect(form.controls.allowanceHigh.value).toBe('25');

    await template.check();
    await fixture.whenStable();
    expect(form.controls.bandFrom.value).toBe('template');
    expect(await loader.getAllHarnesses(MatInputHarness)).toEqual([]);
  });

  it('follows a value the form sets itself', async () => {
    const { fixture, loader, form } = await mount();
    form.controls.bandFrom.setValue('allowance');
    await fixture.whenStable();
    expect(await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'A restoration allowance' }))).isChecked()).toBeTrue();
    expect((await loader.getAllHarnesses(MatInputHarness)).length).toBe(2);
  });

  it('shows the error the form sets on a refused allowance, and none on an accepted one', async () => {
    const { fixture, loader, form } = await mount();
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'A restoration allowance' }))).check();
    await (await loader.getHarness(MatInputHarness.with({ selector: '[data-test=allowanceLow]' }))).setValue('15');
    form.markAllAsTouched();
    form.controls.allowanceLow.setErrors({ server: 'A negative percentage, such as −20.' });
    await fixture.whenStable();
    const low = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Allowance below, %' }));
    const high = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Allowance above, %' }));
    expect(await low.hasErrors()).toBeTrue();
    expect(await low.getTextErrors()).toEqual(['A negative percentage, such as −20.']);
    expect(await high.hasErrors()).toBeFalse();

    await (await loader.getHarness(MatInputHarness.with({ selector: '[data-test=allowanceLow]' }))).setValue('-15');
    await fixture.whenStable();
    expect(form.controls.allowanceLow.value).toBe('-15');
    expect(await low.hasErrors()).toBeFalse();
  });
});
