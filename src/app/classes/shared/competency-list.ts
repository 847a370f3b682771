import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, input, output, signal } from '@angular/core';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { CompetencyKey, CompetencyRecord, CompetencySignoff } from '@domain/class-format';

export interface SignOffRequest {
  readonly key: CompetencyKey;
  readonly note: string;
}
export interface WithdrawRequest {
  readonly signoff: CompetencySignoff;
  readonly note: string;
}

/**
 * A student's competency record: each competency with its current sign-off (who, when, note),
 * and the history. With `editable`, a sign-off per open competency and a withdrawal (a note is
 * required) where `mayWithdraw` says so.
 */
@Component({
  selector: 'dm-competency-list',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule],
  template: `
    <ul class="competencies" [attr.aria-label]="'Competencies of ' + record().student.name">
      @for (item of record().items; track item.key) {
        <li class="competency" [attr.data-key]="item.key" [class.signed]="item.current">
          <div class="title">
            <mat-icon aria-hidden="true">{{ item.current ? 'verified' : 'pending' }}</mat-icon>
            <span>{{ item.title }}</span>
          </div>
          @if (item.current; as c) {
            <p class="sub" data-test="signed">
              Signed off {{ c.createdAt | date: 'mediumDate' }}{{ c.signedBy ? ' by ' + c.signedBy.name : '' }}{{ c.note ? ': ' + c.note : '' }}
            </p>
          } @else {
            <p class="sub" data-test="open">Not signed off.</p>
          }
          @if (editable()) {
            @if (open() === item.key) {
              <form class="inline" (submit)="$event.preventDefault(); confirm(item.key, item.current)">
                <mat-form-field subscriptSizing="dynamic" class="note">
                  <mat-label>{{ item.current ? 'Why it is withdrawn' : 'Note (what you saw)' }}</mat-label>
                  <input matInput [formControl]="note" autocomplete="off" data-note />
                </mat-form-field>
                <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">{{ item.current ? 'Withdraw' : 'Sign off' }}</button>
                <button mat-button type="button" class="dm-touch" (click)="open.set(null)">Cancel</button>
              </form>
              @if (noteMissing()) {
                <p class="dm-form-message" role="alert">Say why the sign-off is withdrawn.</p>
              }
            } @else if (!item.current) {
              <button mat-stroked-button type="button" class="dm-touch" (click)="start(item.key)">
                Sign off<span class="cdk-visually-hidden"> {{ item.title }}</span>
              </button>
            } @else if (mayWithdraw()(item.current)) {
              <button mat-button type="button" class="dm-touch" (click)="start(item.key)">
                Withdraw<span class="cdk-visually-hidden"> {{ item.title }}</span>
              </button>
            }
          }
        </li>
      }
    </ul>
    @if (withdrawn().length) {
      <h3>Withdrawn sign-offs</h3>
      <ul class="history">
        @for (h of withdrawn(); track h.id) {
          <li>
            {{ titleOf(h.competencyKey) }}: signed {{ h.createdAt | date: 'mediumDate' }}{{ h.signedBy ? ' by ' + h.signedBy.name : '' }}, withdrawn
            {{ h.withdrawnAt | date: 'mediumDate' }}{{ h.withdrawnBy ? ' by ' + h.withdrawnBy.name : '' }}{{ h.withdrawnNote ? ': ' + h.withdrawnNote : '' }}
          </li>
        }
      </ul>
    }
  `,
  styles: `
    .competencies {
      list-style: none;
      padding: 0;
      margin: 0;
    }
    .competency {
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      padding: 12px 0;
    }
    .title {
      display: flex;
      align-items: center;
      gap: 8px;
      font: var(--mat-sys-title-small);
    }
    .signed .title mat-icon {
      color: var(--mat-sys-primary);
    }
    .sub {
      margin: 4px 0 8px 32px;
      color: var(--mat-sys-on-surface-variant);
    }
    .inline {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 16px;
      margin-left: 32px;
    }
    .note {
      flex: 1 1 260px;
    }
    button {
      margin-left: 32px;
    }
    .inline button {
      margin-left: 0;
    }
    .history {
      color: var(--mat-sys-on-surface-variant);
    }
    @media print {
      button,
      form {
        display: none !important;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CompetencyList {
  readonly record = input.required<CompetencyRecord>();
  readonly editable = input(false);
  readonly busy = input(false);
  /** Whether the caller may withdraw this sign-off (the signer or an admin). */
  readonly mayWithdraw = input<(s: CompetencySignoff) => boolean>(() => false);
  readonly signOff = output<SignOffRequest>();
  readonly withdraw = output<WithdrawRequest>();

  protected readonly open = signal<CompetencyKey | null>(null);
  protected readonly noteMissing = signal(false);
  protected readonly note = new FormControl('', { nonNullable: true });

  protected withdrawn(): CompetencySignoff[] {
    return this.record().history.filter((h) => h.withdrawnAt !== null);
  }

  protected titleOf(key: CompetencyKey): string {
    return this.record().items.find((i) => i.key === key)?.title ?? key;
  }

  protected start(key: CompetencyKey): void {
    this.note.setValue('');
    this.noteMissing.set(false);
    this.open.set(key);
  }

  protected confirm(key: CompetencyKey, current: CompetencySignoff | null): void {
    const note = this.note.value.trim();
    if (current) {
      if (!note) {
        this.noteMissing.set(true);
        return;
      }
      this.withdraw.emit({ signoff: current, note });
    } else {
      this.signOff.emit({ key, note });
    }
    this.open.set(null);
  }
}
