import { ChangeDetectionStrategy, Component, computed, effect, inject, output, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { ErrorStateMatcher, ShowOnDirtyErrorStateMatcher } from '@angular/material/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { DecodedBands } from '@domain/colour-code';
import { checkReading } from '@domain/quick-check';
import { VERDICT_LABELS, type DecisionRule } from '@domain/words';
import { map } from 'rxjs';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { VerdictBadge } from '../../shared/verdict-badge/verdict-badge';
import { BandBar } from '../band-bar/band-bar';
import { CalcApi } from '../calc-api';
import { numberText, ohmsText, pctText } from '../calc-format';
import { CALC_MESSAGES } from '../calc-validators';
import { REASON_LABELS, SIDE_LABELS } from '../calc-words';
import { ColourPicker } from '../colour-picker/colour-picker';
import { CALC_CONFIRM_DELAY_MS, confirmWithServer } from '../confirmation';
import { ConfirmationStatus } from '../confirmation-status/confirmation-status';
import { MeterEditor } from '../meter-editor/meter-editor';
import { MeterChoice } from '../meter-editor/meter-form';
import { VerdictExplanation } from '../verdict-explanation/verdict-explanation';
import { ReadingField, ReadingFormValue, ToleranceChoice, localCheck, verdictDifferences } from './verdict-request';

/** The reading states offered as keys (DESIGN.md §5: always shown), as typed into the reading. */
const STATE_KEYS: readonly { text: string; label: string }[] = [
  { text: 'OL', label: 'OL (over range)' },
  { text: 'open', label: 'open' },
  { text: 'short', label: 'short' },
  { text: 'climbing', label: 'climbing' },
  { text: 'unstable', label: 'unstable' },
  { text: 'no access', label: 'no access' },
];

const FIELDS: readonly ReadingField[] = ['nominal', 'tolerance', 'customPct', 'allowanceBelowPct', 'allowanceAbovePct', 'reading', 'nearLimitFraction'];

/**
 * One reading against its band (issue 3, "Quick check page"): the nominal typed or picked as
 * colour bands, a tolerance or an allowance, the reading as typed, the rule and an optional meter
 * profile. The verdict is computed here at once with the domain's `checkReading`, then confirmed
 * by `POST /api/calc/verdict`; the server's answer only sets the confirmation line.
 */
@Component({
  selector: 'dm-reading-check',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    FieldErrors,
    VerdictBadge,
    BandBar,
    ColourPicker,
    ConfirmationStatus,
    MeterEditor,
    VerdictExplanation,
  ],
  templateUrl: './reading-check.html',
  styleUrl: './reading-check.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  providers: [{ provide: ErrorStateMatcher, useClass: ShowOnDirtyErrorStateMatcher }],
})
export class ReadingCheck {
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly api = inject(CalcApi);

  /** The meter profile in use, as the meter editor last gave it. */
  protected readonly meter = signal<MeterChoice | null>(null);
  /** The same, for the page to hand to the network panel. */
  readonly meterChange = output<MeterChoice | null>();

  protected readonly messages = CALC_MESSAGES;
  protected readonly stateKeys = STATE_KEYS;
  protected readonly reasonLabels = REASON_LABELS;
  protected readonly sideLabels = SIDE_LABELS;
  protected readonly nominalSource = signal<'typed' | 'bands'>('typed');

  protected readonly form = this.fb.group({
    nominal: ['100k'],
    tolerance: this.fb.control<ToleranceChoice>('10'),
    customPct: ['1'],
    allowanceBelowPct: ['10'],
    allowanceAbovePct: ['20'],
    reading: ['108.6k'],
    decision: this.fb.control<DecisionRule>('simple'),
    nearLimitFraction: ['0.75'],
  });

  private readonly value = toSignal(this.form.valueChanges.pipe(map(() => this.form.getRawValue() as ReadingFormValue)), {
    initialValue: this.form.getRawValue() as ReadingFormValue,
  });
  protected readonly tolerance = computed(() => this.value().tolerance);
  /** Computed in the browser at once, with the function the API calls. */
  protected readonly local = computed(() => localCheck(this.value(), this.meter()));
  protected readonly response = computed(() => {
    const c = this.local();
    return c.ok ? c.response : null;
  });
  protected readonly formProblems = computed(() => {
    const c = this.local();
    return c.ok ? [] : c.problems.filter((p) => p.field === 'form').map((p) => p.message);
  });
  protected readonly nominalHint = computed(() => {
    const n = this.local().nominal;
    if (!n) return '';
    if (n.state !== 'value') return n.display;
    const marked = n.tolerancePct !== null && this.value().tolerance !== 'marked' ? ` — marked ±${n.tolerancePct} %: choose “as marked” to use it` : '';
    return `${n.display} · code ${n.code}${marked}`;
  });
  protected readonly summary = computed(() => {
    const r = this.response();
    if (!r) return '';
    const parts = [VERDICT_LABELS[r.verdict]];
    if (r.driftPct !== null) parts.push(`drift ${pctText(r.driftPct)}`);
    if (r.reason) parts.push(REASON_LABELS[r.reason]);
    if (r.side) parts.push(SIDE_LABELS[r.side]);
    return parts.join(', ');
  });

  protected readonly confirmation = confirmWithServer(
    computed(() => {
      const c = this.local();
      return c.ok ? c.request : null;
    }),
    (req) => this.api.verdict(req),
    (req) => {
      try {
        return checkReading(req);
      } catch {
        return null;
      }
    },
    verdictDifferences,
    inject(CALC_CONFIRM_DELAY_MS),
  );

  protected readonly ohmsText = ohmsText;
  protected readonly pctText = pctText;
  protected readonly numberText = numberText;

  constructor() {
    // The domain's messages beside the fields they belong to (error key `domain`).
    effect(() => {
      const c = this.local();
      const problems = c.ok ? [] : c.problems;
      for (const name of FIELDS) {
        const control = this.form.controls[name];
        const message = problems.find((p) => p.field === name)?.message;
        const current = control.getError('domain') as string | undefined;
        if (message !== undefined && current !== message) control.setErrors({ ...(control.errors ?? {}), domain: message });
        else if (message === undefined && current !== undefined) {
          const { domain: _gone, ...rest } = control.errors ?? {};
          control.setErrors(Object.keys(rest).length ? rest : null);
        }
      }
    });
  }

  protected useMeter(choice: MeterChoice | null): void {
    this.meter.set(choice);
    this.meterChange.emit(choice);
  }

  /** Colour bands picked: the nominal and tolerance they mark. */
  protected useBands(decoded: DecodedBands): void {
    const nominal = this.form.controls.nominal;
    nominal.setValue(`${ohmsText(decoded.ohms, 6)} ±${decoded.tolerancePct} %`);
    nominal.markAsDirty();
    this.form.controls.tolerance.setValue('marked');
  }

  /** A reading-state key: the reading becomes that state. */
  protected setState(text: string): void {
    const reading = this.form.controls.reading;
    reading.setValue(text);
    reading.markAsDirty();
  }
}
