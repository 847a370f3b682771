import { ChangeDetectionStrategy, Component, signal } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import type { MeterChoice } from '../meter-editor/meter-form';
import { NetworkCheck } from '../network-check/network-check';
import { ReadingCheck } from '../reading-check/reading-check';

/**
 * The public quick check (`/calc`, no sign-in): one reading against its band, and a small
 * network in circuit. Both panels share the meter profile chosen in the first.
 */
@Component({
  selector: 'dm-quick-check',
  imports: [MatIconModule, RouterLink, ReadingCheck, NetworkCheck],
  templateUrl: './quick-check.html',
  styleUrl: './quick-check.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class QuickCheck {
  protected readonly meter = signal<MeterChoice | null>(null);
}
