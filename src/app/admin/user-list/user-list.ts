import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { BreakpointObserver } from '@angular/cdk/layout';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { catchError, debounceTime, distinctUntilChanged, map, of, switchMap, tap } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { NARROW_QUERY } from '../../core/shell/shell';
import { ROLE_LABELS, Role } from '../../core/auth/roles';
import { AdminApi, AdminUser, InvitationSummary, UserPage } from '../admin-api';
import { EditUserDialog } from '../edit-user-dialog/edit-user-dialog';
import { NewUserDialog, NewUserMode, NewUserResult } from '../new-user-dialog/new-user-dialog';

/** `/admin/users`: search, page, invite or create, edit roles, deactivate and reactivate. */
@Component({
  selector: 'dm-user-list',
  imports: [
    DatePipe,
    ReactiveFormsModule,
    MatTableModule,
    MatPaginatorModule,
    MatButtonModule,
    MatIconModule,
    MatFormFieldModule,
    MatInputModule,
    MatProgressBarModule,
  ],
  templateUrl: './user-list.html',
  styleUrl: './user-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UserList {
  private readonly api = inject(AdminApi);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly auth = inject(Auth);

  /** On a phone, e-mail and roles move under the name so nothing hides in a side scroll. */
  protected readonly narrow = toSignal(inject(BreakpointObserver).observe(NARROW_QUERY).pipe(map((s) => s.matches)), { initialValue: false });
  protected readonly columns = computed(() => (this.narrow() ? ['name', 'status', 'actions'] : ['name', 'email', 'roles', 'status', 'actions']));
  protected readonly search = new FormControl('', { nonNullable: true });
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  private readonly q = signal('');
  private readonly reloads = signal(0);

  protected readonly loading = signal(true);
  protected readonly loadFailed = signal(false);
  protected readonly page = signal<UserPage>({ items: [], total: 0 });
  protected readonly invitations = signal<readonly InvitationSummary[]>([]);
  protected readonly busyIds = signal<ReadonlySet<AdminUser['id']>>(new Set());
  protected readonly myId = computed(() => this.auth.user()?.id);

  private readonly query = computed(() => ({
    q: this.q(),
    page: this.pageIndex() + 1,
    pageSize: this.pageSize(),
    reload: this.reloads(),
  }));

  constructor() {
    this.search.valueChanges
      .pipe(debounceTime(300), map((v) => v.trim()), distinctUntilChanged(), takeUntilDestroyed())
      .subscribe((q) => {
        this.pageIndex.set(0);
        this.q.set(q);
      });
    toObservable(this.query)
      .pipe(
        tap(() => this.loading.set(true)),
        switchMap(({ q, page, pageSize }) =>
          this.api.users({ q, page, pageSize }).pipe(
            map((result) => ({ ok: true as const, result })),
            catchError(() => of({ ok: false as const })),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((answer) => {
        this.loading.set(false);
        this.loadFailed.set(!answer.ok);
        if (answer.ok) this.page.set(answer.result);
      });
    this.loadInvitations();
  }

  protected rolesText(roles: readonly Role[]): string {
    return roles.map((r) => ROLE_LABELS[r]).join(', ');
  }

  protected changePage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  protected openNewUser(mode: NewUserMode): void {
    this.dialog
      .open<NewUserDialog, NewUserMode, NewUserResult>(NewUserDialog, { data: mode, width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((result) => {
        if (!result) return;
        if (result.mode === 'invite') {
          this.snackBar.open(`Invitation sent to ${result.invitation.email}.`, 'OK', { duration: 5000 });
          this.loadInvitations();
        } else {
          this.snackBar.open(`Account created for ${result.user.email}.`, 'OK', { duration: 5000 });
          this.reload();
        }
      });
  }

  protected editUser(user: AdminUser): void {
    this.dialog
      .open<EditUserDialog, AdminUser, AdminUser>(EditUserDialog, { data: user, width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((updated) => {
        if (updated) this.replace(updated);
      });
  }

  /** Deactivate (or reactivate) an account; the table shows the server's answer. */
  protected setActive(user: AdminUser, active: boolean): void {
    this.busyIds.update((ids) => new Set([...ids, user.id]));
    this.api.updateUser(user.id, { active }).subscribe({
      next: (updated) => {
        this.replace(updated);
        this.done(user.id);
        this.snackBar.open(`${updated.name || updated.email} is ${updated.active ? 'active again' : 'deactivated'}.`, 'OK', {
          duration: 5000,
        });
      },
      error: () => this.done(user.id),
    });
  }

  private done(id: AdminUser['id']): void {
    this.busyIds.update((ids) => new Set([...ids].filter((x) => x !== id)));
  }

  private replace(updated: AdminUser): void {
    this.page.update((p) => ({ ...p, items: p.items.map((u) => (u.id === updated.id ? updated : u)) }));
  }

  private loadInvitations(): void {
    this.api.invitations().subscribe({
      next: (answer) => this.invitations.set(answer.items),
      error: () => this.invitations.set([]),
    });
  }
}
