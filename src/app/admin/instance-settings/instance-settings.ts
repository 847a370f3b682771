import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSlideToggleChange, MatSlideToggleModule } from '@angular/material/slide-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { AdminApi, AdminSettings } from '../admin-api';

/** `/admin/settings`: the instance's settings (today: open sign-up). */
@Component({
  selector: 'dm-instance-settings',
  imports: [MatSlideToggleModule, MatProgressBarModule],
  templateUrl: './instance-settings.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class InstanceSettings {
  private readonly api = inject(AdminApi);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly settings = signal<AdminSettings | null>(null);
  protected readonly saving = signal(false);
  protected readonly loadFailed = signal(false);

  constructor() {
    this.api.settings().subscribe({
      next: (s) => this.settings.set(s),
      error: () => this.loadFailed.set(true),
    });
  }

  protected setOpenSignUp(change: MatSlideToggleChange): void {
    const previous = this.settings();
    if (!previous) return;
    this.saving.set(true);
    this.api.saveSettings({ ...previous, openSignUp: change.checked }).subscribe({
      next: (saved) => {
        this.settings.set(saved);
        this.saving.set(false);
        this.snackBar.open(saved.openSignUp ? 'Sign-up is open.' : 'Sign-up is closed.', 'OK', { duration: 4000 });
      },
      error: () => {
        change.source.checked = previous.openSignUp;
        this.settings.set({ ...previous });
        this.saving.set(false);
      },
    });
  }
}
