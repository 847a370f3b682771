import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { StudentStatus } from '@domain/class-format';
import { STUDENT_STATUS_ICONS, STUDENT_STATUS_LABELS } from '../class-words';

/** A student's status on an assignment as glyph + word, and "late" beside it when the submission came after the due date. */
@Component({
  selector: 'dm-status-chip',
  imports: [MatIconModule],
  template: `
    <span class="chip" [attr.data-status]="status()">
      <mat-icon aria-hidden="true">{{ icon() }}</mat-icon>{{ label() }}
    </span>
    @if (late()) {
      <span class="chip late" data-status="late"><mat-icon aria-hidden="true">schedule</mat-icon>late</span>
    }
  `,
  styles: `
    :host {
      display: inline-flex;
      flex-wrap: wrap;
      gap: 4px;
    }
    .chip {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      padding: 2px 10px 2px 6px;
      border-radius: 16px;
      border: 1px solid var(--mat-sys-outline);
      font: var(--mat-sys-label-large);
      white-space: nowrap;
    }
    mat-icon {
      width: 18px;
      height: 18px;
      font-size: 18px;
    }
    [data-status='submitted'] {
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
    }
    [data-status='accepted'] {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
    }
    [data-status='returned'] {
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    .late {
      border-color: var(--mat-sys-error);
      color: var(--mat-sys-error);
      font-weight: 600;
    }
    @media print {
      .chip {
        background: none;
        color: inherit;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StatusChip {
  readonly status = input.required<StudentStatus>();
  readonly late = input(false);
  protected readonly label = computed(() => STUDENT_STATUS_LABELS[this.status()] ?? this.status());
  protected readonly icon = computed(() => STUDENT_STATUS_ICONS[this.status()] ?? 'circle');
}
