import { DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  input,
  linkedSignal,
  viewChild,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { type DailyReport, endpoints } from '@tierscope/contracts';
import { EXCEPTION_KIND_LABELS, type ExceptionKind } from '@tierscope/domain';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { FarmSelect } from '../../shared/ui/farm-select';
import { LoadState, loadStatus } from '../../shared/ui/load-state';
import { localDay } from '../../shared/ui/local-dates';
import { ApiClient } from '../../core/http/api-client';

type SectionLine = DailyReport['sections'][number];

/** One production day of a house, section by section: sortable, paged, exportable and printable. */
@Component({
  selector: 'ts-daily-report',
  imports: [
    FarmSelect,
    DecimalPipe,
    RouterLink,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatPaginatorModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    LoadState,
  ],
  templateUrl: './daily-report.html',
  styleUrl: './reports-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DailyReportView {
  /** a house to open with (from ?houseId=) */
  readonly initialHouseId = input<number | null>(null);

  private readonly auth = inject(AuthStore);
  private readonly api = inject(ApiClient);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly farms = this.auth.memberships;
  protected readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  protected readonly houses = this.api.resource(endpoints.houses.listByFarm, () => {
    const farm = this.farmId();
    return farm === null ? undefined : { params: { farmId: farm } };
  });
  protected readonly houseId = linkedSignal<number | null>(() => {
    const wanted = this.initialHouseId();
    const list = this.houses.value() ?? [];
    return list.find((h) => h.id === wanted)?.id ?? list[0]?.id ?? null;
  });
  protected readonly day = linkedSignal(() => localDay(1));
  protected readonly report = this.api.resource(endpoints.reports.daily, () => {
    const house = this.houseId();
    return house === null ? undefined : { query: { houseId: house, day: this.day() } };
  });
  protected readonly state = computed(() =>
    loadStatus(this.report, (report) => report.totals.belts === 0),
  );
  protected readonly errorText = computed(() => describeApiError(this.report.error()));
  protected readonly columns = ['row', 'tier', 'eggs', 'expected', 'ratio', 'exception'];
  protected readonly table = new MatTableDataSource<SectionLine>([]);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    this.table.sortingDataAccessor = (line, column) => {
      const value = line[column as keyof SectionLine];
      return typeof value === 'number' ? value : typeof value === 'string' ? value : -1;
    };
    effect(() => {
      this.table.data = this.report.value()?.sections ?? [];
    });
    effect(() => {
      const sort = this.sort();
      const paginator = this.paginator();
      if (sort) this.table.sort = sort;
      if (paginator) this.table.paginator = paginator;
    });
  }

  protected kindWords(kind: ExceptionKind | null): string {
    return kind ? EXCEPTION_KIND_LABELS[kind] : '';
  }

  protected print(): void {
    window.print();
  }

  protected async exportCsv(): Promise<void> {
    const house = this.houseId();
    if (house === null) return;
    try {
      await this.api.download(endpoints.reports.dailyCsv, `daily-report-${this.day()}.csv`, {
        query: { houseId: house, day: this.day() },
      });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }
}
