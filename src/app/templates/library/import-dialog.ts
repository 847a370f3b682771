import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { TemplateProblem } from '@domain/template-format';
import { apiErrorOf } from '../../core/errors/api-error';
import { TemplateView, TemplatesApi, problemsOf } from '../templates-api';

/** Largest file read into the paste box (the API's body limit is of the same order). */
export const IMPORT_MAX_BYTES = 2 * 1024 * 1024;

/**
 * "Import": a file of our own format or pasted JSON. The API imports all or nothing; every problem
 * it finds is listed with its JSON path.
 */
@Component({
  selector: 'dm-import-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  templateUrl: './import-dialog.html',
  styles: `
    .file { display: flex; flex-wrap: wrap; align-items: center; gap: 8px 16px; margin-bottom: 12px; }
    .file-input { position: absolute; width: 1px; height: 1px; opacity: 0; }
    textarea { font-family: ui-monospace, monospace; font-size: 13px; }
    .problems { margin: 0; padding-left: 20px; max-height: 40vh; overflow: auto; }
    .problems li { margin-bottom: 4px; }
    code { font-weight: 600; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ImportDialog {
  private readonly api = inject(TemplatesApi);
  private readonly dialogRef = inject<MatDialogRef<ImportDialog, TemplateView>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly text = new FormControl('', { nonNullable: true });
  protected readonly fileName = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly message = signal<string | null>(null);
  protected readonly problems = signal<readonly TemplateProblem[]>([]);

  protected async pickFile(event: Event): Promise<void> {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    this.problems.set([]);
    if (file.size > IMPORT_MAX_BYTES) {
      this.message.set(`${file.name} is larger than ${IMPORT_MAX_BYTES / 1024 / 1024} MB: not a template export.`);
      return;
    }
    this.message.set(null);
    this.fileName.set(file.name);
    this.text.setValue(await file.text());
  }

  protected importNow(): void {
    if (this.busy()) return;
    this.problems.set([]);
    this.message.set(null);
    const raw = this.text.value.trim();
    if (!raw) {
      this.message.set('Choose a file or paste the JSON of a template export.');
      return;
    }
    let document: unknown;
    try {
      document = JSON.parse(raw);
    } catch (e) {
      this.message.set(`This is not JSON: ${e instanceof Error ? e.message : String(e)}. Nothing was imported.`);
      return;
    }
    if (typeof document !== 'object' || document === null || Array.isArray(document)) {
      this.message.set('A template export is one JSON object. Nothing was imported.');
      return;
    }
    this.busy.set(true);
    this.api
      .importDocument(document)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (created) => this.dialogRef.close(created),
        error: (err: unknown) => {
          const problems = problemsOf(err);
          this.problems.set(problems.map((p) => ({ ...p, path: p.path.replace(/^document\.?/, '') || '(the document)' })));
          this.message.set(
            problems.length
              ? `${problems.length === 1 ? 'One problem' : `${problems.length} problems`} found. Nothing was imported.`
              : `${apiErrorOf(err).message} Nothing was imported.`,
          );
          this.busy.set(false);
        },
      });
  }
}
