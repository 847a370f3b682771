import { DatePipe } from '@angular/common';
import { HttpEventType } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialog, MatDialogModule } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { Subscription, concatMap, filter, from, map } from 'rxjs';
import { apiErrorOf } from '../../../core/errors/api-error';
import { PHOTO_CAPTION_MAX, PHOTO_CAPTION_PATTERN, SET_PHOTO_TYPES, SetPhoto, SetPhotosApi } from '../../set-photos-api';

/** `812 B`, `14.2 KiB`, `3.1 MiB` (binary units, as the API's size limit). */
export function photoSize(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MiB`;
}

const CAPTION_MESSAGES = {
  maxlength: `At most ${PHOTO_CAPTION_MAX} characters.`,
  pattern: 'One line of plain text: no line breaks, no markup such as <b>.',
};

const captionControl = (value = '') => new FormControl(value, { nonNullable: true, validators: [Validators.maxLength(PHOTO_CAPTION_MAX), Validators.pattern(PHOTO_CAPTION_PATTERN)] });

/** The first refusal of a caption control in words, or null. */
function captionProblem(c: FormControl<string>): string | null {
  if (c.hasError('maxlength')) return CAPTION_MESSAGES.maxlength;
  if (c.hasError('pattern')) return CAPTION_MESSAGES.pattern;
  return null;
}

/**
 * The photos of a set (intake photos, and photos attached to a reading of one of its surveys):
 * a grid of thumbnails with their captions and the test point of a linked reading; upload from a
 * file or, on a tablet, straight from the camera; caption edits; delete after a confirmation; a
 * click opens the photo at full size. Images come through HttpClient as blobs (the access token
 * rides on the request), shown through object URLs revoked when no longer needed.
 */
@Component({
  selector: 'dm-photos-section',
  imports: [DatePipe, ReactiveFormsModule, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule],
  templateUrl: './photos-section.html',
  styleUrl: './photos-section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PhotosSection {
  private readonly api = inject(SetPhotosApi);
  private readonly dialog = inject(MatDialog);
  private readonly destroyRef = inject(DestroyRef);

  readonly setId = input.required<number>();

  protected readonly accepted = SET_PHOTO_TYPES;
  protected readonly captionMax = PHOTO_CAPTION_MAX;
  protected readonly photos = signal<readonly SetPhoto[]>([]);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  /** Thumbnail object URLs by photo id (revoked when the photo leaves the grid and on destroy). */
  protected readonly thumbs = signal<ReadonlyMap<number, string>>(new Map());
  protected readonly brokenThumbs = signal<ReadonlySet<number>>(new Set());
  private readonly asked = new Set<number>();

  /** The caption given to the next photos uploaded. */
  protected readonly newCaption = captionControl();
  protected readonly newCaptionProblem = signal<string | null>(null);
  protected readonly upload = signal<{ name: string; percent: number | null } | null>(null);
  protected readonly uploadError = signal<string | null>(null);

  /** The photo whose caption is being edited, its control, and the answer to the last save. */
  protected readonly editing = signal<number | null>(null);
  protected readonly editCaption = captionControl();
  protected readonly editProblem = signal<string | null>(null);
  protected readonly busy = signal<number | null>(null);
  protected readonly actionError = signal<string | null>(null);

  protected readonly count = computed(() => this.photos().length);
  private loadSub: Subscription | null = null;

  constructor() {
    effect(() => {
      const id = this.setId();
      untracked(() => this.load(id));
    });
    effect(() => {
      const list = this.photos();
      untracked(() => this.syncThumbnails(list));
    });
    this.destroyRef.onDestroy(() => {
      for (const url of this.thumbs().values()) URL.revokeObjectURL(url);
    });
  }

  private load(setId: number): void {
    this.loadSub?.unsubscribe();
    this.loading.set(true);
    this.loadError.set(null);
    this.loadSub = this.api
      .list(setId)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (items) => {
          this.loading.set(false);
          this.photos.set(items);
        },
        error: (err: unknown) => {
          this.loading.set(false);
          this.loadError.set(apiErrorOf(err).message);
        },
      });
  }

  protected describe(p: SetPhoto): string {
    return `${p.caption || p.name}${p.testPointKey ? `, test point ${p.testPointKey}` : ''} (${photoSize(p.bytes)}): open at full size`;
  }

  protected open(p: SetPhoto): void {
    this.dialog.open<PhotoViewer, SetPhoto>(PhotoViewer, {
      data: p,
      width: '960px',
      maxWidth: '96vw',
      maxHeight: '96vh',
      autoFocus: 'dialog',
      ariaLabel: p.caption || p.name,
    });
  }

  // ---- upload

  protected picked(event: Event): void {
    const el = event.target as HTMLInputElement;
    const list = Array.from(el.files ?? []);
    el.value = '';
    this.send(list);
  }

  /** Uploads one file after the other with the caption given; the first refusal stops the rest and is shown. */
  protected send(list: readonly File[]): void {
    if (!list.length || this.upload()) return;
    const problem = captionProblem(this.newCaption);
    this.newCaptionProblem.set(problem);
    if (problem) {
      this.newCaption.markAsTouched();
      return;
    }
    this.uploadError.set(null);
    const setId = this.setId();
    const caption = this.newCaption.value.trim();
    from(list)
      .pipe(
        concatMap((file) => {
          this.upload.set({ name: file.name, percent: 0 });
          return this.api.upload(setId, file, { caption }).pipe(
            filter((e) => e.type === HttpEventType.UploadProgress || e.type === HttpEventType.Response),
            map((e) => ({ file, e })),
          );
        }),
        takeUntilDestroyed(this.destroyRef),
      )
      .subscribe({
        next: ({ file, e }) => {
          if (e.type === HttpEventType.UploadProgress) this.upload.set({ name: file.name, percent: e.total ? Math.round((100 * e.loaded) / e.total) : null });
          else if (e.type === HttpEventType.Response && e.body) {
            const added = e.body;
            this.photos.update((l) => [...l.filter((x) => x.id !== added.id), added]);
          }
        },
        error: (err: unknown) => {
          const name = this.upload()?.name;
          this.upload.set(null);
          this.uploadError.set(`${name ? `${name}: ` : ''}${apiErrorOf(err).message}`);
        },
        complete: () => {
          this.upload.set(null);
          this.newCaption.setValue('');
          this.newCaptionProblem.set(null);
        },
      });
  }

  // ---- caption

  protected edit(p: SetPhoto): void {
    this.editing.set(p.id);
    this.editCaption.setValue(p.caption);
    this.editCaption.markAsPristine();
    this.editProblem.set(null);
    this.actionError.set(null);
  }

  protected cancelEdit(): void {
    this.editing.set(null);
    this.editProblem.set(null);
  }

  protected saveCaption(p: SetPhoto): void {
    const problem = captionProblem(this.editCaption);
    this.editProblem.set(problem);
    if (problem) {
      this.editCaption.markAsTouched();
      return;
    }
    const caption = this.editCaption.value.trim();
    if (caption === p.caption) {
      this.editing.set(null);
      return;
    }
    this.busy.set(p.id);
    this.api.change(this.setId(), p.id, { caption }).subscribe({
      next: (saved) => {
        this.busy.set(null);
        this.editing.set(null);
        this.photos.update((l) => l.map((x) => (x.id === saved.id ? saved : x)));
      },
      error: (err: unknown) => {
        this.busy.set(null);
        this.editProblem.set(apiErrorOf(err).message);
      },
    });
  }

  // ---- delete

  protected remove(p: SetPhoto): void {
    this.actionError.set(null);
    this.dialog
      .open<ConfirmPhotoDelete, SetPhoto, boolean>(ConfirmPhotoDelete, { data: p, width: '440px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((yes) => {
        if (!yes) return;
        this.busy.set(p.id);
        this.api.remove(this.setId(), p.id).subscribe({
          next: () => {
            this.busy.set(null);
            this.photos.update((l) => l.filter((x) => x.id !== p.id));
          },
          error: (err: unknown) => {
            this.busy.set(null);
            const e = apiErrorOf(err);
            this.actionError.set(e.status === 404 ? 'That photo was already deleted.' : e.message);
            if (e.status === 404) this.photos.update((l) => l.filter((x) => x.id !== p.id));
          },
        });
      });
  }

  // ---- thumbnails

  private syncThumbnails(list: readonly SetPhoto[]): void {
    const here = new Set(list.map((p) => p.id));
    const gone = [...this.thumbs().entries()].filter(([id]) => !here.has(id));
    if (gone.length) {
      for (const [, url] of gone) URL.revokeObjectURL(url);
      this.thumbs.update((m) => new Map([...m].filter(([id]) => here.has(id))));
    }
    for (const id of [...this.asked]) if (!here.has(id)) this.asked.delete(id);
    for (const p of list) {
      if (!p.thumbnailUrl || this.asked.has(p.id)) continue;
      this.asked.add(p.id);
      this.api
        .blob(p.thumbnailUrl)
        .pipe(takeUntilDestroyed(this.destroyRef))
        .subscribe({
          next: (blob) => {
            if (!this.asked.has(p.id)) return;
            const url = URL.createObjectURL(blob);
            this.thumbs.update((m) => new Map(m).set(p.id, url));
          },
          error: () => this.brokenThumbs.update((s) => new Set(s).add(p.id)),
        });
    }
  }
}

// ---------------------------------------------------------------------------------------------
// The larger view

/** One photo at full size (fetched as a blob), its caption, reading, who and when, and Download. */
@Component({
  selector: 'dm-photo-viewer',
  imports: [DatePipe, MatDialogModule, MatButtonModule, MatIconModule, MatProgressBarModule],
  template: `
    <h2 mat-dialog-title>{{ data.caption || data.name }}</h2>
    <mat-dialog-content class="viewer">
      @if (failed(); as message) {
        <p class="dm-form-message" role="alert">{{ message }}</p>
      } @else if (!url()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading the photo" />
      } @else {
        <img class="full" [src]="url()" [alt]="data.caption || data.name" />
      }
      <dl class="facts">
        @if (data.testPointKey) {
          <dt>Reading</dt>
          <dd class="reading">Test point {{ data.testPointKey }}</dd>
        }
        <dt>File</dt>
        <dd class="name">{{ data.name }} · {{ size }}</dd>
        <dt>Added</dt>
        <dd class="added">{{ data.createdAt | date: 'medium' }}{{ data.uploadedBy ? ' by ' + data.uploadedBy.name : '' }}</dd>
      </dl>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      @if (url(); as href) {
        <a mat-stroked-button class="dm-touch" [href]="href" [attr.download]="data.name"><mat-icon aria-hidden="true">download</mat-icon> Download</a>
      }
      <button mat-flat-button type="button" class="dm-touch" mat-dialog-close>Close</button>
    </mat-dialog-actions>
  `,
  styles: `
    .full { display: block; max-width: 100%; max-height: 70vh; margin: 0 auto; object-fit: contain; }
    .facts { display: grid; grid-template-columns: max-content 1fr; gap: 4px 16px; margin: 16px 0 0; }
    .facts dt { font-weight: 500; }
    .facts dd { margin: 0; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PhotoViewer {
  protected readonly data = inject<SetPhoto>(MAT_DIALOG_DATA);
  private readonly api = inject(SetPhotosApi);
  protected readonly url = signal<string | null>(null);
  protected readonly failed = signal<string | null>(null);
  protected readonly size = photoSize(this.data.bytes);

  constructor() {
    this.api
      .blob(this.data.url)
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: (blob) => this.url.set(URL.createObjectURL(blob)),
        error: (err: unknown) => this.failed.set(`The photo could not be loaded: ${apiErrorOf(err).status === 404 ? 'it is no longer there.' : apiErrorOf(err).message}`),
      });
    inject(DestroyRef).onDestroy(() => {
      const u = this.url();
      if (u) URL.revokeObjectURL(u);
    });
  }
}

/** Asks before a photo is deleted; closes with true to delete. */
@Component({
  selector: 'dm-confirm-photo-delete',
  imports: [MatDialogModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>Delete this photo?</h2>
    <mat-dialog-content>
      <p>“{{ data.caption || data.name }}” is removed from the set for everyone who sees it. This cannot be undone.</p>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" class="dm-touch" [mat-dialog-close]="false" cdkFocusInitial>Keep it</button>
      <button mat-flat-button type="button" class="dm-touch" [mat-dialog-close]="true">Delete</button>
    </mat-dialog-actions>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmPhotoDelete {
  protected readonly data = inject<SetPhoto>(MAT_DIALOG_DATA);
}
