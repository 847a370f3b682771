import { HttpClient, HttpEvent, HttpEventType } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, Injectable, Signal, WritableSignal, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialog, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { DomSanitizer, SafeResourceUrl } from '@angular/platform-browser';
import { Observable, concatMap, filter, from, map, tap } from 'rxjs';
import { apiErrorOf, callerHandles } from '../../core/errors/api-error';
import { FieldErrors } from '../../shared/field-errors/field-errors';

// ---------------------------------------------------------------------------------------------
// The API's words (api/files/files.use-cases.ts `fileView`)

export interface TemplateFile {
  readonly id: number;
  readonly templateId: number;
  /** null = the whole template. */
  readonly stageKey: string | null;
  readonly stageName: string | null;
  readonly name: string;
  readonly caption: string;
  readonly mediaType: string;
  readonly kind: 'image' | 'pdf' | 'other';
  readonly bytes: number;
  readonly width: number | null;
  readonly height: number | null;
  readonly url: string;
  readonly thumbnailUrl: string | null;
  readonly createdBy: number | null;
  readonly createdAt: string;
}

export interface TemplateFileList {
  readonly templateId: number;
  readonly items: readonly TemplateFile[];
}

/** A stage the owner may move a file to. */
export interface StageChoice {
  readonly key: string;
  readonly name: string;
}

/** What a template takes (api/files/media.ts ACCEPTED_TYPES); the server sniffs the content anyway. */
export const ACCEPTED_FILE_TYPES = 'image/jpeg,image/png,image/webp,image/gif,application/pdf';
/** api/files/files.routes.ts CAPTION_MAX. */
export const CAPTION_MAX = 300;

export interface FilesState {
  readonly loading: boolean;
  readonly error: string | null;
  readonly items: readonly TemplateFile[];
}

/**
 * The files of templates, shared by every strip on a page (the template-level strip and one per
 * stage load one list per template), with the writes that keep it current.
 */
@Injectable({ providedIn: 'root' })
export class TemplateFilesStore {
  private readonly http = inject(HttpClient);
  private readonly states = new Map<number, WritableSignal<FilesState>>();
  private readonly inFlight = new Set<number>();
  /** Strips showing each template's files now. */
  private readonly watchers = new Map<number, number>();

  state(templateId: number): Signal<FilesState> {
    return this.slot(templateId).asReadonly();
  }

  /**
   * A strip shows this template's files: the first strip loads the list, the others on the same
   * page share it; once no strip shows it, the next one loads it afresh. Returns the release.
   */
  watch(templateId: number): () => void {
    const n = this.watchers.get(templateId) ?? 0;
    this.watchers.set(templateId, n + 1);
    if (n === 0) this.load(templateId);
    return () => this.watchers.set(templateId, (this.watchers.get(templateId) ?? 1) - 1);
  }

  /** Loads the list unless a load of it is already under way. */
  load(templateId: number): void {
    if (this.inFlight.has(templateId)) return;
    this.inFlight.add(templateId);
    const slot = this.slot(templateId);
    slot.update((s) => ({ ...s, loading: true, error: null }));
    this.http.get<TemplateFileList>(`/api/templates/${templateId}/files`, { context: callerHandles() }).subscribe({
      next: (list) => {
        this.inFlight.delete(templateId);
        slot.set({ loading: false, error: null, items: list.items });
      },
      error: (err: unknown) => {
        this.inFlight.delete(templateId);
        slot.update((s) => ({ ...s, loading: false, error: apiErrorOf(err).message }));
      },
    });
  }

  /** Multipart upload (`file`, `stageKey` when a stage); events carry the progress; the answer joins the list. */
  upload(templateId: number, file: File, stageKey: string | null): Observable<HttpEvent<TemplateFile>> {
    const form = new FormData();
    if (stageKey !== null) form.append('stageKey', stageKey);
    form.append('file', file, file.name);
    return this.http
      .post<TemplateFile>(`/api/templates/${templateId}/files`, form, { reportProgress: true, observe: 'events', context: callerHandles(400, 403, 404, 413) })
      .pipe(
        tap((e) => {
          if (e.type === HttpEventType.Response && e.body) this.put(templateId, e.body);
        }),
      );
  }

  /** Moves a file (`stageKey`, null = the whole template) and/or changes its caption. */
  change(templateId: number, fileId: number, change: { stageKey?: string | null; caption?: string }): Observable<TemplateFile> {
    return this.http
      .patch<TemplateFile>(`/api/templates/${templateId}/files/${fileId}`, change, { context: callerHandles(400, 403, 404) })
      .pipe(tap((f) => this.put(templateId, f)));
  }

  remove(templateId: number, fileId: number): Observable<void> {
    return this.http.delete<void>(`/api/templates/${templateId}/files/${fileId}`, { context: callerHandles(403, 404) }).pipe(
      tap(() => this.slot(templateId).update((s) => ({ ...s, items: s.items.filter((f) => f.id !== fileId) }))),
    );
  }

  /** The bytes of a file or a thumbnail (the authToken interceptor adds the bearer token). */
  blob(url: string): Observable<Blob> {
    return this.http.get(url, { responseType: 'blob', context: callerHandles() });
  }

  private put(templateId: number, f: TemplateFile): void {
    this.slot(templateId).update((s) => {
      const at = s.items.findIndex((x) => x.id === f.id);
      return { ...s, items: at < 0 ? [...s.items, f] : s.items.map((x) => (x.id === f.id ? f : x)) };
    });
  }

  private slot(templateId: number): WritableSignal<FilesState> {
    let s = this.states.get(templateId);
    if (!s) {
      s = signal<FilesState>({ loading: false, error: null, items: [] });
      this.states.set(templateId, s);
    }
    return s;
  }
}

// ---------------------------------------------------------------------------------------------
// Words

/** `812 B`, `14.2 KiB`, `3.1 MiB` (binary units, as the API's size limit). */
export function sizeText(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MiB`;
}

export function pixelText(f: Pick<TemplateFile, 'width' | 'height'>): string {
  return f.width !== null && f.height !== null ? `${f.width} × ${f.height} px` : '';
}

const KIND_WORDS: Readonly<Record<TemplateFile['kind'], string>> = { image: 'image', pdf: 'PDF', other: 'file' };

// ---------------------------------------------------------------------------------------------
// The strip

/**
 * The schematics and photos of a template (`stageKey` null) or of one stage: thumbnails for
 * images, a page icon for PDFs; a click or Enter opens the viewer. The owner (`canEdit`) uploads
 * with the file button or by dropping files on the strip.
 */
@Component({
  selector: 'dm-template-files',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './template-files.html',
  styleUrl: './template-files.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TemplateFiles {
  private readonly store = inject(TemplateFilesStore);
  private readonly dialog = inject(MatDialog);
  private readonly destroyRef = inject(DestroyRef);

  readonly templateId = input.required<number>();
  /** null = the files of the whole template. */
  readonly stageKey = input<string | null>(null);
  readonly canEdit = input(false);
  /** The stages a file may be moved to (the owner's viewer offers them). */
  readonly stages = input<readonly StageChoice[]>([]);
  /** Words for the empty strip. */
  readonly emptyText = input('No schematics or photos yet.');

  protected readonly kindWords = KIND_WORDS;
  protected readonly accepted = ACCEPTED_FILE_TYPES;
  private readonly state = computed(() => this.store.state(this.templateId())());
  protected readonly loading = computed(() => this.state().loading && !this.state().items.length);
  protected readonly loadError = computed(() => this.state().error);
  protected readonly files = computed(() => this.state().items.filter((f) => f.stageKey === this.stageKey()));
  /** Thumbnail object URLs by file id (revoked when the file leaves the strip and on destroy). */
  protected readonly thumbs = signal<ReadonlyMap<number, string>>(new Map());
  protected readonly brokenThumbs = signal<ReadonlySet<number>>(new Set());
  private readonly asked = new Set<number>();
  protected readonly upload = signal<{ name: string; percent: number | null } | null>(null);
  protected readonly uploadError = signal<string | null>(null);
  protected readonly dragging = signal(false);
  protected readonly inputId = `dm-files-${Math.random().toString(36).slice(2, 9)}`;

  constructor() {
    effect((onCleanup) => {
      const id = this.templateId();
      onCleanup(untracked(() => this.store.watch(id)));
    });
    effect(() => {
      const files = this.files();
      untracked(() => this.syncThumbnails(files));
    });
    this.destroyRef.onDestroy(() => {
      for (const url of this.thumbs().values()) URL.revokeObjectURL(url);
    });
  }

  protected open(f: TemplateFile): void {
    this.dialog.open<FileViewer, ViewerData>(FileViewer, {
      data: { file: f, canEdit: this.canEdit(), stages: this.stages() },
      width: '960px',
      maxWidth: '96vw',
      maxHeight: '96vh',
      autoFocus: 'dialog',
      ariaLabel: f.caption || f.name,
    });
  }

  protected picked(event: Event): void {
    const input = event.target as HTMLInputElement;
    const list = Array.from(input.files ?? []);
    input.value = '';
    this.send(list);
  }

  protected dragOver(event: DragEvent): void {
    if (!this.canEdit() || !event.dataTransfer?.types.includes('Files')) return;
    event.preventDefault();
    event.dataTransfer.dropEffect = 'copy';
    this.dragging.set(true);
  }

  protected dragLeave(event: DragEvent): void {
    const to = event.relatedTarget as Node | null;
    if (to && (event.currentTarget as HTMLElement).contains(to)) return;
    this.dragging.set(false);
  }

  protected dropped(event: DragEvent): void {
    if (!this.canEdit()) return;
    event.preventDefault();
    this.dragging.set(false);
    this.send(Array.from(event.dataTransfer?.files ?? []));
  }

  /** Uploads one file after the other; the first refusal stops the rest and is shown. */
  protected send(list: readonly File[]): void {
    if (!list.length || !this.canEdit() || this.upload()) return;
    this.uploadError.set(null);
    const id = this.templateId();
    const stage = this.stageKey();
    from(list)
      .pipe(
        concatMap((file) => {
          this.upload.set({ name: file.name, percent: 0 });
          return this.store.upload(id, file, stage).pipe(
            filter((e) => e.type === HttpEventType.UploadProgress || e.type === HttpEventType.Response),
            map((e) => ({ file, e })),
          );
        }),
        takeUntilDestroyed(this.destroyRef),
      )
      .subscribe({
        next: ({ file, e }) => {
          if (e.type === HttpEventType.UploadProgress) this.upload.set({ name: file.name, percent: e.total ? Math.round((100 * e.loaded) / e.total) : null });
        },
        error: (err: unknown) => {
          const name = this.upload()?.name;
          this.upload.set(null);
          this.uploadError.set(`${name ? `${name}: ` : ''}${apiErrorOf(err).message}`);
        },
        complete: () => this.upload.set(null),
      });
  }

  protected describe(f: TemplateFile): string {
    return `${f.caption || f.name} (${KIND_WORDS[f.kind]}, ${sizeText(f.bytes)}${f.width !== null ? `, ${pixelText(f)}` : ''}): open in the viewer`;
  }

  private syncThumbnails(files: readonly TemplateFile[]): void {
    const here = new Set(files.map((f) => f.id));
    const gone = [...this.thumbs().entries()].filter(([id]) => !here.has(id));
    if (gone.length) {
      for (const [, url] of gone) URL.revokeObjectURL(url);
      this.thumbs.update((m) => new Map([...m].filter(([id]) => here.has(id))));
      for (const [id] of gone) this.asked.delete(id);
    }
    for (const f of files) {
      if (!f.thumbnailUrl || this.asked.has(f.id)) continue;
      this.asked.add(f.id);
      this.store
        .blob(f.thumbnailUrl)
        .pipe(takeUntilDestroyed(this.destroyRef))
        .subscribe({
          next: (blob) => {
            if (!this.asked.has(f.id)) return;
            const url = URL.createObjectURL(blob);
            this.thumbs.update((m) => new Map(m).set(f.id, url));
          },
          error: () => this.brokenThumbs.update((s) => new Set(s).add(f.id)),
        });
    }
  }
}

// ---------------------------------------------------------------------------------------------
// The viewer

export interface ViewerData {
  readonly file: TemplateFile;
  readonly canEdit: boolean;
  readonly stages: readonly StageChoice[];
}

/** One file at full size (the image, or the PDF in a frame), its facts and Download; the owner changes or deletes it. */
@Component({
  selector: 'dm-file-viewer',
  imports: [ReactiveFormsModule, MatDialogModule, MatButtonModule, MatIconModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatProgressBarModule, FieldErrors],
  template: `
    <h2 mat-dialog-title class="viewer-title">{{ file().caption || file().name }}</h2>
    <mat-dialog-content class="viewer">
      @if (failed(); as message) {
        <p class="dm-form-message" role="alert">{{ message }}</p>
      } @else if (!url()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading the file" />
      } @else if (file().kind === 'image') {
        <img class="full" [src]="url()" [alt]="file().caption || file().name" />
      } @else if (file().kind === 'pdf') {
        <iframe class="pdf" [src]="frameUrl()" [title]="'PDF: ' + file().name"></iframe>
      } @else {
        <p>This file is shown only as a download.</p>
      }
      <dl class="facts">
        @if (file().caption) {
          <dt>Caption</dt>
          <dd class="caption">{{ file().caption }}</dd>
        }
        <dt>File</dt>
        <dd class="name">{{ file().name }}</dd>
        <dt>Size</dt>
        <dd class="size">{{ size() }}{{ pixels() ? ' · ' + pixels() : '' }}</dd>
        <dt>On</dt>
        <dd>{{ file().stageKey === null ? 'the whole template' : 'stage ' + (file().stageName ?? file().stageKey) }}</dd>
      </dl>
      @if (data.canEdit) {
        <form class="edit" [formGroup]="form" (ngSubmit)="save()" novalidate>
          <mat-form-field subscriptSizing="dynamic" class="caption-field">
            <mat-label>Caption</mat-label>
            <input matInput formControlName="caption" [attr.maxlength]="captionMax" autocomplete="off" />
            <mat-hint align="end">{{ form.controls.caption.value.length }} / {{ captionMax }}</mat-hint>
            <mat-error><dm-field-errors [control]="form.controls.caption" [messages]="captionMessages" /></mat-error>
          </mat-form-field>
          <mat-form-field subscriptSizing="dynamic" class="stage-field">
            <mat-label>Shown on</mat-label>
            <mat-select formControlName="stageKey">
              <mat-option [value]="''">The whole template</mat-option>
              @for (s of stageChoices(); track s.key) {
                <mat-option [value]="s.key">Stage: {{ s.name }}</mat-option>
              }
            </mat-select>
          </mat-form-field>
          <button mat-stroked-button type="submit" class="dm-touch" [disabled]="busy() || form.pristine">Save</button>
        </form>
        @if (message(); as m) {
          <p class="dm-form-message" role="alert">{{ m }}</p>
        }
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      @if (data.canEdit) {
        <button mat-button type="button" class="dm-touch delete" [disabled]="busy()" (click)="remove()">
          <mat-icon aria-hidden="true">delete</mat-icon> Delete
        </button>
      }
      @if (url(); as href) {
        <a mat-stroked-button class="dm-touch" [href]="href" [attr.download]="file().name">
          <mat-icon aria-hidden="true">download</mat-icon> Download
        </a>
      }
      <button mat-flat-button type="button" class="dm-touch" mat-dialog-close>Close</button>
    </mat-dialog-actions>
  `,
  styleUrl: './template-files.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FileViewer {
  protected readonly data = inject<ViewerData>(MAT_DIALOG_DATA);
  private readonly store = inject(TemplateFilesStore);
  private readonly dialog = inject(MatDialog);
  private readonly dialogRef = inject<MatDialogRef<FileViewer>>(MatDialogRef);
  private readonly sanitizer = inject(DomSanitizer);

  protected readonly captionMax = CAPTION_MAX;
  protected readonly captionMessages = {
    maxlength: `At most ${CAPTION_MAX} characters.`,
    pattern: 'One line of plain text: no line breaks, no markup such as <b>.',
  };
  protected readonly file = signal(this.data.file);
  protected readonly url = signal<string | null>(null);
  /** A blob URL made here, for the PDF frame (Angular asks a resource URL to be vouched for). */
  protected readonly frameUrl = computed<SafeResourceUrl | null>(() => {
    const u = this.url();
    return u ? this.sanitizer.bypassSecurityTrustResourceUrl(u) : null;
  });
  protected readonly failed = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly message = signal<string | null>(null);
  protected readonly size = computed(() => sizeText(this.file().bytes));
  protected readonly pixels = computed(() => pixelText(this.file()));
  protected readonly stageChoices = computed(() => {
    const f = this.file();
    const list = [...this.data.stages];
    if (f.stageKey !== null && !list.some((s) => s.key === f.stageKey)) list.push({ key: f.stageKey, name: f.stageName ?? f.stageKey });
    return list;
  });
  protected readonly form = inject(NonNullableFormBuilder).group({
    // The server's rule (one line, no tag): api/templates/template-schema.ts LINE_PATTERN.
    caption: [this.data.file.caption, [Validators.maxLength(CAPTION_MAX), Validators.pattern(/^(?![\s\S]*<[A-Za-z/!?])[^\u0000-\u001f\u007f]*$/)]],
    stageKey: [this.data.file.stageKey ?? ''],
  });

  constructor() {
    this.store
      .blob(this.data.file.url)
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: (blob) => this.url.set(URL.createObjectURL(blob)),
        error: (err: unknown) => this.failed.set(`The file could not be loaded: ${apiErrorOf(err).status === 404 ? 'it is no longer there.' : apiErrorOf(err).message}`),
      });
    inject(DestroyRef).onDestroy(() => {
      const u = this.url();
      if (u) URL.revokeObjectURL(u);
    });
  }

  protected save(): void {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const f = this.file();
    const caption = this.form.controls.caption.value.trim();
    const stageKey = this.form.controls.stageKey.value || null;
    const change: { caption?: string; stageKey?: string | null } = {};
    if (caption !== f.caption) change.caption = caption;
    if (stageKey !== f.stageKey) change.stageKey = stageKey;
    if (!Object.keys(change).length) {
      this.form.markAsPristine();
      return;
    }
    this.busy.set(true);
    this.message.set(null);
    this.store.change(f.templateId, f.id, change).subscribe({
      next: (saved) => {
        this.busy.set(false);
        this.file.set(saved);
        this.form.setValue({ caption: saved.caption, stageKey: saved.stageKey ?? '' });
        this.form.markAsPristine();
        this.message.set(null);
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.message.set(apiErrorOf(err).message);
      },
    });
  }

  protected remove(): void {
    const f = this.file();
    this.dialog
      .open<ConfirmDelete, TemplateFile, boolean>(ConfirmDelete, { data: f, width: '440px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((yes) => {
        if (!yes) return;
        this.busy.set(true);
        this.store.remove(f.templateId, f.id).subscribe({
          next: () => this.dialogRef.close(),
          error: (err: unknown) => {
            this.busy.set(false);
            this.message.set(apiErrorOf(err).message);
          },
        });
      });
  }
}

/** Asks before a file is deleted; closes with true to delete. */
@Component({
  selector: 'dm-confirm-file-delete',
  imports: [MatDialogModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>Delete this file?</h2>
    <mat-dialog-content>
      <p>“{{ data.caption || data.name }}” ({{ data.name }}) is removed from the template for everyone. This cannot be undone.</p>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" class="dm-touch" [mat-dialog-close]="false" cdkFocusInitial>Keep it</button>
      <button mat-flat-button type="button" class="dm-touch" [mat-dialog-close]="true">Delete</button>
    </mat-dialog-actions>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmDelete {
  protected readonly data = inject<TemplateFile>(MAT_DIALOG_DATA);
}
