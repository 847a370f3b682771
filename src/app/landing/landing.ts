import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { Auth } from '../core/auth/auth';
import { SafetyCaution } from '../shared/safety-caution/safety-caution';

/** The public landing page at `/`. */
@Component({
  selector: 'dm-landing',
  imports: [RouterLink, MatButtonModule, MatIconModule, SafetyCaution],
  templateUrl: './landing.html',
  styleUrl: './landing.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Landing {
  protected readonly auth = inject(Auth);
}
