import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import { baseGeometry } from '@domain/base-geometry';
import { catchError, debounceTime, distinctUntilChanged, map, of, switchMap, tap } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { TemplatesApi, TubeType, TubeTypePage } from '../templates-api';

/** `/templates/tube-types`: the shared tube-type library. */
@Component({
  selector: 'dm-tube-type-list',
  imports: [ReactiveFormsModule, RouterLink, MatTableModule, MatPaginatorModule, MatButtonModule, MatIconModule, MatFormFieldModule, MatInputModule, MatProgressBarModule],
  templateUrl: './tube-type-list.html',
  styleUrl: './tube-types.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TubeTypeList {
  private readonly api = inject(TemplatesApi);
  private readonly router = inject(Router);
  private readonly auth = inject(Auth);

  protected readonly canAdd = computed(() => this.auth.hasRole('author', 'admin'));
  protected readonly columns = ['designation', 'base', 'heater', 'pins', 'createdBy'];
  protected readonly search = new FormControl('', { nonNullable: true });
  private readonly q = signal('');
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(50);
  private readonly reloads = signal(0);
  protected readonly loading = signal(true);
  protected readonly loadFailed = signal(false);
  protected readonly page = signal<TubeTypePage>({ items: [], total: 0, page: 1, pageSize: 50 });
  private readonly query = computed(() => ({ q: this.q(), page: this.pageIndex() + 1, pageSize: this.pageSize(), reload: this.reloads() }));

  constructor() {
    this.search.valueChanges.pipe(debounceTime(300), map((v) => v.trim()), distinctUntilChanged(), takeUntilDestroyed()).subscribe((q) => {
      this.pageIndex.set(0);
      this.q.set(q);
    });
    toObservable(this.query)
      .pipe(
        tap(() => this.loading.set(true)),
        switchMap(({ q, page, pageSize }) =>
          this.api.tubeTypes({ q, page, pageSize }).pipe(
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
  }

  protected baseLabel(t: TubeType): string {
    return baseGeometry(t.base)?.label ?? t.base;
  }

  protected changePage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  protected open(t: TubeType): void {
    void this.router.navigate(['/templates/tube-types', t.designation]);
  }
}
