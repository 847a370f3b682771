import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { parseResistance } from '@domain/notation';
import type { Component as Part, Expected, Nominal, TemplateDocument, TemplateProblem, TestPoint } from '@domain/template-format';
import { apiErrorOf } from '../../core/errors/api-error';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { TEST_POINT_KIND_LABELS, kindWords, nominalText, testPointEnds } from '../template-words';
import { Correction, CorrectionInput, CorrectionTargetKind, TemplatesApi, problemsOf } from '../templates-api';

export interface CorrectionData {
  readonly templateId: number;
  readonly versionNumber: number;
  readonly content: TemplateDocument;
}

/** A typed value back to the document's shape: `{ ohms, text }` (or `{ ohms }`), or a state. */
export function valueFromText(text: string, withText: boolean): Nominal | Expected | { error: string } {
  const r = parseResistance(text);
  if (!r.ok) return { error: r.message };
  if (r.state === 'open' || r.state === 'short') return { state: r.state };
  if (r.state !== 'value' || r.ohms === null) return { error: `“${text}” is a reading state, not a value: use a value, open or short.` };
  return withText ? { ohms: r.ohms, text: text.trim() } : { ohms: r.ohms };
}

const numberOrNull = (s: string): number | null => (s.trim() === '' ? null : Number(s.replace(',', '.')));
const sameValue = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);
const ohmsText = (n: Nominal | Expected) => ('state' in n ? n.state : 'text' in n && n.text ? n.text : nominalText(n));

/**
 * "Send a correction": choose a component or test point of the version, change its fields, add a
 * note. Only the fields that differ are sent.
 */
@Component({
  selector: 'dm-correction-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule, FieldErrors],
  templateUrl: './correction-dialog.html',
  styles: `
    .pair { display: grid; grid-template-columns: repeat(auto-fit, minmax(180px, 1fr)); gap: 0 16px; }
    .current { font: var(--mat-sys-body-medium); color: var(--mat-sys-on-surface-variant); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CorrectionDialog {
  private readonly api = inject(TemplatesApi);
  private readonly dialogRef = inject<MatDialogRef<CorrectionDialog, Correction>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly data = inject<CorrectionData>(MAT_DIALOG_DATA);
  protected readonly doc = this.data.content;
  protected readonly tpKinds = TEST_POINT_KIND_LABELS;
  protected readonly kindWords = kindWords;
  protected readonly nominalText = nominalText;
  protected readonly ends = (tp: TestPoint) => testPointEnds(tp, this.doc);

  /** `component:c-r2` or `test-point:tp-v1p`. */
  protected readonly target = new FormControl('', { nonNullable: true, validators: Validators.required });
  private readonly targetValue = toSignal(this.target.valueChanges, { initialValue: '' });
  protected readonly part = computed<Part | null>(() => {
    const [kind, key] = this.targetValue().split(':');
    return kind === 'component' ? (this.doc.components.find((c) => c.key === key) ?? null) : null;
  });
  protected readonly point = computed<TestPoint | null>(() => {
    const [kind, key] = this.targetValue().split(':');
    return kind === 'test-point' ? (this.doc.testPoints.find((t) => t.key === key) ?? null) : null;
  });

  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly fields = this.fb.group({
    value: [''],
    tolerancePct: [''],
    ratedWatts: [''],
    ratedVolts: [''],
    voltsAcross: [''],
  });
  protected readonly note = this.fb.control('', [Validators.required, Validators.maxLength(2000)]);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly problems = signal<readonly TemplateProblem[]>([]);

  constructor() {
    this.target.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => this.fillFromTarget());
  }

  private fillFromTarget(): void {
    const c = this.part();
    const t = this.point();
    const s = (n: number | null | undefined) => (n === null || n === undefined ? '' : String(n));
    if (c) this.fields.setValue({ value: ohmsText(c.nominal), tolerancePct: s(c.tolerancePct), ratedWatts: s(c.ratedWatts), ratedVolts: s(c.ratedVolts), voltsAcross: s(c.voltsAcross) });
    else if (t?.kind === 'chart-reading') this.fields.setValue({ value: ohmsText(t.expected), tolerancePct: s(t.tolerancePct), ratedWatts: '', ratedVolts: '', voltsAcross: '' });
    else if (t?.kind === 'pair-relation') this.fields.setValue({ value: '', tolerancePct: s(t.ratioTolerancePct), ratedWatts: '', ratedVolts: '', voltsAcross: '' });
    else this.fields.reset();
    this.error.set(null);
    this.problems.set([]);
  }

  /** The changed fields in the document's shape; an error message when a field cannot be read. */
  private change(): Record<string, unknown> | string {
    const v = this.fields.getRawValue();
    const out: Record<string, unknown> = {};
    const nums: [keyof typeof v, string][] = [];
    const c = this.part();
    const t = this.point();
    if (c) {
      if (v.value.trim() !== ohmsText(c.nominal)) {
        const n = valueFromText(v.value, true);
        if ('error' in n) return `Nominal: ${n.error}`;
        if (!sameValue(n, c.nominal)) out['nominal'] = n;
      }
      nums.push(['tolerancePct', 'tolerancePct'], ['ratedWatts', 'ratedWatts'], ['ratedVolts', 'ratedVolts'], ['voltsAcross', 'voltsAcross']);
      for (const [field, key] of nums) {
        const n = numberOrNull(v[field]);
        if (n !== null && !Number.isFinite(n)) return `${field}: enter a number.`;
        if (!sameValue(n, (c as unknown as Record<string, unknown>)[key])) out[key] = n;
      }
    } else if (t?.kind === 'chart-reading') {
      if (v.value.trim() !== ohmsText(t.expected)) {
        const n = valueFromText(v.value, false);
        if ('error' in n) return `Expected: ${n.error}`;
        if (!sameValue(n, t.expected)) out['expected'] = n;
      }
      const tol = numberOrNull(v.tolerancePct);
      if (tol === null || !Number.isFinite(tol)) return 'Tolerance: enter a number.';
      if (tol !== t.tolerancePct) out['tolerancePct'] = tol;
    } else if (t?.kind === 'pair-relation') {
      const tol = numberOrNull(v.tolerancePct);
      if (tol === null || !Number.isFinite(tol)) return 'Ratio tolerance: enter a number.';
      if (tol !== t.ratioTolerancePct) out['ratioTolerancePct'] = tol;
    }
    return out;
  }

  protected send(): void {
    if (this.busy()) return;
    this.error.set(null);
    this.problems.set([]);
    if (this.target.invalid || this.note.invalid || !this.note.value.trim()) {
      this.target.markAsTouched();
      this.note.markAsTouched();
      if (!this.note.value.trim()) this.note.setErrors({ required: true });
      return;
    }
    const change = this.change();
    if (typeof change === 'string') return this.error.set(change);
    if (Object.keys(change).length === 0) return this.error.set('Nothing changed: change at least one field.');
    const [kind, key] = this.target.value.split(':') as [CorrectionTargetKind, string];
    const input: CorrectionInput = { versionNumber: this.data.versionNumber, target: { kind, key }, change, note: this.note.value.trim() };
    this.busy.set(true);
    this.api
      .proposeCorrection(this.data.templateId, input)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (c) => this.dialogRef.close(c),
        error: (err: unknown) => {
          this.error.set(apiErrorOf(err).message);
          this.problems.set(problemsOf(err));
          this.busy.set(false);
        },
      });
  }
}
