import { DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  effect,
  inject,
  input,
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
import { type DailyReport } from '@tierscope/contracts';
import { EXCEPTION_KIND_LABELS, type ExceptionKind } from '@tierscope/domain';
import { describeApiError } from '../../core/http/api-error';
import { FarmSelect } from '../../shared/ui/farm-select';
import { LoadState } from '../../shared/ui/load-state';
import { DailyReportStore } from './reports-store';

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

  protected readonly store = inject(DailyReportStore);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly columns = ['row', 'tier', 'eggs', 'expected', 'ratio', 'exception'];
  protected readonly table = new MatTableDataSource<SectionLine>([]);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    this.store.followHouseParam(() => this.initialHouseId());
    this.table.sortingDataAccessor = (line, column) => {
      const value = line[column as keyof SectionLine];
      return typeof value === 'number' ? value : typeof value === 'string' ? value : -1;
    };
    effect(() => {
      this.table.data = this.store.report.value()?.sections ?? [];
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
    try {
      await this.store.downloadCsv();
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }
}
