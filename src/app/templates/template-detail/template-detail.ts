import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import { hotChassisFor, type TemplateDocument } from '@domain/template-format';
import { Observable, catchError, combineLatest, forkJoin, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import {
  CHASSIS_KIND_LABELS,
  HOT_CHASSIS_CAUTION,
  POWER_LABELS,
  VERSION_STATE_ICONS,
  VISIBILITY_ICONS,
  VISIBILITY_LABELS,
  kindWords,
  tubeTypesOf,
  yearsText,
} from '../template-words';
import { Correction, SharingAnswer, TemplateView, TemplatesApi, TubeType, VersionRef, downloadText } from '../templates-api';
import { CorrectionData, CorrectionDialog } from './correction-dialog';
import { NoteData, NoteDialog } from './note-dialog';
import { PublishData, PublishDialog } from './publish-dialog';
import { SharingDialog } from './sharing-dialog';
import { TemplateFiles } from '../files/template-files';
import { VersionContent } from './version-content';

type Loaded<T> = { state: 'loading' } | { state: 'ok'; value: T } | { state: 'failed'; status: number; message: string };

/** `/templates/:id`: chassis facts, versions, the actions the caller may take, and a read-only version. */
@Component({
  selector: 'dm-template-detail',
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, MatFormFieldModule, MatSelectModule, VersionContent, TemplateFiles],
  templateUrl: './template-detail.html',
  styleUrl: './template-detail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TemplateDetail {
  private readonly api = inject(TemplatesApi);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly router = inject(Router);

  /** Route parameter. */
  readonly id = input.required<string>();
  protected readonly templateId = computed(() => Number(this.id()));

  protected readonly kindLabels = CHASSIS_KIND_LABELS;
  protected readonly powerLabels = POWER_LABELS;
  protected readonly stateIcons = VERSION_STATE_ICONS;
  protected readonly visibilityLabels = VISIBILITY_LABELS;
  protected readonly visibilityIcons = VISIBILITY_ICONS;
  protected readonly caution = HOT_CHASSIS_CAUTION;
  protected readonly kindWords = kindWords;
  protected readonly yearsText = yearsText;

  private readonly reloads = signal(0);
  protected readonly loaded = signal<Loaded<TemplateView>>({ state: 'loading' });
  protected readonly template = computed(() => {
    const l = this.loaded();
    return l.state === 'ok' ? l.value : null;
  });
  /** The version shown (and exported, copied, corrected). */
  protected readonly selected = signal<VersionRef | null>(null);
  protected readonly content = signal<Loaded<TemplateDocument>>({ state: 'loading' });
  protected readonly doc = computed(() => {
    const c = this.content();
    return c.state === 'ok' ? c.value : null;
  });
  protected readonly tubes = signal<ReadonlyMap<string, TubeType>>(new Map());
  /** The stages a file may be moved to: those of the version shown. */
  protected readonly stageChoices = computed(() => this.doc()?.stages.map((s) => ({ key: s.key, name: s.name })) ?? []);
  protected readonly corrections = signal<readonly Correction[]>([]);
  protected readonly busy = signal(false);

  protected readonly owner = computed(() => this.template()?.canEdit === true);
  protected readonly hasDraft = computed(() => {
    const t = this.template();
    return t?.draft !== undefined && t.draft !== null;
  });
  /** What the chooser offers: the draft (owner, admin) and every version, newest first. */
  protected readonly choices = computed(() => {
    const t = this.template();
    if (!t) return [];
    const versions = [...t.versions].sort((a, b) => b.number - a.number).map((v) => ({ ref: v.number as VersionRef, label: `Version ${v.number} (${v.state})` }));
    return this.hasDraft() ? [{ ref: 'draft' as VersionRef, label: 'Draft' }, ...versions] : versions;
  });
  protected readonly nextNumber = computed(() => Math.max(0, ...(this.template()?.versions.map((v) => v.number) ?? [])) + 1);
  protected readonly hot = computed(() => {
    const d = this.doc();
    const t = this.template();
    return d ? d.chassis.hotChassis : t ? hotChassisFor(t.power) : false;
  });
  protected readonly openCorrections = computed(() => this.corrections().filter((c) => c.state === 'open'));
  protected readonly selectedNumber = computed(() => {
    const s = this.selected();
    return typeof s === 'number' ? s : null;
  });

  constructor() {
    combineLatest([toObservable(this.templateId), toObservable(this.reloads)])
      .pipe(
        switchMap(([id]) =>
          this.api.template(id).pipe(
            map((value): Loaded<TemplateView> => ({ state: 'ok', value })),
            catchError((err: unknown) => of(failed(err))),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((l) => {
        this.loaded.set(l);
        if (l.state !== 'ok') return;
        const current = this.selected();
        const stillThere = current === 'draft' ? this.hasDraft() : l.value.versions.some((v) => v.number === current);
        if (current === null || !stillThere) this.selected.set(defaultVersion(l.value));
        this.loadCorrections();
      });

    toObservable(this.selected)
      .pipe(
        switchMap((ref) => {
          if (ref === null) return of<Loaded<TemplateDocument>>({ state: 'failed', status: 404, message: 'No version to show yet.' });
          const id = this.templateId();
          const req: Observable<TemplateDocument> = ref === 'draft' ? this.api.draft(id).pipe(map((d) => d.content)) : this.api.version(id, ref).pipe(map((v) => v.content));
          return req.pipe(
            map((value): Loaded<TemplateDocument> => ({ state: 'ok', value })),
            catchError((err: unknown) => of(failed(err))),
          );
        }),
        switchMap((c) => {
          if (c.state !== 'ok') return of({ c, tubes: new Map<string, TubeType>() });
          const names = tubeTypesOf(c.value);
          if (!names.length) return of({ c, tubes: new Map<string, TubeType>() });
          return forkJoin(names.map((n) => this.api.tubeType(n).pipe(catchError(() => of(null))))).pipe(
            map((list) => ({ c, tubes: new Map(list.filter((t): t is TubeType => t !== null).map((t) => [t.designation, t])) })),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe(({ c, tubes }) => {
        this.content.set(c);
        this.tubes.set(tubes);
      });
  }

  protected choose(ref: VersionRef): void {
    if (ref === this.selected()) return;
    this.content.set({ state: 'loading' });
    this.selected.set(ref);
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  protected publish(): void {
    this.dialog
      .open<PublishDialog, PublishData, TemplateView>(PublishDialog, { data: { templateId: this.templateId(), nextNumber: this.nextNumber() }, width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((view) => {
        if (!view) return;
        this.loaded.set({ state: 'ok', value: view });
        this.choose(view.latestVersion ?? defaultVersion(view) ?? 'draft');
        this.snackBar.open(`Published as version ${view.latestVersion}.`, 'OK', { duration: 5000 });
      });
  }

  protected retire(number: number): void {
    this.askNote({
      title: `Retire version ${number}`,
      text: 'A retired version is hidden from new surveys and kept for the surveys that used it. This cannot be undone.',
      label: 'Reason',
      confirm: 'Retire',
      required: true,
      maxLength: 500,
    }).subscribe((reason) => {
      if (reason === undefined) return;
      this.api.retire(this.templateId(), number, reason).subscribe({
        next: (view) => {
          this.loaded.set({ state: 'ok', value: view });
          this.snackBar.open(`Version ${number} is retired.`, 'OK', { duration: 5000 });
        },
        error: (err: unknown) => this.snackBar.open(apiErrorOf(err).message, 'Dismiss', { duration: 8000 }),
      });
    });
  }

  protected share(): void {
    const t = this.template();
    if (!t) return;
    this.dialog
      .open<SharingDialog, TemplateView, SharingAnswer>(SharingDialog, { data: t, width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((answer) => {
        if (!answer) return;
        this.loaded.set({ state: 'ok', value: { ...t, visibility: answer.visibility, sharedWith: answer.sharedWith } });
        this.snackBar.open(`Now ${VISIBILITY_LABELS[answer.visibility]}.`, 'OK', { duration: 5000 });
      });
  }

  protected copy(): void {
    const ref = this.selected();
    if (ref === null || this.busy()) return;
    this.busy.set(true);
    this.api.copy(this.templateId(), ref).subscribe({
      next: (copy) => {
        this.busy.set(false);
        this.snackBar.open(`Copied into your private template.`, 'OK', { duration: 5000 });
        void this.router.navigate(['/templates', copy.id]);
      },
      error: () => this.busy.set(false),
    });
  }

  protected exportJson(): void {
    const ref = this.selected();
    if (ref === null) return;
    this.api.exportVersion(this.templateId(), ref).subscribe((file) => downloadText(file.filename, file.text));
  }

  protected sendCorrection(): void {
    const number = this.selectedNumber();
    const doc = this.doc();
    if (number === null || !doc) return;
    this.dialog
      .open<CorrectionDialog, CorrectionData, Correction>(CorrectionDialog, { data: { templateId: this.templateId(), versionNumber: number, content: doc }, width: '640px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((c) => {
        if (!c) return;
        this.corrections.update((list) => [c, ...list]);
        this.snackBar.open('Correction sent to the author.', 'OK', { duration: 5000 });
      });
  }

  protected decide(c: Correction, decision: 'accept' | 'decline'): void {
    this.askNote({
      title: decision === 'accept' ? 'Accept the correction' : 'Decline the correction',
      text: decision === 'accept' ? 'The change goes into the draft (a draft is started from the latest version if there is none).' : 'The sender sees your note.',
      label: decision === 'accept' ? 'Note (optional)' : 'Why not (optional)',
      confirm: decision === 'accept' ? 'Accept into the draft' : 'Decline',
      required: false,
      maxLength: 2000,
    }).subscribe((note) => {
      if (note === undefined) return;
      this.api.decideCorrection(this.templateId(), c.id, decision, note).subscribe({
        next: (answer) => {
          this.corrections.update((list) => list.map((x) => (x.id === c.id ? answer.correction : x)));
          this.snackBar.open(answer.draft ? `Accepted: the draft is now at revision ${answer.draft.revision}.` : 'Declined.', 'OK', { duration: 6000 });
          if (answer.draft) this.reload();
        },
        error: (err: unknown) => this.snackBar.open(apiErrorOf(err).message, 'Dismiss', { duration: 8000 }),
      });
    });
  }

  protected changeLines(c: Correction): string[] {
    return Object.entries(c.change).map(([k, v]) => `${k}: ${typeof v === 'object' && v !== null ? JSON.stringify(v) : String(v)}`);
  }

  protected print(): void {
    window.print();
  }

  private loadCorrections(): void {
    this.api.corrections(this.templateId()).subscribe({
      next: (r) => this.corrections.set(r.items),
      error: () => this.corrections.set([]),
    });
  }

  private askNote(data: NoteData): Observable<string | undefined> {
    return this.dialog.open<NoteDialog, NoteData, string>(NoteDialog, { data, width: '520px', maxWidth: '95vw' }).afterClosed();
  }
}

/** The latest published version; else the draft (owner, admin); else the newest retired one. */
export function defaultVersion(t: TemplateView): VersionRef | null {
  if (t.latestVersion !== null) return t.latestVersion;
  if (t.draft) return 'draft';
  const newest = [...t.versions].sort((a, b) => b.number - a.number)[0];
  return newest ? newest.number : null;
}

function failed(err: unknown): { state: 'failed'; status: number; message: string } {
  const e = apiErrorOf(err);
  return { state: 'failed', status: e.status, message: e.message };
}
