import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { SurveyView } from '@domain/set-format';
import { catchError, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { VerdictBadge } from '../../shared/verdict-badge/verdict-badge';
import { nominalText } from '../../templates/template-words';
import { BRING_UP_STEP_LABELS, DEVIATION_KIND_LABELS, TUBE_STATUS_LABELS, JOB_STATUS_LABELS, PARTS_ACTION_LABELS, PURPOSE_LABELS, RESTORATION_LEVEL_LABELS, SURVEY_STATE_LABELS, countsText, pctText } from '../set-words';
import { SetRecordView, SetsApi } from '../sets-api';
import { RecordStage, recordStages } from './record-rows';

type Loaded = { state: 'loading' } | { state: 'ok'; value: SetRecordView } | { state: 'failed'; status: number; message: string };

interface SurveyBlock {
  readonly view: SurveyView;
  readonly stages: readonly RecordStage[];
  readonly problem: string | null;
}

/**
 * `/sets/:id/record`: the printable record of a set — intake, each survey stage by stage with
 * readings and verdicts, amendments, the parts record, the gates, the lifted leads and the
 * bring-up log. The print stylesheet drops the navigation and starts each stage on a new page.
 */
@Component({
  selector: 'dm-set-record',
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, VerdictBadge],
  templateUrl: './set-record.html',
  styleUrl: './set-record.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetRecord {
  private readonly api = inject(SetsApi);

  /** Route parameter. */
  readonly id = input.required<string>();

  protected readonly purposes = PURPOSE_LABELS;
  protected readonly states = SURVEY_STATE_LABELS;
  protected readonly statusLabels = JOB_STATUS_LABELS;
  protected readonly levelLabels = RESTORATION_LEVEL_LABELS;
  protected readonly actionLabels = PARTS_ACTION_LABELS;
  protected readonly stepLabels = BRING_UP_STEP_LABELS;
  protected readonly counts = countsText;
  protected readonly pct = pctText;
  protected readonly now = new Date().toISOString();

  protected readonly loaded = signal<Loaded>({ state: 'loading' });
  protected readonly record = computed(() => {
    const l = this.loaded();
    return l.state === 'ok' ? l.value : null;
  });
  /** Oldest survey first, each grouped by stage. */
  protected readonly surveys = computed<SurveyBlock[]>(() =>
    [...(this.record()?.surveys ?? [])]
      .sort((a, b) => a.survey.startedAt.localeCompare(b.survey.startedAt))
      .map((view) => {
        try {
          return { view, stages: recordStages(view), problem: null };
        } catch (err) {
          return { view, stages: [], problem: err instanceof Error ? err.message : String(err) };
        }
      }),
  );

  constructor() {
    toObservable(computed(() => Number(this.id())))
      .pipe(
        switchMap((id) =>
          this.api.record(id).pipe(
            map((value): Loaded => ({ state: 'ok', value })),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              return of<Loaded>({ state: 'failed', status: e.status, message: e.message });
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((l) => this.loaded.set(l));
  }

  /** The newest survey's template document: names components and sockets for deviations and tube records. */
  private readonly doc = computed(() => {
    const list = this.surveys();
    return list.length ? list[list.length - 1].view.template.document : null;
  });

  protected componentRef(key: string): string {
    return this.doc()?.components.find((c) => c.key === key)?.ref ?? key;
  }

  protected socketName(key: string): string {
    for (const st of this.doc()?.stages ?? []) for (const so of st.sockets) if (so.key === key) return `${so.designator} (${so.tubeType})`;
    return key;
  }

  protected readonly nominal = nominalText;
  protected readonly tubeStatus = TUBE_STATUS_LABELS;
  protected readonly deviationKinds = DEVIATION_KIND_LABELS;

  protected print(): void {
    window.print();
  }

  protected method(m: string | null): string {
    return m ? m.replace(/-/g, ' ') : '';
  }
}
