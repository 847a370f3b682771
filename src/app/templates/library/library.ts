import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal, viewChild } from '@angular/core';
import { BreakpointObserver } from '@angular/cdk/layout';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSort, MatSortModule, Sort, SortDirection } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import { CHASSIS_KINDS, type ChassisKind } from '@domain/template-format';
import { catchError, debounceTime, map, of, switchMap, tap } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { NARROW_QUERY } from '../../core/shell/shell';
import { CHASSIS_KIND_LABELS, VISIBILITY_ICONS, VISIBILITY_LABELS } from '../template-words';
import { LibraryPage, LibrarySort, TemplateSummary, TemplateView, TemplateVisibility, TemplatesApi } from '../templates-api';
import { ImportDialog } from './import-dialog';
import { NewTemplateDialog } from './new-template-dialog';

/** The one order the API gives each sort key (it takes no direction). */
export const SORT_DIRECTIONS: Readonly<Record<LibrarySort, Exclude<SortDirection, ''>>> = { use: 'desc', maker: 'asc', model: 'asc', updated: 'desc' };
export const SORT_LABELS: Readonly<Record<LibrarySort, string>> = {
  use: 'Most used',
  maker: 'Maker (A–Z)',
  model: 'Model (A–Z)',
  updated: 'Recently updated',
};
const SORTS = Object.keys(SORT_LABELS) as LibrarySort[];
const MEDIUM_QUERY = '(max-width: 1099.98px)';

/** `/templates`: the template library — search, filters, sort and server-side pages. */
@Component({
  selector: 'dm-library',
  imports: [
    DatePipe,
    ReactiveFormsModule,
    RouterLink,
    MatTableModule,
    MatSortModule,
    MatPaginatorModule,
    MatButtonModule,
    MatIconModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatProgressBarModule,
  ],
  templateUrl: './library.html',
  styleUrl: './library.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Library {
  private readonly api = inject(TemplatesApi);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  protected readonly auth = inject(Auth);
  private readonly matSort = viewChild(MatSort);

  protected readonly narrow = toSignal(inject(BreakpointObserver).observe(NARROW_QUERY).pipe(map((s) => s.matches)), { initialValue: false });
  /** On a tablet the model moves under the maker, and the date steps aside. */
  protected readonly medium = toSignal(inject(BreakpointObserver).observe(MEDIUM_QUERY).pipe(map((s) => s.matches)), { initialValue: false });
  protected readonly columns = computed(() =>
    this.narrow()
      ? ['maker', 'surveys']
      : this.medium()
        ? ['maker', 'chassis', 'kind', 'author', 'stages', 'testPoints', 'versions', 'surveys']
        : ['maker', 'model', 'chassis', 'kind', 'author', 'stages', 'testPoints', 'versions', 'surveys', 'updated'],
  );
  protected readonly canAuthor = computed(() => this.auth.hasRole('author', 'admin'));
  protected readonly kinds = CHASSIS_KINDS;
  protected readonly kindLabels = CHASSIS_KIND_LABELS;
  protected readonly sorts = SORTS;
  protected readonly sortLabels = SORT_LABELS;

  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly filters = this.fb.group({
    q: [''],
    maker: [''],
    model: [''],
    chassis: [''],
    tubeType: [''],
    kind: this.fb.control<ChassisKind | ''>(''),
    author: [''],
  });
  protected readonly showFilters = signal(false);
  protected readonly sort = signal<LibrarySort>('use');
  protected readonly sortDirection = computed(() => SORT_DIRECTIONS[this.sort()]);
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  private readonly filterValues = signal(this.filters.getRawValue());
  private readonly reloads = signal(0);

  protected readonly loading = signal(true);
  protected readonly loadFailed = signal(false);
  protected readonly page = signal<LibraryPage>({ items: [], total: 0, page: 1, pageSize: 25 });
  protected readonly activeFilters = computed(() => {
    const f = this.filterValues();
    return (['maker', 'model', 'chassis', 'tubeType', 'kind', 'author'] as const).filter((k) => f[k].trim() !== '').length;
  });

  private readonly query = computed(() => ({
    ...this.filterValues(),
    sort: this.sort(),
    page: this.pageIndex() + 1,
    pageSize: this.pageSize(),
    reload: this.reloads(),
  }));

  constructor() {
    this.filters.valueChanges.pipe(debounceTime(300), takeUntilDestroyed()).subscribe(() => {
      const next = this.filters.getRawValue();
      if (JSON.stringify(next) === JSON.stringify(this.filterValues())) return;
      this.pageIndex.set(0);
      this.filterValues.set(next);
    });
    toObservable(this.query)
      .pipe(
        tap(() => this.loading.set(true)),
        switchMap(({ reload: _, ...q }) =>
          this.api.library(q).pipe(
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

  protected kindLabel(kind: ChassisKind): string {
    return CHASSIS_KIND_LABELS[kind] ?? kind;
  }
  protected visibilityIcon(v: TemplateVisibility): string {
    return VISIBILITY_ICONS[v];
  }
  protected visibilityLabel(v: TemplateVisibility): string {
    return VISIBILITY_LABELS[v];
  }

  /** A header click chooses the key; the direction is the API's one order for it. */
  protected sortBy(event: Sort): void {
    const key = event.active as LibrarySort;
    if (!SORTS.includes(key)) return;
    const fixed = SORT_DIRECTIONS[key];
    if (event.direction !== fixed) {
      // Clicked again on the active column: the API has no reverse order, so the arrow goes back.
      this.matSort()?.sort({ id: key, start: fixed, disableClear: true });
      return;
    }
    this.chooseSort(key);
  }

  protected chooseSort(key: LibrarySort): void {
    if (key === this.sort()) return;
    this.pageIndex.set(0);
    this.sort.set(key);
  }

  protected changePage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  protected clearFilters(): void {
    this.filters.patchValue({ maker: '', model: '', chassis: '', tubeType: '', kind: '', author: '' });
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  protected open(row: TemplateSummary): void {
    void this.router.navigate(['/templates', row.id]);
  }

  protected newTemplate(): void {
    this.dialog
      .open<NewTemplateDialog, void, TemplateView>(NewTemplateDialog, { width: '640px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((created) => {
        if (created) void this.router.navigate(['/templates', created.id, 'edit']);
      });
  }

  protected importTemplate(): void {
    this.dialog
      .open<ImportDialog, void, TemplateView>(ImportDialog, { width: '760px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((created) => {
        if (created) void this.router.navigate(['/templates', created.id]);
      });
  }
}
