import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/**
 * The bench safety caution (DESIGN.md §5). It never calls a set safe: Driftmark records what
 * was measured and done, it certifies nothing.
 */
@Component({
  selector: 'dm-safety-caution',
  imports: [MatIconModule],
  templateUrl: './safety-caution.html',
  styleUrl: './safety-caution.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SafetyCaution {}
