import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors, Validators } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { DIELECTRICS, TEMPLATE_COMPONENT_KINDS, type CapacitorInfo, type Component as Part, type Dielectric, type SafetyClass, type TemplateComponentKind } from '@domain/template-format';
import { VALUE_SOURCES, type ValueSource } from '@domain/words';
import { Subscription } from 'rxjs';
import { FieldErrors, type ErrorMessages } from '../../../shared/field-errors/field-errors';
import { EditorStore } from '../editor-store';
import { filterNodes } from '../node-options';
import { nominalText, readNominal } from '../nominal-entry';

export const VALUE_SOURCE_WORDS: Readonly<Record<ValueSource, string>> = {
  'service-data': 'service data',
  'known-good-set': 'measured on a known-good set',
  schematic: 'derived from the schematic',
};

/** The nominal as typed must read (api/domain/notation.ts, colour bands, open, short). */
export function nominalValidator(control: AbstractControl<string>): ValidationErrors | null {
  const r = readNominal(control.value ?? '');
  return r.ok ? null : { nominal: r.message };
}

const num = (min: number, max: number) => [Validators.min(min), Validators.max(max)];

/** One component: every field of the format, the nominal parsed as typed, capacitor details for capacitors. */
@Component({
  selector: 'dm-component-form',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatCheckboxModule, MatAutocompleteModule, MatButtonModule, MatIconModule, FieldErrors],
  templateUrl: './component-form.html',
  styleUrls: ['../editor-forms.scss', './component-form.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ComponentForm {
  readonly componentKey = input.required<string>();
  protected readonly store = inject(EditorStore);
  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly kinds = TEMPLATE_COMPONENT_KINDS;
  protected readonly sources = VALUE_SOURCES;
  protected readonly sourceWords = VALUE_SOURCE_WORDS;
  protected readonly dielectrics = DIELECTRICS;
  protected readonly nominalMessages: ErrorMessages = { nominal: (e) => String(e) };
  protected readonly refMessages: ErrorMessages = { pattern: 'A reference starts with a letter: R12, C8, T2.' };

  protected readonly component = computed(() => this.store.doc()!.components.find((c) => c.key === this.componentKey()) ?? null);
  protected readonly form = this.build(null);
  /** The nominal as read, shown under the field. */
  protected readonly nominalShown = signal('');
  private sub: Subscription | null = null;

  constructor() {
    effect(() => {
      const key = this.componentKey();
      untracked(() => this.reset(this.store.doc()!.components.find((c) => c.key === key) ?? null));
    });
    inject(DestroyRef).onDestroy(() => this.sub?.unsubscribe());
  }

  private build(c: Part | null) {
    const cap = c?.capacitor;
    return this.fb.group({
      ref: [c?.ref ?? '', [Validators.required, Validators.pattern(/^[A-Za-z][A-Za-z0-9.+/-]{0,15}$/)]],
      kind: this.fb.control<TemplateComponentKind>(c?.kind ?? 'carbon-composition'),
      a: [c?.nodes[0] ?? '', Validators.required],
      b: [c?.nodes[1] ?? '', Validators.required],
      wiperNode: [c?.wiper?.node ?? ''],
      wiperFraction: this.fb.control<number | null>(c?.wiper?.fraction ?? 0.5, num(0, 1)),
      nominal: [c ? nominalText(c.nominal) : '', nominalValidator],
      tolerancePct: this.fb.control<number | null>(c?.tolerancePct ?? null, [Validators.min(0.001), Validators.max(100)]),
      ratedWatts: this.fb.control<number | null>(c?.ratedWatts ?? null, [Validators.min(0.001), Validators.max(1000)]),
      ratedVolts: this.fb.control<number | null>(c?.ratedVolts ?? null, [Validators.min(0.001), Validators.max(100000)]),
      voltsAcross: this.fb.control<number | null>(c?.voltsAcross ?? null, num(0, 100000)),
      critical: [c?.critical != null],
      criticalLow: this.fb.control<number | null>(c?.critical?.lowPct ?? -5, num(-100, 0)),
      criticalHigh: this.fb.control<number | null>(c?.critical?.highPct ?? 5, num(0, 10000)),
      fuseRole: [c?.fuseRole ?? false],
      mainsSide: [c?.mainsSide ?? false],
      nonLinear: [c?.nonLinear ?? false],
      valueSource: this.fb.control<ValueSource>(c?.valueSource ?? 'service-data'),
      note: [c?.note ?? '', Validators.maxLength(2000)],
      uF: this.fb.control<number | null>(cap?.uF ?? null, [Validators.min(0.000001), Validators.max(1e6)]),
      workingVolts: this.fb.control<number | null>(cap?.workingVolts ?? null, [Validators.min(0.001), Validators.max(100000)]),
      dielectric: this.fb.control<Dielectric>(cap?.dielectric ?? 'paper'),
      polarised: [cap?.polarised ?? false],
      inCan: [cap?.can != null],
      canId: [cap?.can?.id ?? ''],
      canSection: [cap?.can?.section ?? ''],
      canReturn: [cap?.can?.commonReturn ?? 'B-'],
      safetyClass: this.fb.control<SafetyClass | ''>(cap?.safetyClass ?? ''),
      lineConnected: [cap?.lineConnected ?? false],
    });
  }

  private reset(c: Part | null): void {
    this.sub?.unsubscribe();
    const fresh = this.build(c);
    for (const name of Object.keys(fresh.controls) as (keyof typeof fresh.controls)[]) {
      this.form.controls[name].setValue(fresh.controls[name].value as never, { emitEvent: false });
    }
    this.form.markAsPristine();
    this.form.updateValueAndValidity({ emitEvent: false });
    this.showNominal();
    if (c !== null && c.kind !== 'capacitor' && c.kind !== 'wire') this.form.controls.nominal.markAsTouched();
    this.sub = this.form.valueChanges.subscribe(() => this.write());
  }

  protected readonly isCapacitor = () => this.form.controls.kind.value === 'capacitor';
  protected readonly isPot = () => this.form.controls.kind.value === 'pot';

  protected nodeChoices(text: string) {
    return filterNodes(this.store.nodeOptions(), text);
  }

  protected problem(field: string): string | null {
    return this.store.problemsAt({ kind: 'component', key: this.componentKey() }, field)[0]?.message ?? null;
  }

  private showNominal(): void {
    const r = readNominal(this.form.controls.nominal.value);
    this.nominalShown.set(r.ok ? `Reads as ${r.display}${r.warnings.length ? ` — ${r.warnings.join(' ')}` : ''}` : '');
  }

  /** Valid fields go to the store; an invalid field waits, its error beside it. */
  private write(): void {
    const f = this.form.controls;
    const v = this.form.getRawValue();
    const c = this.component();
    if (c === null) return;
    this.showNominal();
    const patch: Partial<Part> = { kind: v.kind, fuseRole: v.fuseRole, mainsSide: v.mainsSide, nonLinear: v.nonLinear, valueSource: v.valueSource };
    if (f.ref.valid) patch.ref = v.ref.trim();
    patch.nodes = [v.a.trim(), v.b.trim()];
    if (v.kind === 'pot' && f.wiperFraction.valid && v.wiperNode.trim() !== '') patch.wiper = { node: v.wiperNode.trim(), fraction: v.wiperFraction ?? 0.5 };
    else if (v.kind !== 'pot') patch.wiper = null;
    if (v.kind === 'wire') patch.nominal = { state: 'short' };
    else if (v.kind === 'capacitor') patch.nominal = { state: 'open' };
    else {
      const n = readNominal(v.nominal);
      if (n.ok) {
        patch.nominal = n.nominal;
        // A tolerance carried by the value (4K7J, colour bands) fills an empty tolerance.
        if (n.tolerancePct !== null && v.tolerancePct === null) {
          f.tolerancePct.setValue(n.tolerancePct, { emitEvent: false });
          v.tolerancePct = n.tolerancePct;
        }
      }
    }
    for (const k of ['tolerancePct', 'ratedWatts', 'ratedVolts', 'voltsAcross'] as const) if (f[k].valid) patch[k] = v[k];
    if (!v.critical) patch.critical = null;
    else if (f.criticalLow.valid && f.criticalHigh.valid && v.criticalLow !== null && v.criticalHigh !== null) patch.critical = { lowPct: v.criticalLow, highPct: v.criticalHigh };
    if (f.note.valid) patch.note = v.note;
    if (v.kind === 'capacitor') {
      const prev = c.capacitor;
      const info: CapacitorInfo = {
        uF: f.uF.valid && v.uF !== null ? v.uF : (prev?.uF ?? 0.01),
        workingVolts: f.workingVolts.valid && v.workingVolts !== null ? v.workingVolts : (prev?.workingVolts ?? 400),
        dielectric: v.dielectric,
        polarised: v.polarised,
        can: v.inCan && v.canId.trim() !== '' && v.canSection.trim() !== '' && v.canReturn.trim() !== '' ? { id: v.canId.trim(), section: v.canSection.trim(), commonReturn: v.canReturn.trim() } : null,
        safetyClass: v.safetyClass === '' ? null : v.safetyClass,
        lineConnected: v.lineConnected,
      };
      patch.capacitor = info;
    } else patch.capacitor = null;
    this.store.updateComponent(c.key, patch);
  }

  protected close(): void {
    this.store.editing.set(null);
  }
}
