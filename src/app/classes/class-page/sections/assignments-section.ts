import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, input, output, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import type { AssignmentDetail, ClassDetail } from '@domain/class-format';
import { AssignmentForm } from './assignment-form';

/** The class's assignments (due date, training set, submissions waiting) and the form for a new one. */
@Component({
  selector: 'dm-assignments-section',
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule, AssignmentForm],
  template: `
    @if (created(); as a) {
      <p class="dm-form-message dm-info" role="status">Assignment "{{ a.title }}" created. <a [routerLink]="['/assignments', a.id]">Open it</a>.</p>
    }
    @if (adding()) {
      <dm-assignment-form [cls]="cls()" (created)="done($event)" (cancelled)="adding.set(false)" />
    } @else {
      <button mat-flat-button type="button" class="dm-touch" (click)="adding.set(true)">
        <mat-icon aria-hidden="true">add_task</mat-icon>
        New assignment
      </button>
    }
    @if (cls().assignments.length === 0) {
      <p class="empty">No assignments yet.</p>
    } @else {
      <div class="table-wrap">
        <table class="plain" aria-label="Assignments">
          <thead>
            <tr>
              <th scope="col">Assignment</th>
              <th scope="col">Training set</th>
              <th scope="col">Due</th>
              <th scope="col">Options</th>
              <th scope="col" class="num">Waiting for review</th>
            </tr>
          </thead>
          <tbody>
            @for (a of cls().assignments; track a.id) {
              <tr>
                <td><a [routerLink]="['/assignments', a.id]">{{ a.title }}</a></td>
                <td>{{ a.setLabel }}<div class="sub">{{ a.maker }} {{ a.model }}, template version {{ a.versionNumber }}</div></td>
                <td>{{ a.dueAt | date: 'medium' }}</td>
                <td class="sub">{{ a.predictFirst ? 'predict first' : 'no prediction' }} · {{ a.showVerdicts ? 'verdicts while measuring' : 'verdicts after submission' }}</td>
                <td class="num">
                  @if (a.awaitingReview) {
                    <strong>{{ a.awaitingReview }}</strong>
                  } @else {
                    0
                  }
                </td>
              </tr>
            }
          </tbody>
        </table>
      </div>
    }
  `,
  styleUrl: './section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AssignmentsSection {
  readonly cls = input.required<ClassDetail>();
  readonly changed = output<void>();
  protected readonly adding = signal(false);
  protected readonly created = signal<AssignmentDetail | null>(null);

  protected done(a: AssignmentDetail): void {
    this.adding.set(false);
    this.created.set(a);
    this.changed.emit();
  }
}
