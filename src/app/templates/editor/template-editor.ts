import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { DatePipe } from '@angular/common';
import type { TemplateDocument } from '@domain/template-format';
import { HttpErrorResponse } from '@angular/common/http';
import { apiErrorOf } from '../../core/errors/api-error';
import { CapacitorList } from './capacitor-list/capacitor-list';
import { ChassisForm } from './chassis-form/chassis-form';
import { DraftApi } from './draft-api';
import { EditorStore, type SaveError } from './editor-store';
import { EditorTree } from './editor-tree/editor-tree';
import { NetworkPanel } from './network-panel/network-panel';
import { describeTarget, type PlacedProblem } from './problem-paths';
import { SocketPanel } from './socket-panel/socket-panel';
import { StagePanel } from './stage-panel/stage-panel';

/** Unsaved work kept in the browser, so a reload or a closed tab loses nothing. */
interface KeptWork {
  revision: number;
  keptAt: string;
  content: TemplateDocument;
}

const keptKey = (id: number) => `driftmark.template-draft.${id}`;

/** The error body of a failed PUT, for the store. */
function saveErrorOf(err: unknown): SaveError {
  const e = apiErrorOf(err);
  const body = err instanceof HttpErrorResponse ? (err.error as { error?: { details?: Record<string, unknown> } } | null) : null;
  return { status: e.status, code: e.code, message: e.message, details: body?.error?.details ?? null };
}

/**
 * The chassis template draft editor (`/templates/:id/edit`): stages → sockets → components and
 * test points on the left, the selected item on the right; the chassis network computed in the
 * browser; explicit save with the revision (Ctrl+S).
 */
@Component({
  selector: 'dm-template-editor',
  imports: [DatePipe, MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink, EditorTree, ChassisForm, StagePanel, SocketPanel, CapacitorList, NetworkPanel],
  templateUrl: './template-editor.html',
  styleUrl: './template-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  providers: [EditorStore],
  host: {
    '(document:keydown)': 'shortcut($event)',
    '(window:beforeunload)': 'warnBeforeLeaving($event)',
  },
})
export class TemplateEditor {
  /** The `:id` route parameter (component input binding). */
  readonly id = input.required<string>();

  protected readonly store = inject(EditorStore);
  private readonly api = inject(DraftApi);
  private readonly destroyRef = inject(DestroyRef);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  protected readonly loadError = signal<string | null>(null);
  protected readonly loading = signal(true);
  /** Unsaved work found in the browser from an earlier visit. */
  protected readonly kept = signal<KeptWork | null>(null);
  protected readonly templateId = computed(() => Number(this.id()));
  protected readonly title = computed(() => {
    const c = this.store.doc()?.chassis;
    return c ? `${c.maker} ${c.model}${c.chassisNumber ? ` (${c.chassisNumber})` : ''}` : 'Template';
  });
  protected readonly errors = computed(() => this.store.allProblems().filter((p) => p.severity === 'error'));
  protected readonly warnings = computed(() => this.store.allProblems().filter((p) => p.severity === 'warning'));

  constructor() {
    effect(() => {
      const id = this.templateId();
      untracked(() => this.loadAll(id));
    });
    // Stacked (tablet): a new selection brings its pane into view below the outline.
    let first = true;
    effect(() => {
      this.store.selection();
      if (first) {
        first = false;
        return;
      }
      if (typeof matchMedia === 'function' && matchMedia('(max-width: 1000px)').matches) {
        queueMicrotask(() => this.host.nativeElement.querySelector('main.detail')?.scrollIntoView({ block: 'start' }));
      }
    });
    // Keep unsaved work in the browser (cleared once saved).
    effect(() => {
      const doc = this.store.doc();
      const dirty = this.store.dirty();
      const id = this.store.templateId();
      if (id === null || doc === null) return;
      try {
        if (dirty) localStorage.setItem(keptKey(id), JSON.stringify({ revision: this.store.revision(), keptAt: new Date().toISOString(), content: doc } satisfies KeptWork));
        else localStorage.removeItem(keptKey(id));
      } catch {
        // Storage full or refused: the page still holds the work.
      }
    });
  }

  private loadAll(id: number): void {
    this.loading.set(true);
    this.loadError.set(null);
    this.api
      .tubeTypes()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({ next: (list) => this.store.setTubeTypes(list), error: () => undefined });
    this.api
      .draft(id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (draft) => {
          this.store.load(id, draft);
          this.loading.set(false);
          this.kept.set(this.readKept(id, draft.content));
        },
        error: (err: unknown) => {
          this.loading.set(false);
          this.loadError.set(apiErrorOf(err).message);
        },
      });
  }

  private readKept(id: number, loaded: TemplateDocument): KeptWork | null {
    try {
      const raw = localStorage.getItem(keptKey(id));
      if (raw === null) return null;
      const k = JSON.parse(raw) as KeptWork;
      return JSON.stringify(k.content) === JSON.stringify(loaded) ? null : k;
    } catch {
      return null;
    }
  }

  protected restoreKept(): void {
    const k = this.kept();
    if (k === null) return;
    this.store.restore(k.content, this.store.revision());
    this.kept.set(null);
    this.store.announce(`Unsaved changes from ${new Date(k.keptAt).toLocaleString()} restored on top of revision ${this.store.revision()}.`);
  }

  protected discardKept(): void {
    const id = this.store.templateId();
    if (id !== null) localStorage.removeItem(keptKey(id));
    this.kept.set(null);
  }

  save(): void {
    const id = this.store.templateId();
    const req = this.store.beginSave();
    if (id === null || req === null) return;
    this.api
      .saveDraft(id, req.revision, req.content)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (answer) => this.store.saved(answer, req.change),
        error: (err: unknown) => this.store.saveFailed(saveErrorOf(err), req.content),
      });
  }

  /** After a 409: load the server's draft (this page's changes stay in the browser to restore). */
  protected reloadLatest(): void {
    const id = this.store.templateId();
    const mine = this.store.doc();
    if (id === null) return;
    this.api
      .draft(id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (draft) => {
          this.store.load(id, draft);
          if (mine !== null) this.kept.set({ revision: draft.revision, keptAt: new Date().toISOString(), content: mine });
        },
        error: (err: unknown) => this.store.saveFailed(saveErrorOf(err), mine!),
      });
  }

  /** After a 409, on the author's explicit word: save this page's document over the newer revision. */
  protected overwrite(): void {
    const c = this.store.conflict();
    if (c === null || !Number.isFinite(c.currentRevision)) return;
    if (!confirm(`Replace revision ${c.currentRevision} on the server with this page's document? The changes saved there since revision ${c.yourRevision} will be lost.`)) return;
    this.store.revision.set(c.currentRevision);
    this.store.conflict.set(null);
    this.save();
  }

  protected shortcut(event: KeyboardEvent): void {
    if ((event.ctrlKey || event.metaKey) && !event.altKey && event.key.toLowerCase() === 's') {
      event.preventDefault();
      this.save();
    }
  }

  protected warnBeforeLeaving(event: BeforeUnloadEvent): void {
    if (this.store.dirty()) event.preventDefault();
  }

  /** For a route's canDeactivate: ask before leaving with unsaved changes. */
  confirmLeave(): boolean {
    return !this.store.dirty() || confirm('This template has unsaved changes. Leave without saving? (They stay in this browser to restore.)');
  }

  protected where(p: PlacedProblem): string {
    const doc = this.store.doc();
    return doc === null ? p.path : describeTarget(p.target, doc);
  }

  /** Opens the item a problem belongs to. */
  protected goTo(p: PlacedProblem): void {
    const t = p.target;
    switch (t.kind) {
      case 'chassis':
      case 'conditions':
        this.store.select({ kind: 'chassis' });
        break;
      case 'stage':
        this.store.select({ kind: 'stage', stageKey: t.key });
        break;
      case 'socket':
        this.store.select({ kind: 'socket', stageKey: t.stageKey, socketKey: t.key });
        break;
      case 'component':
        this.store.select({ kind: 'stage', stageKey: t.stageKey });
        this.store.editing.set({ kind: 'component', key: t.key });
        break;
      case 'test-point':
        this.store.select({ kind: 'stage', stageKey: t.stageKey });
        this.store.editing.set({ kind: 'test-point', key: t.key });
        break;
      default:
        this.store.select({ kind: 'network' });
    }
  }
}
