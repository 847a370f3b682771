import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import {
  CHASSIS_KINDS,
  POWER_ARRANGEMENTS,
  SOURCE_DOCUMENT_KINDS,
  hotChassisFor,
  type ChassisInfo,
  type ChassisKind,
  type PowerArrangement,
  type SourceDocumentKind,
} from '@domain/template-format';
import { FieldErrors } from '../../../shared/field-errors/field-errors';
import { EditorStore } from '../editor-store';

export const CHASSIS_KIND_WORDS: Readonly<Record<ChassisKind, string>> = {
  'table-radio': 'table radio',
  console: 'console',
  portable: 'portable',
  'communications-receiver': 'communications receiver',
  amplifier: 'amplifier',
  other: 'other',
};
export const POWER_WORDS: Readonly<Record<PowerArrangement, string>> = {
  transformer: 'power transformer',
  autotransformer: 'autotransformer',
  'ac-dc': 'AC/DC (transformerless)',
  battery: 'battery',
};
const SOURCE_WORDS: Readonly<Record<SourceDocumentKind, string>> = {
  'service-data': 'service data',
  schematic: 'schematic',
  'parts-list': 'parts list',
  'known-good-set': 'measured on a known-good set',
  other: 'other',
};

const year = () => [Validators.min(1880), Validators.max(2100)];

/** The chassis facts, the template's default conditions and its source documents. */
@Component({
  selector: 'dm-chassis-form',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatCheckboxModule, MatButtonModule, MatIconModule, FieldErrors],
  templateUrl: './chassis-form.html',
  styleUrl: '../editor-forms.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ChassisForm {
  protected readonly store = inject(EditorStore);
  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly kinds = CHASSIS_KINDS;
  protected readonly powers = POWER_ARRANGEMENTS;
  protected readonly sourceKinds = SOURCE_DOCUMENT_KINDS;
  protected readonly kindWords = CHASSIS_KIND_WORDS;
  protected readonly powerWords = POWER_WORDS;
  protected readonly sourceWords = SOURCE_WORDS;

  private readonly start = this.store.doc()!;
  protected readonly form = this.fb.group({
    maker: [this.start.chassis.maker, [Validators.required, Validators.maxLength(120)]],
    model: [this.start.chassis.model, [Validators.required, Validators.maxLength(120)]],
    chassisNumber: [this.start.chassis.chassisNumber, Validators.maxLength(60)],
    variants: [this.start.chassis.variants.join(', ')],
    yearFrom: this.fb.control<number | null>(this.start.chassis.yearFrom, year()),
    yearTo: this.fb.control<number | null>(this.start.chassis.yearTo, year()),
    kind: this.fb.control<ChassisKind>(this.start.chassis.kind),
    power: this.fb.control<PowerArrangement>(this.start.chassis.power),
    hotChassis: [this.start.chassis.hotChassis],
    hazardNotes: [this.start.chassis.hazardNotes, Validators.maxLength(2000)],
    sources: this.fb.array(this.start.chassis.sources.map((s) => this.sourceGroup(s.title, s.kind, s.note))),
    tubesIn: [this.start.conditions.tubesIn],
    speakerConnected: [this.start.conditions.speakerConnected],
    controls: [this.start.conditions.controls, Validators.maxLength(300)],
  });

  protected readonly chassis = computed(() => this.store.doc()!.chassis);
  protected readonly hotFollows = computed(() => this.chassis().hotChassis === hotChassisFor(this.chassis().power));

  constructor() {
    this.form.valueChanges.pipe(takeUntilDestroyed(inject(DestroyRef))).subscribe(() => this.write());
  }

  private sourceGroup(title = '', kind: SourceDocumentKind = 'service-data', note = '') {
    return this.fb.group({ title: [title, [Validators.required, Validators.maxLength(200)]], kind: this.fb.control<SourceDocumentKind>(kind), note: [note, Validators.maxLength(1000)] });
  }

  protected addSource(): void {
    this.form.controls.sources.push(this.sourceGroup());
  }

  protected removeSource(i: number): void {
    this.form.controls.sources.removeAt(i);
  }

  /** Hot chassis back to what the power arrangement implies. */
  protected followPower(): void {
    this.form.controls.hotChassis.setValue(hotChassisFor(this.form.controls.power.value));
  }

  protected problem(field: string): string | null {
    return this.store.problemsAt({ kind: 'chassis' }, field)[0]?.message ?? null;
  }

  /** Valid fields go to the store; an invalid one waits (its error shows beside it). */
  private write(): void {
    const f = this.form.controls;
    const v = this.form.getRawValue();
    const patch: Partial<ChassisInfo> = { kind: v.kind };
    if (f.maker.valid) patch.maker = v.maker.trim();
    if (f.model.valid) patch.model = v.model.trim();
    if (f.chassisNumber.valid) patch.chassisNumber = v.chassisNumber.trim();
    patch.variants = v.variants.split(',').map((x) => x.trim()).filter((x) => x !== '');
    if (f.yearFrom.valid) patch.yearFrom = v.yearFrom;
    if (f.yearTo.valid) patch.yearTo = v.yearTo;
    if (f.hazardNotes.valid) patch.hazardNotes = v.hazardNotes;
    if (f.sources.valid) patch.sources = v.sources.map((s) => ({ title: s.title.trim(), kind: s.kind, note: s.note }));
    const before = this.chassis();
    if (v.power !== before.power) {
      patch.power = v.power;
      // Hot chassis follows the power arrangement unless it was set explicitly (the store decides).
      if (v.hotChassis !== before.hotChassis) patch.hotChassis = v.hotChassis;
    } else patch.hotChassis = v.hotChassis;
    this.store.updateChassis(patch);
    const after = this.chassis().hotChassis;
    if (after !== v.hotChassis) f.hotChassis.setValue(after, { emitEvent: false });
    const cond = this.store.doc()!.conditions;
    if (cond.tubesIn !== v.tubesIn || cond.speakerConnected !== v.speakerConnected || (f.controls.valid && cond.controls !== v.controls)) {
      this.store.updateConditions({ tubesIn: v.tubesIn, speakerConnected: v.speakerConnected, ...(f.controls.valid ? { controls: v.controls } : {}) });
    }
  }
}
