import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink } from '@angular/router';
import type { SetDetail } from '@domain/set-format';
import type { TemplateDocument } from '@domain/template-format';
import { catchError, combineLatest, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { HOT_CHASSIS_CAUTION, POWER_LABELS } from '../../templates/template-words';
import { TemplatesApi } from '../../templates/templates-api';
import { JOB_STATUS_LABELS, RESTORATION_LEVEL_LABELS } from '../set-words';
import { SetsApi } from '../sets-api';
import { BringUpSection } from './sections/bring-up-section';
import { DeviationsSection } from './sections/deviations-section';
import { GatesSection } from './sections/gates-section';
import { HistorySection } from './sections/history-section';
import { IntakeSection } from './sections/intake-section';
import { LiftedLeadsSection } from './sections/lifted-leads-section';
import { PartsSection } from './sections/parts-section';
import { PhotosSection } from './sections/photos-section';
import { ReplacementsSection } from './sections/replacements-section';
import { SharingSection } from './sections/sharing-section';
import { SurveysSection } from './sections/surveys-section';
import { TubesSection } from './sections/tubes-section';

type Loaded<T> = { state: 'loading' } | { state: 'ok'; value: T } | { state: 'failed'; status: number; message: string };

/**
 * `/sets/:id`: one physical set — its intake record, surveys over time, tube records, deviations,
 * safety gates, lifted leads, parts record, replacement list, bring-up log, history and sharing.
 * Each tab loads its own data when first opened.
 */
@Component({
  selector: 'dm-set-page',
  imports: [
    DatePipe,
    RouterLink,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    MatTabsModule,
    SurveysSection,
    TubesSection,
    DeviationsSection,
    GatesSection,
    LiftedLeadsSection,
    PartsSection,
    PhotosSection,
    ReplacementsSection,
    BringUpSection,
    HistorySection,
    SharingSection,
    IntakeSection,
  ],
  templateUrl: './set-page.html',
  styleUrl: './set-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetPage {
  private readonly api = inject(SetsApi);
  private readonly templates = inject(TemplatesApi);

  /** Route parameter. */
  readonly id = input.required<string>();
  protected readonly setId = computed(() => Number(this.id()));

  protected readonly statusLabels = JOB_STATUS_LABELS;
  protected readonly levelLabels = RESTORATION_LEVEL_LABELS;
  protected readonly caution = HOT_CHASSIS_CAUTION;

  private readonly reloads = signal(0);
  protected readonly loaded = signal<Loaded<SetDetail>>({ state: 'loading' });
  protected readonly set = computed(() => {
    const l = this.loaded();
    return l.state === 'ok' ? l.value : null;
  });
  /** The template version a new survey defaults to (components and sockets for deviations and tubes). */
  protected readonly doc = signal<TemplateDocument | null>(null);

  constructor() {
    combineLatest([toObservable(this.setId), toObservable(this.reloads)])
      .pipe(
        switchMap(([id]) =>
          this.api.get(id).pipe(
            map((value): Loaded<SetDetail> => ({ state: 'ok', value })),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              return of<Loaded<SetDetail>>({ state: 'failed', status: e.status, message: e.message });
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((l) => this.loaded.set(l));

    toObservable(computed(() => {
      const s = this.set();
      return s && s.latestPublishedVersion !== null ? `${s.template.id}/${s.latestPublishedVersion}` : null;
    }))
      .pipe(
        switchMap((ref) => {
          if (ref === null) return of(null);
          const [templateId, version] = ref.split('/').map(Number);
          return this.templates.version(templateId, version).pipe(
            map((v) => v.content),
            catchError(() => of(null)),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe((doc) => this.doc.set(doc));
  }

  protected powerLabel(power: string): string {
    return (POWER_LABELS as Readonly<Record<string, string>>)[power] ?? power;
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  /** A section saved the set and got it back: show the new version without a round trip. */
  protected replace(set: SetDetail | void): void {
    if (set) this.loaded.set({ state: 'ok', value: set });
    else this.reload();
  }
}
