import { computed, inject, Injectable, linkedSignal, signal } from '@angular/core';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { loadStatus } from '../../shared/ui/load-state';
import { localDay } from '../../shared/ui/local-dates';
import { HousesApi } from '../../core/http/houses-api';
import { ReportsApi } from './reports-api';

// One small store per report tab, all provided on the reports route: each is made on its tab's first
// opening, so a tab reads nothing until it is shown, and keeps its choices while the page is open.

/** The daily house report: farm, house and day chosen, and the report they select. */
@Injectable()
export class DailyReportStore {
  private readonly api = inject(ReportsApi);
  private readonly auth = inject(AuthStore);
  private readonly wantedHouse = signal<() => number | null>(() => null);

  readonly farms = this.auth.memberships;
  readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  readonly houses = inject(HousesApi).housesOfFarm(this.farmId);
  /** The house a link asked for when the farm has it, else the farm's first. */
  readonly houseId = linkedSignal<number | null>(() => {
    const wanted = this.wantedHouse()();
    const list = this.houses.value() ?? [];
    return list.find((h) => h.id === wanted)?.id ?? list[0]?.id ?? null;
  });
  readonly day = linkedSignal(() => localDay(1));
  private readonly query = computed(() => {
    const houseId = this.houseId();
    return houseId === null ? undefined : { houseId, day: this.day() };
  });
  readonly report = this.api.daily(this.query);
  readonly loadStatus = computed(() =>
    loadStatus(this.report, (report) => report.totals.belts === 0),
  );
  readonly errorText = computed(() => describeApiError(this.report.error()));

  /** Opens on the house a route parameter names (`?houseId=` from a house page). */
  followHouseParam(houseId: () => number | null): void {
    this.wantedHouse.set(houseId);
  }

  async downloadCsv(): Promise<void> {
    const query = this.query();
    if (query) await this.api.downloadDaily(query);
  }
}

/** The farm summary: farm and dates chosen, each house's eggs, hen-day and exceptions over them. */
@Injectable()
export class FarmSummaryStore {
  private readonly api = inject(ReportsApi);
  private readonly auth = inject(AuthStore);

  readonly farms = this.auth.memberships;
  readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  readonly from = signal(localDay(14));
  readonly to = signal(localDay(1));
  readonly summary = this.api.farmSummary(() => {
    const farmId = this.farmId();
    return farmId === null ? undefined : { farmId, from: this.from(), to: this.to() };
  });
  readonly loadStatus = computed(() =>
    loadStatus(this.summary, (summary) => summary.houses.length === 0),
  );
  readonly errorText = computed(() => describeApiError(this.summary.error()));
}

/** The work-order report: what the crew did per house over the dates chosen, and what they found. */
@Injectable()
export class WorkOrderReportStore {
  private readonly api = inject(ReportsApi);
  private readonly auth = inject(AuthStore);

  /** The farms on which the user manages work orders. */
  readonly farms = this.auth.farmsWith('workOrders.manage');
  readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  readonly to = signal(new Date().toISOString().slice(0, 10));
  readonly from = signal(new Date(Date.now() - 29 * 86_400_000).toISOString().slice(0, 10));
  readonly report = this.api.workOrders(() => {
    const farmId = this.farmId();
    if (farmId === null || !this.from() || !this.to()) return undefined;
    return { farmId, from: this.from(), to: this.to() };
  });
  readonly loadStatus = computed(() =>
    loadStatus(this.report, (report) => report.houses.length === 0),
  );
  readonly errorText = computed(() => describeApiError(this.report.error()));
}
