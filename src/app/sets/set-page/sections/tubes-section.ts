import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { TUBE_STATUSES, type SetDetail, type TubeRecord, type TubeStatus } from '@domain/set-format';
import type { TemplateDocument } from '@domain/template-format';
import { apiErrorOf } from '../../../core/errors/api-error';
import { TUBE_STATUS_LABELS } from '../../set-words';
import { SetsApi } from '../../sets-api';

interface SocketRow {
  readonly key: string;
  readonly designator: string;
  readonly tubeType: string;
  readonly stageName: string;
  readonly record: TubeRecord | null;
}

/** Tube records per socket: present, missing, wrong type, replaced; the type found and the tube-test result. */
@Component({
  selector: 'dm-tubes-section',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule],
  template: `
    @if (!doc()) {
      <p class="empty">Loading the template's sockets…</p>
    } @else if (rows().length === 0) {
      <p class="empty">The template has no sockets.</p>
    } @else {
      @if (error(); as text) {
        <p class="dm-form-message" role="alert">{{ text }}</p>
      }
      <div class="table-wrap">
        <table class="plain" aria-label="Tube records">
          <thead>
            <tr>
              <th scope="col">Socket</th>
              <th scope="col">Tube type</th>
              <th scope="col">Found</th>
              <th scope="col">Tube test</th>
              <th scope="col">Note</th>
              <th scope="col"><span class="cdk-visually-hidden">Edit</span></th>
            </tr>
          </thead>
          <tbody>
            @for (r of rows(); track r.key) {
              <tr>
                <th scope="row">{{ r.designator }}<div class="sub">{{ r.stageName }}</div></th>
                <td>{{ r.tubeType }}</td>
                <td>
                  @if (r.record; as rec) {
                    {{ labels[rec.status] }}{{ rec.foundType && rec.foundType !== r.tubeType ? ': ' + rec.foundType : '' }}
                    <div class="sub">{{ rec.recordedBy?.name ?? '' }} {{ rec.updatedAt | date: 'mediumDate' }}</div>
                  } @else {
                    <span class="sub">not recorded</span>
                  }
                </td>
                <td>{{ r.record?.testResult || '—' }}</td>
                <td>{{ r.record?.note || '' }}</td>
                <td>
                  <button mat-button type="button" class="dm-touch" (click)="edit(r)">Record<span class="cdk-visually-hidden"> {{ r.designator }}</span></button>
                </td>
              </tr>
              @if (editing() === r.key) {
                <tr>
                  <td colspan="6">
                    <form class="row-form" [formGroup]="form" (ngSubmit)="save(r)" [attr.aria-label]="'Tube record of ' + r.designator">
                      <mat-form-field>
                        <mat-label>Status</mat-label>
                        <mat-select formControlName="status">
                          @for (s of statuses; track s) {
                            <mat-option [value]="s">{{ labels[s] }}</mat-option>
                          }
                        </mat-select>
                      </mat-form-field>
                      <mat-form-field>
                        <mat-label>Type found</mat-label>
                        <input matInput formControlName="foundType" autocapitalize="characters" autocomplete="off" />
                      </mat-form-field>
                      <mat-form-field>
                        <mat-label>Tube-test result</mat-label>
                        <input matInput formControlName="testResult" autocomplete="off" />
                      </mat-form-field>
                      <mat-form-field>
                        <mat-label>Note</mat-label>
                        <input matInput formControlName="note" autocomplete="off" />
                      </mat-form-field>
                      <div class="inline">
                        <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">Save</button>
                        <button mat-button type="button" class="dm-touch" (click)="editing.set(null)">Cancel</button>
                      </div>
                    </form>
                  </td>
                </tr>
              }
            }
          </tbody>
        </table>
      </div>
    }
  `,
  styleUrl: './section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TubesSection {
  private readonly api = inject(SetsApi);
  private readonly fb = inject(NonNullableFormBuilder);
  readonly set = input.required<SetDetail>();
  readonly doc = input<TemplateDocument | null>(null);
  /** Emitted without a value: the set page reloads the set. */
  readonly changed = output<SetDetail | void>();

  protected readonly statuses = TUBE_STATUSES;
  protected readonly labels = TUBE_STATUS_LABELS;
  protected readonly editing = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly form = this.fb.group({ status: this.fb.control<TubeStatus>('present'), foundType: [''], testResult: [''], note: [''] });

  protected readonly rows = computed<SocketRow[]>(() => {
    const doc = this.doc();
    if (!doc) return [];
    const records = new Map(this.set().tubeRecords.map((r) => [r.socketKey, r]));
    return doc.stages.flatMap((st) =>
      st.sockets.map((so) => ({ key: so.key, designator: so.designator, tubeType: so.tubeType, stageName: st.name, record: records.get(so.key) ?? null })),
    );
  });

  protected edit(r: SocketRow): void {
    const rec = r.record;
    this.form.setValue({ status: rec?.status ?? 'present', foundType: rec?.foundType ?? r.tubeType, testResult: rec?.testResult ?? '', note: rec?.note ?? '' });
    this.error.set(null);
    this.editing.set(r.key);
  }

  protected save(r: SocketRow): void {
    if (this.busy()) return;
    const v = this.form.getRawValue();
    this.busy.set(true);
    this.api.saveTubeRecord(this.set().id, r.key, { status: v.status, foundType: v.foundType.trim(), testResult: v.testResult.trim(), note: v.note.trim() }).subscribe({
      next: () => {
        this.busy.set(false);
        this.editing.set(null);
        this.changed.emit();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }
}
