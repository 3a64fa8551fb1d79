import { inject, Injectable } from '@angular/core';
import {
  endpoints,
  type DailyReportQuery,
  type FarmSummaryQuery,
  type WorkOrderReportQuery,
} from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The report endpoints, each read as a resource that follows its query (nothing while it is undefined). */
@Injectable({ providedIn: 'root' })
export class ReportsApi {
  private readonly api = inject(ApiClient);

  daily(query: () => DailyReportQuery | undefined) {
    return this.api.resource(endpoints.reports.daily, () => {
      const given = query();
      return given && { query: given };
    });
  }

  downloadDaily(query: DailyReportQuery): Promise<void> {
    return this.api.download(endpoints.reports.dailyCsv, `daily-report-${query.day}.csv`, {
      query,
    });
  }

  farmSummary(query: () => FarmSummaryQuery | undefined) {
    return this.api.resource(endpoints.reports.farm, () => {
      const given = query();
      return given && { query: given };
    });
  }

  workOrders(query: () => WorkOrderReportQuery | undefined) {
    return this.api.resource(endpoints.reports.workOrders, () => {
      const given = query();
      return given && { query: given };
    });
  }
}
