import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';

export interface SubmitData {
  readonly title: string;
  /** Test points with no reading (labels). */
  readonly unread: readonly string[];
  /** A returned survey: requested test points not re-measured yet (labels). */
  readonly remeasureLeft: readonly string[];
  /** The number the new attempt will get. */
  readonly attemptNumber: number;
  /** Past the due date: the submission counts as late. */
  readonly late: boolean;
}

/**
 * Submit a class survey: names what is still unread (or not re-measured) before the attempt is
 * frozen. Closes with true to submit; the page sends it (the dialog never queues anything).
 */
@Component({
  selector: 'dm-submit-dialog',
  imports: [MatDialogModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>Submit “{{ data.title }}”?</h2>
    <mat-dialog-content>
      <p>Attempt {{ data.attemptNumber }} is frozen as it stands and goes to your instructor. The survey is read-only until it is reviewed.</p>
      @if (data.late) {
        <p class="late" data-test="submit-late"><strong>Past the due date:</strong> this submission counts as late.</p>
      }
      @if (data.remeasureLeft.length) {
        <p data-test="submit-remeasure-left">
          Not re-measured yet ({{ data.remeasureLeft.length }}): {{ data.remeasureLeft.join(', ') }}.
        </p>
      }
      @if (data.unread.length) {
        <p data-test="submit-unread">
          <strong>{{ data.unread.length }} {{ data.unread.length === 1 ? 'test point is' : 'test points are' }} unread:</strong>
          {{ data.unread.join(', ') }}.
        </p>
      } @else {
        <p data-test="submit-all-read">Every test point has a reading.</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      @if (data.unread.length || data.remeasureLeft.length) {
        <!-- Something is left: Enter keeps the survey open; submitting anyway is a deliberate choice. -->
        <button mat-button type="button" class="dm-touch" [mat-dialog-close]="false" cdkFocusInitial>Not yet</button>
        <button mat-flat-button type="button" class="dm-touch" [mat-dialog-close]="true" data-test="submit-confirm">Submit anyway</button>
      } @else {
        <button mat-button type="button" class="dm-touch" [mat-dialog-close]="false">Not yet</button>
        <button mat-flat-button type="button" class="dm-touch" [mat-dialog-close]="true" cdkFocusInitial data-test="submit-confirm">Submit</button>
      }
    </mat-dialog-actions>
  `,
  styles: ['.late { color: var(--mat-sys-error); }'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SubmitDialog {
  protected readonly data = inject<SubmitData>(MAT_DIALOG_DATA);
}
