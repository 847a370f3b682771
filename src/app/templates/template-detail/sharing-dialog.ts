import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { apiErrorOf } from '../../core/errors/api-error';
import { VISIBILITY_ICONS, VISIBILITY_LABELS } from '../template-words';
import { PersonRef, SharingAnswer, TEMPLATE_VISIBILITIES, TemplateView, TemplateVisibility, TemplatesApi } from '../templates-api';

/** A person shared with: known by name (from the API), or just entered by account number. */
interface Share {
  readonly id: number;
  readonly name: string | null;
}

/**
 * Sharing: private, shared with named users, or public. The API takes account numbers (user ids);
 * it has no people search for non-admins yet, so a new person is added by their account number.
 */
@Component({
  selector: 'dm-sharing-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatRadioModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>Sharing</h2>
    <mat-dialog-content>
      @if (error(); as text) {
        <p class="dm-form-message" role="alert">{{ text }}</p>
      }
      <mat-radio-group class="choices" aria-label="Who sees this template" [value]="visibility()" (change)="visibility.set($event.value)">
        @for (v of visibilities; track v) {
          <mat-radio-button [value]="v" class="dm-touch">
            <span class="choice"><mat-icon aria-hidden="true">{{ icons[v] }}</mat-icon>{{ labels[v] }}</span>
          </mat-radio-button>
        }
      </mat-radio-group>
      @if (visibility() === 'shared') {
        <h3>Shared with</h3>
        @if (people().length) {
          <ul class="people">
            @for (p of people(); track p.id) {
              <li>
                <span>{{ p.name ?? 'account ' + p.id }} <span class="sub">(account {{ p.id }})</span></span>
                <button mat-button type="button" class="dm-touch" (click)="remove(p.id)">
                  Remove<span class="cdk-visually-hidden"> {{ p.name ?? 'account ' + p.id }}</span>
                </button>
              </li>
            }
          </ul>
        } @else {
          <p>Nobody yet: add at least one person.</p>
        }
        <form class="add" (submit)="$event.preventDefault(); add()">
          <mat-form-field subscriptSizing="dynamic">
            <mat-label>Account number</mat-label>
            <input matInput [formControl]="newId" inputmode="numeric" autocomplete="off" />
            <mat-hint>Their account number (an admin can look it up).</mat-hint>
          </mat-form-field>
          <button mat-stroked-button type="submit" class="dm-touch">Add</button>
        </form>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" class="dm-touch" mat-dialog-close>Cancel</button>
      <button mat-flat-button type="button" class="dm-touch" [disabled]="busy()" (click)="save()">Save</button>
    </mat-dialog-actions>
  `,
  styles: `
    .choices { display: flex; flex-direction: column; gap: 4px; }
    .choice { display: inline-flex; align-items: center; gap: 8px; }
    .people { padding: 0; list-style: none; }
    .people li { display: flex; align-items: center; justify-content: space-between; gap: 8px; }
    .sub { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); }
    .add { display: flex; flex-wrap: wrap; align-items: flex-start; gap: 8px 16px; margin-top: 8px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SharingDialog {
  private readonly api = inject(TemplatesApi);
  private readonly dialogRef = inject<MatDialogRef<SharingDialog, SharingAnswer>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);
  private readonly template = inject<TemplateView>(MAT_DIALOG_DATA);

  protected readonly visibilities = TEMPLATE_VISIBILITIES;
  protected readonly labels = VISIBILITY_LABELS;
  protected readonly icons = VISIBILITY_ICONS;
  protected readonly visibility = signal<TemplateVisibility>(this.template.visibility);
  protected readonly people = signal<readonly Share[]>((this.template.sharedWith ?? []).map((p: PersonRef) => ({ id: p.id, name: p.name })));
  protected readonly newId = new FormControl('', { nonNullable: true });
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);

  protected add(): void {
    const id = Number(this.newId.value.trim());
    if (!Number.isInteger(id) || id < 1) {
      this.error.set('An account number is a whole number such as 12.');
      return;
    }
    this.error.set(null);
    if (!this.people().some((p) => p.id === id)) this.people.update((list) => [...list, { id, name: null }]);
    this.newId.setValue('');
  }

  protected remove(id: number): void {
    this.people.update((list) => list.filter((p) => p.id !== id));
  }

  protected save(): void {
    if (this.busy()) return;
    this.error.set(null);
    const visibility = this.visibility();
    const ids = visibility === 'shared' ? this.people().map((p) => p.id) : [];
    if (visibility === 'shared' && ids.length === 0) {
      this.error.set('Add at least one person to share with, or choose private or public.');
      return;
    }
    this.busy.set(true);
    this.api
      .share(this.template.id, visibility, ids)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (answer) => this.dialogRef.close(answer),
        error: (err: unknown) => {
          const e = apiErrorOf(err);
          // `userIds[2]`: name the account the API refused.
          const at = /^userIds\[(\d+)\]$/.exec(e.field ?? '');
          this.error.set(at ? `Account ${ids[Number(at[1])]}: ${e.message}` : e.message);
          this.busy.set(false);
        },
      });
  }
}
