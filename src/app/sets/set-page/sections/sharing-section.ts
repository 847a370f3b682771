import { ChangeDetectionStrategy, Component, OnInit, computed, inject, input, output, signal } from '@angular/core';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { SetDetail } from '@domain/set-format';
import { Auth } from '../../../core/auth/auth';
import { apiErrorOf } from '../../../core/errors/api-error';
import { SetsApi } from '../../sets-api';

interface Share {
  readonly id: number;
  readonly name: string | null;
}

/**
 * Who else sees and edits this set. Only the owner (or an admin) changes it; the API takes
 * account numbers (it has no people search for non-admins).
 */
@Component({
  selector: 'dm-sharing-section',
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule],
  template: `
    <p class="intro">People this set is shared with see it and may edit it (readings, gates, parts record). The owner is {{ set().owner.name }}.</p>
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (saved()) {
      <p class="dm-form-message dm-info" role="status">Sharing saved.</p>
    }
    @if (people().length) {
      <ul class="list" aria-label="Shared with">
        @for (p of people(); track p.id) {
          <li class="person">
            <span>{{ p.name ?? 'account ' + p.id }} <span class="sub">(account {{ p.id }})</span></span>
            @if (canChange()) {
              <button mat-button type="button" class="dm-touch" (click)="remove(p.id)">Remove<span class="cdk-visually-hidden"> {{ p.name ?? 'account ' + p.id }}</span></button>
            }
          </li>
        }
      </ul>
    } @else {
      <p class="empty">Not shared with anyone.</p>
    }
    @if (canChange()) {
      <form class="inline" (submit)="$event.preventDefault(); add()">
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>Account number</mat-label>
          <input matInput [formControl]="newId" inputmode="numeric" autocomplete="off" />
          <mat-hint>Their account number (an admin can look it up).</mat-hint>
        </mat-form-field>
        <button mat-stroked-button type="submit" class="dm-touch">Add</button>
        <button mat-flat-button type="button" class="dm-touch" [disabled]="busy()" (click)="save()">Save sharing</button>
      </form>
    } @else {
      <p class="sub">Only the owner or an admin changes who the set is shared with.</p>
    }
  `,
  styleUrl: './section.scss',
  styles: `.person { display: flex; align-items: center; justify-content: space-between; gap: 8px; }`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SharingSection implements OnInit {
  private readonly api = inject(SetsApi);
  private readonly auth = inject(Auth);
  readonly set = input.required<SetDetail>();
  readonly changed = output<SetDetail | void>();

  protected readonly people = signal<readonly Share[]>([]);
  protected readonly newId = new FormControl('', { nonNullable: true });
  protected readonly busy = signal(false);
  protected readonly saved = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly canChange = computed(() => String(this.auth.user()?.id) === String(this.set().owner.id) || this.auth.hasRole('admin'));

  ngOnInit(): void {
    this.people.set(this.set().sharedWith.map((p) => ({ id: p.id, name: p.name })));
  }

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
    const ids = this.people().map((p) => p.id);
    this.busy.set(true);
    this.error.set(null);
    this.saved.set(false);
    this.api.share(this.set().id, ids).subscribe({
      next: () => {
        this.busy.set(false);
        this.saved.set(true);
        this.changed.emit();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        const at = /^userIds\[(\d+)\]$/.exec(e.field ?? '');
        this.error.set(at ? `Account ${ids[Number(at[1])]}: ${e.message}` : e.message);
      },
    });
  }
}
