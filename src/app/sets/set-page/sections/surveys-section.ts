import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import type { SetDetail } from '@domain/set-format';
import { PURPOSE_LABELS, SURVEY_STATE_LABELS, countsText } from '../../set-words';

/** The set's surveys over time, newest first, with verdict counts in words; "Start survey". */
@Component({
  selector: 'dm-surveys-section',
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule],
  template: `
    <div class="inline">
      <a mat-flat-button class="dm-touch" [routerLink]="['/sets', set().id, 'surveys', 'new']">
        <mat-icon aria-hidden="true">playlist_add</mat-icon>
        Start survey
      </a>
    </div>
    @if (surveys().length) {
      <div class="table-wrap">
        <table class="plain" aria-label="Surveys of this set">
          <thead>
            <tr>
              <th scope="col">Started</th>
              <th scope="col">Purpose</th>
              <th scope="col">State</th>
              <th scope="col">Template version</th>
              <th scope="col">Meter</th>
              <th scope="col">Verdicts</th>
            </tr>
          </thead>
          <tbody>
            @for (sv of surveys(); track sv.id) {
              <tr>
                <td><a [routerLink]="['/surveys', sv.id]">{{ sv.startedAt | date: 'mediumDate' }}</a></td>
                <td>{{ purposes[sv.purpose] }}</td>
                <td>
                  {{ states[sv.state] }}
                  @if (sv.completedAt) {
                    <div class="sub">{{ sv.completedAt | date: 'mediumDate' }}</div>
                  }
                </td>
                <td>{{ sv.versionNumber }}</td>
                <td>{{ sv.meterName ?? 'no meter profile' }}</td>
                <td>{{ counts(sv.counts) }}</td>
              </tr>
            }
          </tbody>
        </table>
      </div>
    } @else {
      <p class="empty">No survey yet. Start the intake survey when the set is on the bench, unplugged.</p>
    }
  `,
  styleUrl: './section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SurveysSection {
  readonly set = input.required<SetDetail>();
  protected readonly purposes = PURPOSE_LABELS;
  protected readonly states = SURVEY_STATE_LABELS;
  protected readonly counts = countsText;
  protected readonly surveys = computed(() => [...this.set().surveys].sort((a, b) => b.startedAt.localeCompare(a.startedAt)));
}
