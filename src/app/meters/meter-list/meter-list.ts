import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { formatOhms } from '@domain/notation';
import type { MeterProfileRecord } from '@domain/set-format';
import { apiErrorOf } from '../../core/errors/api-error';
import { rangesText } from '../meter-words';
import { MetersApi } from '../meters-api';

/** `/meters`: the caller's meter profiles — digital or analogue, their check date and check resistor; archive. */
@Component({
  selector: 'dm-meter-list',
  imports: [RouterLink, MatButtonModule, MatCheckboxModule, MatIconModule, MatProgressBarModule],
  templateUrl: './meter-list.html',
  styleUrl: './meter-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MeterList {
  private readonly api = inject(MetersApi);

  protected readonly profiles = signal<readonly MeterProfileRecord[]>([]);
  protected readonly showArchived = signal(false);
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly ranges = rangesText;

  constructor() {
    this.load();
  }

  protected toggleArchived(on: boolean): void {
    this.showArchived.set(on);
    this.load();
  }

  protected ohms(x: number): string {
    return formatOhms(x);
  }

  private load(): void {
    this.loading.set(true);
    this.api.list(this.showArchived()).subscribe({
      next: (list) => {
        this.loading.set(false);
        this.error.set(null);
        this.profiles.set(list);
      },
      error: (err: unknown) => {
        this.loading.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }

  protected archive(p: MeterProfileRecord): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.api.archive(p.id).subscribe({
      next: () => {
        this.busy.set(false);
        this.load();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }
}
