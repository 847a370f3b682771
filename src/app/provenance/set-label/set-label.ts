import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { SetDetail } from '@domain/set-format';
import { catchError, forkJoin, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { ProvenanceLabel, SetsApi } from '../../sets/sets-api';
import { qrDataUrl } from './qr';

/** The message shown when the instance has no PUBLIC_BASE_URL (the API's 409 `public-base-url-missing`). */
export const NO_BASE_URL_HELP =
  'An admin sets PUBLIC_BASE_URL (the address people outside reach this Driftmark at) and restarts the server; then a label can be made.';

/**
 * `/sets/:id/label`: the printable provenance label. Its QR code opens a read-only public page
 * (an unguessable token under PUBLIC_BASE_URL) of what was measured and replaced, without the
 * owner's identity. A label can be revoked: the link then answers "not found".
 */
@Component({
  selector: 'dm-set-label',
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './set-label.html',
  styleUrl: './set-label.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetLabel {
  private readonly api = inject(SetsApi);

  /** Route parameter. */
  readonly id = input.required<string>();
  protected readonly setId = computed(() => Number(this.id()));

  protected readonly set = signal<SetDetail | null>(null);
  protected readonly labels = signal<readonly ProvenanceLabel[]>([]);
  /** False: the instance has no PUBLIC_BASE_URL, so no label can be made. */
  protected readonly baseUrlSet = signal(true);
  protected readonly loadError = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly error = signal<{ message: string; baseUrlMissing: boolean } | null>(null);
  protected readonly help = NO_BASE_URL_HELP;
  /** The label in use: the newest one not revoked. */
  protected readonly active = computed(() => [...this.labels()].filter((l) => !l.revokedAt && l.url !== null).sort((a, b) => b.id - a.id)[0] ?? null);
  protected readonly revoked = computed(() => this.labels().filter((l) => l.revokedAt));
  protected readonly qr = signal<string | null>(null);

  constructor() {
    toObservable(this.setId)
      .pipe(
        switchMap((id) =>
          forkJoin({ set: this.api.get(id), labels: this.api.labels(id) }).pipe(
            map((value) => ({ ok: true as const, value })),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              return of({ ok: false as const, message: e.status === 404 ? 'No such set, or it is not shared with you.' : e.message });
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((a) => {
        if (!a.ok) {
          this.loadError.set(a.message);
          return;
        }
        this.set.set(a.value.set);
        this.labels.set(a.value.labels);
        // A label that is not revoked but has no link: the instance lost its PUBLIC_BASE_URL.
        this.baseUrlSet.set(!a.value.labels.some((l) => !l.revokedAt && l.url === null));
      });

    effect(() => {
      const label = this.active();
      if (!label) {
        this.qr.set(null);
        return;
      }
      qrDataUrl(label.url!).then(
        (url) => this.qr.set(url),
        () => this.qr.set(null),
      );
    });
  }

  protected create(): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.error.set(null);
    this.api.createLabel(this.setId()).subscribe({
      next: (label) => {
        this.busy.set(false);
        this.labels.update((list) => [...list, label]);
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        const missing = e.status === 409 && e.code === 'public-base-url-missing';
        if (missing) this.baseUrlSet.set(false);
        this.error.set({ message: e.message, baseUrlMissing: missing });
      },
    });
  }

  protected revoke(label: ProvenanceLabel): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.error.set(null);
    this.api.revokeLabel(this.setId(), label.id).subscribe({
      next: (revoked) => {
        this.busy.set(false);
        this.labels.update((list) => list.map((l) => (l.id === label.id ? revoked : l)));
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set({ message: apiErrorOf(err).message, baseUrlMissing: false });
      },
    });
  }

  protected print(): void {
    window.print();
  }
}
