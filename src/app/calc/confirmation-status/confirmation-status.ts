import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { Confirmation } from '../confirmation';

/** "Confirmed by the server", or what the server said otherwise; glyph and words, polite live region. */
@Component({
  selector: 'dm-confirmation-status',
  imports: [MatIconModule],
  template: `
    <p class="status" role="status" [attr.data-state]="confirmation().state">
      @switch (confirmation().state) {
        @case ('pending') {
          <mat-icon aria-hidden="true">hourglass_empty</mat-icon><span>Computed on this page; asking the server to confirm…</span>
        }
        @case ('confirmed') {
          <mat-icon aria-hidden="true">verified</mat-icon><span>Confirmed by the server.</span>
        }
        @case ('differs') {
          <mat-icon aria-hidden="true">report</mat-icon>
          <span>The server’s answer differs from this page’s:
            @for (d of differences(); track $index) { {{ d }}{{ $last ? '.' : ';' }} }
          </span>
        }
        @case ('refused') {
          <mat-icon aria-hidden="true">block</mat-icon><span>The server refused the check: {{ message() }}</span>
        }
        @case ('unavailable') {
          <mat-icon aria-hidden="true">cloud_off</mat-icon><span>{{ message() }}</span>
        }
        @default {
          <span></span>
        }
      }
    </p>
  `,
  styles: `
    .status { display: flex; gap: 8px; align-items: flex-start; margin: 8px 0 0; font: var(--mat-sys-body-medium); color: var(--mat-sys-on-surface-variant); min-height: 24px; }
    .status[data-state='differs'], .status[data-state='refused'] { color: var(--mat-sys-error); }
    mat-icon { flex: none; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmationStatus {
  readonly confirmation = input.required<Confirmation>();
  protected differences(): readonly string[] {
    const c = this.confirmation();
    return c.state === 'differs' ? c.differences : [];
  }
  protected message(): string {
    const c = this.confirmation();
    return c.state === 'refused' || c.state === 'unavailable' ? c.message : '';
  }
}
