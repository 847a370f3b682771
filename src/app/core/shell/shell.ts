import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, ElementRef, computed, inject, viewChild } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatMenuModule } from '@angular/material/menu';
import { MatToolbarModule } from '@angular/material/toolbar';
import { NavigationEnd, Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { filter, map } from 'rxjs';
import { NotificationBell } from '../../notifications/notification-bell/notification-bell';
import { Auth } from '../auth/auth';
import { navItemsFor } from './nav';

/** Below this width the navigation folds into a menu (phones; a tablet keeps the toolbar). */
export const NARROW_QUERY = '(max-width: 599.98px)';

@Component({
  selector: 'dm-shell',
  imports: [RouterOutlet, RouterLink, RouterLinkActive, MatToolbarModule, MatButtonModule, MatIconModule, MatMenuModule, NotificationBell],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  protected readonly auth = inject(Auth);
  private readonly router = inject(Router);
  protected readonly navItems = computed(() => navItemsFor(this.auth.signedIn(), this.auth.roles()));
  protected readonly narrow = toSignal(inject(BreakpointObserver).observe(NARROW_QUERY).pipe(map((s) => s.matches)), { initialValue: false });
  private readonly url = toSignal(
    this.router.events.pipe(
      filter((e): e is NavigationEnd => e instanceof NavigationEnd),
      map((e) => e.urlAfterRedirects),
    ),
    { initialValue: this.router.url },
  );
  /** The toolbar's own "Sign in" is pointless on the sign-in page itself. */
  protected readonly onSignInPage = computed(() => this.url().startsWith('/sign-in'));
  private readonly main = viewChild.required<ElementRef<HTMLElement>>('main');

  protected skipToMain(): void {
    this.main().nativeElement.focus();
  }

  protected signOut(): void {
    this.auth.signOut();
  }
}
