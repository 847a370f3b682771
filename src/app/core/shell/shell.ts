import { ChangeDetectionStrategy, Component, ElementRef, computed, inject, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatToolbarModule } from '@angular/material/toolbar';
import { RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { Auth } from '../auth/auth';
import { navItemsFor } from './nav';

@Component({
  selector: 'dm-shell',
  imports: [RouterOutlet, RouterLink, RouterLinkActive, MatToolbarModule, MatButtonModule, MatIconModule],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  protected readonly auth = inject(Auth);
  protected readonly navItems = computed(() => navItemsFor(this.auth.signedIn(), this.auth.roles()));
  private readonly main = viewChild.required<ElementRef<HTMLElement>>('main');

  protected skipToMain(): void {
    this.main().nativeElement.focus();
  }

  protected signOut(): void {
    this.auth.signOut();
  }
}
