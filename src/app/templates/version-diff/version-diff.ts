import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import type { Component as Part, TestPoint } from '@domain/template-format';
import { catchError, combineLatest, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { TEST_POINT_KIND_LABELS, fieldChange, kindWords, nominalText } from '../template-words';
import { DiffEntry, DiffSection, TemplateDiff, TemplateView, TemplatesApi, VersionRef } from '../templates-api';

export type ChangeKind = 'added' | 'removed' | 'changed';

/** Glyph, icon and word per change (never colour alone, WCAG 2.2, 1.4.1). */
export const CHANGE_MARKS: Readonly<Record<ChangeKind, { glyph: string; icon: string; word: string }>> = {
  added: { glyph: '+', icon: 'add_circle', word: 'added' },
  removed: { glyph: '−', icon: 'remove_circle', word: 'removed' },
  changed: { glyph: '~', icon: 'change_circle', word: 'changed' },
};

interface Row {
  key: string;
  change: ChangeKind;
  label: string;
  summary: string;
  fields: { name: string; text: string }[];
}

/** `1`, `draft` → a version reference; anything else → null. */
export function versionRefOf(s: string | undefined | null): VersionRef | null {
  if (s === 'draft') return 'draft';
  const n = Number(s);
  return s && Number.isInteger(n) && n > 0 ? n : null;
}

const refText = (r: VersionRef) => (r === 'draft' ? 'the draft' : `version ${r}`);

function partSummary(c: Part | undefined): string {
  return c ? `${kindWords(c.kind)}, ${c.nodes[0]} – ${c.nodes[1]}, ${nominalText(c.nominal)}${c.tolerancePct !== null ? ` ±${c.tolerancePct} %` : ''}` : '';
}

function pointSummary(t: TestPoint | undefined): string {
  if (!t) return '';
  if (t.kind === 'chart-reading') return `${TEST_POINT_KIND_LABELS[t.kind]}, expected ${nominalText(t.expected)} ±${t.tolerancePct} %`;
  if (t.kind === 'pair-relation') return `${TEST_POINT_KIND_LABELS[t.kind]}, ratio ±${t.ratioTolerancePct} %`;
  return TEST_POINT_KIND_LABELS[t.kind];
}

function rows<T>(section: DiffSection<T>, summary: (t: T | undefined) => string): Row[] {
  const one = (change: ChangeKind) => (e: DiffEntry<T>): Row => ({
    key: e.key,
    change,
    label: e.label,
    summary: summary(e.after ?? e.before),
    fields:
      change === 'changed'
        ? (e.fields ?? []).map((f) => ({
            name: f,
            text: f === 'order' ? 'moved in bench order' : fieldChange((e.before as Record<string, unknown> | undefined)?.[f], (e.after as Record<string, unknown> | undefined)?.[f]),
          }))
        : [],
  });
  return [...section.added.map(one('added')), ...section.removed.map(one('removed')), ...section.changed.map(one('changed'))];
}

/** `/templates/:id/diff?from=&to=`: test points and components added, removed and changed. */
@Component({
  selector: 'dm-version-diff',
  imports: [RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule],
  templateUrl: './version-diff.html',
  styleUrl: './version-diff.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VersionDiff {
  private readonly api = inject(TemplatesApi);
  private readonly router = inject(Router);

  /** Route parameter and query parameters. */
  readonly id = input.required<string>();
  readonly from = input<string>();
  readonly to = input<string>();

  protected readonly marks = CHANGE_MARKS;
  protected readonly changeKinds: readonly ChangeKind[] = ['added', 'removed', 'changed'];
  protected readonly templateId = computed(() => Number(this.id()));
  protected readonly fromRef = computed(() => versionRefOf(this.from()));
  protected readonly toRef = computed(() => versionRefOf(this.to()));
  protected readonly refText = refText;

  protected readonly template = signal<TemplateView | null>(null);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly diff = signal<TemplateDiff | null>(null);

  protected readonly choices = computed(() => {
    const t = this.template();
    if (!t) return [];
    const refs: { ref: VersionRef; label: string }[] = t.versions.map((v) => ({ ref: v.number, label: `Version ${v.number} (${v.state})` }));
    return t.draft ? [...refs, { ref: 'draft' as VersionRef, label: 'Draft' }] : refs;
  });
  protected readonly componentRows = computed(() => {
    const d = this.diff();
    return d ? rows(d.components, partSummary) : [];
  });
  protected readonly testPointRows = computed(() => {
    const d = this.diff();
    return d ? rows(d.testPoints, pointSummary) : [];
  });
  protected readonly nothing = computed(() => {
    const d = this.diff();
    return d !== null && !this.componentRows().length && !this.testPointRows().length && !d.chassis.length && !d.stages.added.length && !d.stages.removed.length && !d.stages.changed.length;
  });

  constructor() {
    toObservable(this.templateId)
      .pipe(
        switchMap((id) => this.api.template(id).pipe(catchError(() => of(null)))),
        takeUntilDestroyed(),
      )
      .subscribe((t) => this.template.set(t));
    combineLatest([toObservable(this.templateId), toObservable(this.fromRef), toObservable(this.toRef)])
      .pipe(
        switchMap(([id, from, to]) => {
          this.loading.set(true);
          if (from === null || to === null) return of({ ok: false as const, message: 'Choose the two versions to compare.' });
          return this.api.diff(id, from, to).pipe(
            map((d) => ({ ok: true as const, d })),
            catchError((err: unknown) => of({ ok: false as const, message: apiErrorOf(err).message })),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe((r) => {
        this.loading.set(false);
        this.diff.set(r.ok ? r.d : null);
        this.error.set(r.ok ? null : r.message);
      });
  }

  protected compare(which: 'from' | 'to', ref: VersionRef): void {
    void this.router.navigate([], { queryParams: { [which]: ref }, queryParamsHandling: 'merge', replaceUrl: true });
  }
}
