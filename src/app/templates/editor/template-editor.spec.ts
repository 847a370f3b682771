import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import type { TemplateDocument } from '@domain/template-format';
import { SIX_AV6, smallDocument } from './editor-testing';
import { TemplateEditor } from './template-editor';

describe('TemplateEditor', () => {
  let fixture: ComponentFixture<TemplateEditor>;
  let loader: HarnessLoader;
  let http: HttpTestingController;
  const el = () => fixture.nativeElement as HTMLElement;

  async function settle(): Promise<void> {
    await fixture.whenStable();
    await new Promise<void>((resolve) => setTimeout(resolve, 5));
    await fixture.whenStable();
  }

  async function button(text: string | RegExp): Promise<MatButtonHarness> {
    return loader.getHarness(MatButtonHarness.with({ text }));
  }

  async function openStage(): Promise<void> {
    const node = Array.from(el().querySelectorAll<HTMLButtonElement>('dm-editor-tree button.node')).find((b) => b.textContent?.includes('First audio'))!;
    node.click();
    await settle();
  }

  beforeEach(async () => {
    localStorage.removeItem('driftmark.template-draft.7');
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
    fixture = TestBed.createComponent(TemplateEditor);
    fixture.componentRef.setInput('id', '7');
    loader = TestbedHarnessEnvironment.loader(fixture);
    http = TestBed.inject(HttpTestingController);
    await settle();
    http.expectOne((r) => r.url === '/api/tube-types').flush({ items: [SIX_AV6] });
    http.expectOne('/api/templates/7/draft').flush({ templateId: 7, exists: true, revision: 4, basedOn: null, content: smallDocument() });
    await settle();
  });

  afterEach(() => {
    http.verify();
    localStorage.removeItem('driftmark.template-draft.7');
  });

  it('shows the in-circuit expected value beside the nominal, and the parts that lower it', async () => {
    await openStage();
    const rows = Array.from(el().querySelectorAll('li.point'));
    expect(rows.length).toBe(3);
    // R1 220k ∥ (R2 470k + R3 47k) = 220 × 517 / 737 = 154.33 kΩ, 29.9 % below the nominal.
    expect(rows[0].querySelector('.printed')?.textContent).toContain('220 kΩ ±10 %');
    expect(rows[0].querySelector('.in-circuit')?.textContent?.trim()).toBe('154.3 kΩ');
    expect(rows[0].querySelector('.lowered')?.textContent).toContain('−29.9 %');
    expect(rows[0].querySelector('.paths')?.textContent).toContain('R2');
    expect(rows[0].querySelector('.paths')?.textContent).toContain('R3');
    // The chart's 170k agrees with R2 ∥ (R1 + R3) = 170.27 kΩ: no flag.
    expect(rows[1].querySelector('.in-circuit')?.textContent?.trim()).toBe('170.3 kΩ');
    expect(rows[1].querySelector('.disagreement')).toBeNull();
  });

  it('flags a chart reading that disagrees with the network', async () => {
    await openStage();
    (el().querySelectorAll<HTMLButtonElement>('li.point')[1].querySelector('button[aria-label^="Edit"]') as HTMLButtonElement).click();
    await settle();
    const expected = await loader.getHarness(MatInputHarness.with({ selector: 'dm-test-point-form input[autocomplete=off]:not([matautocomplete])' })).catch(() => null);
    const input = expected ?? (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: /Expected/ })).then((f) => f.getControl(MatInputHarness)))!;
    await input!.setValue('330k');
    await settle();
    const row = el().querySelectorAll('li.point')[1];
    expect(row.querySelector('.disagreement')?.textContent).toContain('Disagrees with the network');
    expect(row.querySelector('.disagreement')?.textContent).toContain('an error in the template or in the service data');
  });

  it('shows the notation’s error beside the nominal, and writes the value once it reads', async () => {
    await openStage();
    (el().querySelector('tr[data-ref="R3"] button[aria-label="Edit R3"]') as HTMLButtonElement).click();
    await settle();
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Nominal' }));
    const input = (await field.getControl(MatInputHarness))!;
    // Typed at once (a paste): the text as a whole does not read.
    const box = el().querySelector<HTMLInputElement>('dm-component-form input[formcontrolname=nominal]')!;
    box.value = '4kk7';
    box.dispatchEvent(new Event('input'));
    await input.blur();
    await settle();
    expect((await field.getTextErrors())[0]).toContain('4kk7');
    expect(el().querySelector('tr[data-ref="R3"] .nominal')?.textContent?.trim()).toBe('47 kΩ');
    await input.setValue('68k');
    await settle();
    expect(await field.getTextErrors()).toEqual([]);
    expect(await field.getTextHints()).toContain('Reads as 68 kΩ');
    expect(el().querySelector('tr[data-ref="R3"] .nominal')?.textContent?.trim()).toBe('68 kΩ');
  });

  it('moves a focused test point with Alt+↓ and announces it', async () => {
    await openStage();
    const first = el().querySelector<HTMLElement>('li.point')!;
    first.focus();
    first.dispatchEvent(new KeyboardEvent('keydown', { key: 'ArrowDown', altKey: true, bubbles: true }));
    await settle();
    const names = Array.from(el().querySelectorAll('li.point .name')).map((n) => n.textContent?.trim());
    expect(names).toEqual(['V1.7 to chassis', 'R1 check', 'R2 check']);
    expect(el().querySelector('[aria-live=polite]')?.textContent).toContain('R1 check moved to position 2 of 3.');
    // Without Alt the arrow keys do nothing to the order.
    el().querySelector<HTMLElement>('li.point')!.dispatchEvent(new KeyboardEvent('keydown', { key: 'ArrowDown', bubbles: true }));
    await settle();
    expect(Array.from(el().querySelectorAll('li.point .name')).map((n) => n.textContent?.trim())[0]).toBe('V1.7 to chassis');
  });

  it('creates the missing component checks in one action', async () => {
    await openStage();
    await (await button(/Create component checks/)).click();
    await settle();
    const names = Array.from(el().querySelectorAll('li.point .name')).map((n) => n.textContent?.trim());
    expect(names).toEqual(['R1 check', 'V1.7 to chassis', 'R2 check', 'R3 check']);
    expect(el().textContent).toContain('1 component checks created; 3 components skipped');
  });

  it('saves with Ctrl+S at the loaded revision, and a 409 shows both revisions with a way to reload', async () => {
    await openStage();
    el().querySelector<HTMLInputElement>('.stage-name input')!.value = 'Detector and audio';
    el().querySelector<HTMLInputElement>('.stage-name input')!.dispatchEvent(new Event('change'));
    await settle();
    expect(el().textContent).toContain('unsaved changes');
    document.dispatchEvent(new KeyboardEvent('keydown', { key: 's', ctrlKey: true, bubbles: true }));
    const put = http.expectOne((r) => r.method === 'PUT' && r.url === '/api/templates/7/draft');
    expect(put.request.body.revision).toBe(4);
    expect((put.request.body.content as TemplateDocument).stages[0].name).toBe('Detector and audio');
    put.flush(
      { error: { code: 'stale-revision', message: 'The draft has changed since you loaded it (your revision 4, now 6).', details: { yourRevision: 4, currentRevision: 6 } } },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();
    const banner = el().querySelector('[aria-label="Save conflict"]')!;
    expect(banner.textContent).toContain('revision 4');
    expect(banner.textContent).toContain('revision 6');
    expect(el().textContent).toContain('unsaved changes');

    await (await button(/Reload revision 6/)).click();
    const newer = smallDocument();
    newer.stages[0].name = 'Audio (from the other tab)';
    http.expectOne('/api/templates/7/draft').flush({ templateId: 7, exists: true, revision: 6, basedOn: null, content: newer });
    await settle();
    expect(el().querySelector('[aria-label="Save conflict"]')).toBeNull();
    expect(el().textContent).toContain('revision 6');
    // This page's work is kept to restore, not lost.
    expect(el().querySelector('[aria-label="Unsaved changes found"]')).not.toBeNull();
  });

  it('shows the API’s 400 problems at their fields and in the list; a good save clears them', async () => {
    await openStage();
    await (await button(/^save\s*Save/)).click();
    const put = http.expectOne((r) => r.method === 'PUT');
    put.flush(
      {
        error: {
          code: 'validation',
          message: 'The template has a problem',
          details: { field: 'content.components[2].nominal', problems: [{ path: 'content.components[2].nominal', message: 'the nominal of R3 is refused by the server' }] },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await settle();
    const listed = el().querySelector('.problems li[data-path="components[2].nominal"]');
    expect(listed?.textContent).toContain('the nominal of R3 is refused by the server');
    expect(el().querySelector('tr[data-ref="R3"]')?.textContent).toContain('1 errors');
    // The problem's place opens the component with the message at its field.
    (listed!.querySelector('button.where') as HTMLButtonElement).click();
    await settle();
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Nominal' }));
    expect((await field.getTextHints()).join(' ')).toContain('the nominal of R3 is refused by the server');

    await (await button(/^save\s*Save/)).click();
    http.expectOne((r) => r.method === 'PUT').flush({ templateId: 7, exists: true, revision: 5, basedOn: null, content: smallDocument() });
    await settle();
    expect(el().querySelector('.problems li[data-path="components[2].nominal"]')).toBeNull();
    expect(el().textContent).toContain('Saved as revision 5.');
  });

  it('previews a pasted parts list before adding anything, then adds only the good rows', async () => {
    await openStage();
    await (await button(/Paste a parts list/)).click();
    await settle();
    const box = await loader.getHarness(MatInputHarness.with({ selector: 'dm-paste-panel textarea' }));
    await box.setValue('ref\tvalue\ttolerance\trating\tkind\tnode a\tnode b\nR7\t1M\t20\t½\t\tV1.1\tchassis\nR8\t2m2\t20\t½\t\tV1.1\tchassis');
    await settle();
    const rows = el().querySelectorAll('dm-paste-panel tbody tr');
    expect(rows.length).toBe(2);
    expect(rows[0].textContent).toContain('Ready');
    expect(rows[1].textContent).toContain('Not added');
    expect(rows[1].textContent).toContain('lower-case m');
    expect(el().querySelectorAll('table.components tbody tr').length).toBe(4); // nothing added yet
    await (await button(/Add 1 components/)).click();
    await settle();
    expect(el().querySelector('tr[data-ref="R7"]')).not.toBeNull();
    expect(el().querySelector('tr[data-ref="R8"]')).toBeNull();
  });

  it('shows the hot-chassis caution when the power arrangement makes the chassis hot', async () => {
    expect(el().querySelector('[aria-label="Hot chassis caution"]')).toBeNull();
    const power = el().querySelector('dm-chassis-form');
    expect(power).not.toBeNull();
    const { MatSelectHarness } = await import('@angular/material/select/testing');
    const select = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=power]' }));
    await select.open();
    await select.clickOptions({ text: /AC\/DC/ });
    await settle();
    expect(el().querySelector('[aria-label="Hot chassis caution"]')?.textContent).toContain('isolation transformer');
    expect(el().textContent).toContain('Follows from the power arrangement');
  });
});
