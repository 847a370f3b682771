import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { RouterLink } from '@angular/router';
import { Auth } from '../core/auth/auth';
import { sectionsFor } from './role-sections';

/** The signed-in user's home: one section per role held. */
@Component({
  selector: 'dm-home',
  imports: [RouterLink, MatCardModule, MatButtonModule],
  templateUrl: './home.html',
  styleUrl: './home.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Home {
  protected readonly auth = inject(Auth);
  protected readonly sections = computed(() => sectionsFor(this.auth.roles()));
}
