import { ChangeDetectionStrategy, Component, ElementRef, Injector, afterNextRender, computed, inject, input, signal, viewChildren } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { OhmsInterval } from '@domain/in-circuit';
import type { PartRelation } from '@domain/network';
import { checkNetwork } from '@domain/quick-check';
import { COMPONENT_KINDS, type ComponentKind } from '@domain/words';
import { map } from 'rxjs';
import { VerdictBadge } from '../../shared/verdict-badge/verdict-badge';
import { CalcApi } from '../calc-api';
import { ohmsText } from '../calc-format';
import { REASON_LABELS } from '../calc-words';
import { CALC_CONFIRM_DELAY_MS, confirmWithServer } from '../confirmation';
import { ConfirmationStatus } from '../confirmation-status/confirmation-status';
import type { MeterChoice } from '../meter-editor/meter-form';
import { parsePastedEdges, rowsAsText } from './network-paste';
import { EdgeRowValue, NetworkFormValue, localNetworkCheck, networkDifferences } from './network-request';
import { WORKED_EXAMPLE } from './worked-example';

type RowGroup = FormGroup<{
  id: FormControl<string>;
  a: FormControl<string>;
  b: FormControl<string>;
  ohms: FormControl<string>;
  kind: FormControl<ComponentKind | ''>;
  tolerance: FormControl<string>;
}>;

const RELATION_WORDS: Readonly<Record<PartRelation, string>> = {
  'rank-one': 'in parallel with the rest of the network between the probes',
  linear: 'in series: the only link between the two sides of the probes',
  independent: 'the reading does not depend on this part',
};

/**
 * A small network in circuit (DESIGN.md §3.5): parts built row by row or pasted as text, the
 * probes, the part under test and the reading; shows the expected reading (effective
 * resistance), the healthy range, the implied value of the part with its interval, whether the
 * part explains the reading, the verdict and the parallel paths. Computed here with the domain's
 * `checkNetwork`, then confirmed by `POST /api/calc/network`.
 */
@Component({
  selector: 'dm-network-check',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    VerdictBadge,
    ConfirmationStatus,
  ],
  templateUrl: './network-check.html',
  styleUrl: './network-check.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NetworkCheck {
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly api = inject(CalcApi);
  private readonly injector = inject(Injector);

  /** The meter profile of the reading check; its U at the reading widens the interval. */
  readonly meter = input<MeterChoice | null>(null);

  protected readonly kinds = COMPONENT_KINDS;
  protected readonly relationWords = RELATION_WORDS;
  protected readonly reasonLabels = REASON_LABELS;
  protected readonly ohmsText = ohmsText;
  protected readonly entry = signal<'rows' | 'paste'>('rows');

  protected readonly form = this.fb.group({
    rows: this.fb.array<RowGroup>(WORKED_EXAMPLE.rows.map((r) => this.row(r))),
    from: [WORKED_EXAMPLE.from],
    to: [WORKED_EXAMPLE.to],
    partId: [WORKED_EXAMPLE.partId],
    reading: [WORKED_EXAMPLE.reading],
  });
  protected readonly paste = this.fb.control(rowsAsText(WORKED_EXAMPLE.rows));

  private readonly idInputs = viewChildren<ElementRef<HTMLInputElement>>('idInput');
  private readonly value = toSignal(this.form.valueChanges.pipe(map(() => this.form.getRawValue() as NetworkFormValue)), {
    initialValue: this.form.getRawValue() as NetworkFormValue,
  });
  private readonly pasteText = toSignal(this.paste.valueChanges, { initialValue: this.paste.value });

  protected readonly nodes = computed(() => {
    const set = new Set<string>();
    for (const r of this.value().rows) for (const n of [r.a.trim(), r.b.trim()]) if (n) set.add(n);
    return [...set].sort((x, y) => x.localeCompare(y, undefined, { numeric: true }));
  });
  protected readonly partIds = computed(() => this.value().rows.map((r) => r.id.trim()).filter((id) => id !== ''));
  protected readonly preview = computed(() => parsePastedEdges(this.pasteText()));
  protected readonly previewProblems = computed(() => this.preview().filter((l) => l.problems.length > 0).length);

  protected readonly local = computed(() => localNetworkCheck(this.value(), this.meter()));
  protected readonly result = computed(() => {
    const c = this.local();
    return c.ok ? c.result : null;
  });
  protected readonly problems = computed(() => {
    const c = this.local();
    return c.ok ? [] : c.problems.map((p) => p.message);
  });
  protected readonly partId = computed(() => {
    const c = this.local();
    return c.ok ? (c.request.partId ?? null) : null;
  });
  protected readonly hasReading = computed(() => {
    const c = this.local();
    return c.ok && c.request.readingOhms !== undefined;
  });

  protected readonly confirmation = confirmWithServer(
    computed(() => {
      const c = this.local();
      return c.ok ? c.request : null;
    }),
    (req) => this.api.network(req),
    (req) => {
      try {
        return checkNetwork(req);
      } catch {
        return null;
      }
    },
    networkDifferences,
    inject(CALC_CONFIRM_DELAY_MS),
  );

  protected get rows() {
    return this.form.controls.rows;
  }

  /** `≥ X` when the interval is unbounded above. */
  protected intervalText(i: OhmsInterval | null): string {
    if (!i) return '—';
    return i.highOhms === null ? `≥ ${ohmsText(i.lowOhms)}` : `${ohmsText(i.lowOhms)} to ${ohmsText(i.highOhms)}`;
  }

  protected sharePct(share: number): string {
    return `${Math.round(Math.abs(share) * 100)} %`;
  }

  /** Adds an empty row after `index` (at the end by default) and puts the cursor in its id. */
  protected addRow(index = this.rows.length - 1): void {
    this.rows.insert(index + 1, this.row({ id: '', a: '', b: '', ohms: '', kind: 'carbon-composition', tolerance: '10' }));
    this.focusId(index + 1);
  }

  /** Removes a row; the cursor goes to the row that takes its place (or the one before). */
  protected removeRow(index: number): void {
    this.rows.removeAt(index);
    if (this.rows.length > 0) this.focusId(Math.min(index, this.rows.length - 1));
  }

  /** Enter in a row's last cell adds the next row (keyboard entry, row by row). */
  protected enterInLastCell(event: Event, index: number): void {
    event.preventDefault();
    this.addRow(index);
  }

  /** The pasted rows replace the table (only when every line reads). */
  protected usePasted(): void {
    const lines = this.preview();
    if (lines.length === 0 || lines.some((l) => l.problems.length > 0)) return;
    this.form.setControl('rows', this.fb.array<RowGroup>(lines.map((l) => this.row(l.row))));
    this.entry.set('rows');
  }

  /** The table as text, to edit it in the paste box. */
  protected editAsText(): void {
    this.paste.setValue(rowsAsText(this.value().rows));
    this.entry.set('paste');
  }

  protected restoreExample(): void {
    this.form.setControl('rows', this.fb.array<RowGroup>(WORKED_EXAMPLE.rows.map((r) => this.row(r))));
    this.form.patchValue({ from: WORKED_EXAMPLE.from, to: WORKED_EXAMPLE.to, partId: WORKED_EXAMPLE.partId, reading: WORKED_EXAMPLE.reading });
  }

  private focusId(index: number): void {
    afterNextRender(() => this.idInputs()[index]?.nativeElement.focus(), { injector: this.injector });
  }

  private row(r: EdgeRowValue): RowGroup {
    return this.fb.group({
      id: [r.id],
      a: [r.a],
      b: [r.b],
      ohms: [r.ohms],
      kind: this.fb.control<ComponentKind | ''>(r.kind),
      tolerance: [r.tolerance],
    });
  }
}
