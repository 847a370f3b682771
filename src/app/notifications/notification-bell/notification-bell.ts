import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, signal, untracked } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatBadgeModule } from '@angular/material/badge';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatMenuModule } from '@angular/material/menu';
import { NavigationEnd, Router } from '@angular/router';
import type { NotificationKind, NotificationRecord } from '@domain/class-format';
import { filter } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { NotificationsApi } from '../notifications-api';

export const NOTIFICATION_ICONS: Readonly<Record<NotificationKind, string>> = {
  'class-invitation': 'school',
  submission: 'outbox',
  'review-done': 'rate_review',
  'due-soon': 'alarm',
};

/** Reload on navigation at most this often (milliseconds); opening the menu always reloads. */
export const RELOAD_AFTER_MS = 60_000;

/** An in-app link of ours (a path), never another site. */
export function internalLink(link: string): string | null {
  if (link.startsWith('/') && !link.startsWith('//') && !link.startsWith('/\\')) return link;
  try {
    const url = new URL(link);
    if (typeof location !== 'undefined' && url.origin === location.origin) return url.pathname + url.search + url.hash;
  } catch {
    return null;
  }
  return null;
}

/** The toolbar bell: unread count on a badge, the newest notifications in a menu; opening one marks it read. */
@Component({
  selector: 'dm-notification-bell',
  imports: [DatePipe, MatBadgeModule, MatButtonModule, MatIconModule, MatMenuModule],
  template: `
    <button
      mat-icon-button
      type="button"
      class="bell"
      [matMenuTriggerFor]="menu"
      (menuOpened)="load()"
      [attr.aria-label]="label()"
      [matBadge]="unread() > 0 ? (unread() > 99 ? '99+' : unread()) : null"
      [matBadgeHidden]="unread() === 0"
      matBadgeColor="warn"
      matBadgeSize="medium"
      aria-hidden="false"
    >
      <mat-icon aria-hidden="true">{{ unread() > 0 ? 'notifications_unread' : 'notifications' }}</mat-icon>
    </button>
    <mat-menu #menu="matMenu" class="dm-notifications" xPosition="before">
      <div class="menu-head" (click)="$event.stopPropagation()" (keydown)="$event.stopPropagation()">
        <span>Notifications</span>
        @if (unread() > 0) {
          <button mat-button type="button" (click)="markAllRead()">Mark all read</button>
        }
      </div>
      @for (n of items(); track n.id) {
        <button mat-menu-item type="button" class="item" [class.unread]="n.readAt === null" (click)="open(n)" [attr.data-unread]="n.readAt === null">
          <mat-icon aria-hidden="true">{{ icons[n.kind] }}</mat-icon>
          <span class="text">
            <span class="title">{{ n.readAt === null ? 'New: ' : '' }}{{ n.title }}</span>
            <span class="body">{{ n.body }}</span>
            <span class="when">{{ n.createdAt | date: 'short' }}</span>
          </span>
        </button>
      } @empty {
        <p class="empty">Nothing yet.</p>
      }
    </mat-menu>
  `,
  styles: `
    .bell {
      width: 48px;
      height: 48px;
    }
    .menu-head {
      display: flex;
      align-items: center;
      justify-content: space-between;
      gap: 16px;
      padding: 4px 8px 4px 16px;
      font: var(--mat-sys-title-small);
    }
    .item {
      height: auto;
      min-height: 56px;
      padding-block: 8px;
    }
    .text {
      display: flex;
      flex-direction: column;
      white-space: normal;
      max-width: 320px;
    }
    .title {
      font: var(--mat-sys-title-small);
    }
    .unread .title {
      font-weight: 700;
    }
    .body,
    .when {
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .empty {
      padding: 8px 16px;
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotificationBell {
  private readonly api = inject(NotificationsApi);
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);

  protected readonly icons = NOTIFICATION_ICONS;
  protected readonly items = signal<readonly NotificationRecord[]>([]);
  protected readonly unread = signal(0);
  protected readonly label = computed(() => (this.unread() === 0 ? 'Notifications' : `Notifications, ${this.unread()} unread`));
  private loadedAt = 0;

  constructor() {
    effect(() => {
      const user = this.auth.user();
      untracked(() => {
        if (user) this.load();
        else this.apply([], 0);
      });
    });
    this.router.events
      .pipe(
        filter((e) => e instanceof NavigationEnd),
        takeUntilDestroyed(),
      )
      .subscribe(() => {
        if (this.auth.signedIn() && Date.now() - this.loadedAt > RELOAD_AFTER_MS) this.load();
      });
  }

  load(): void {
    this.loadedAt = Date.now();
    this.api.list().subscribe({
      next: (list) => this.apply(list.items ?? [], list.unread ?? 0),
      error: () => undefined,
    });
  }

  private apply(items: readonly NotificationRecord[], unread: number): void {
    this.items.set(items);
    this.unread.set(unread);
  }

  protected open(n: NotificationRecord): void {
    if (n.readAt === null) {
      this.apply(
        this.items().map((x) => (x.id === n.id ? { ...x, readAt: new Date().toISOString() } : x)),
        Math.max(0, this.unread() - 1),
      );
      this.api.markRead(n.id).subscribe({ error: () => undefined });
    }
    const link = internalLink(n.link);
    if (link) void this.router.navigateByUrl(link);
  }

  protected markAllRead(): void {
    const now = new Date().toISOString();
    this.apply(this.items().map((x) => (x.readAt === null ? { ...x, readAt: now } : x)), 0);
    this.api.markAllRead().subscribe({ error: () => undefined });
  }
}
