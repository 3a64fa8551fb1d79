import { computed, DestroyRef, inject, Injectable, linkedSignal, signal } from '@angular/core';
import type { WorkOrder, WorkOrderUpdate } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import type { LoadStatus } from '../../shared/ui/load-state';
import { WorkOrdersApi } from './work-orders-api';

/** One work order's page: the order as last read or changed, its assignees and photos, and every change to it. */
@Injectable()
export class WorkOrderStore {
  private readonly api = inject(WorkOrdersApi);
  private readonly auth = inject(AuthStore);
  private readonly orderParam = signal<() => number | null>(() => null);

  private readonly resource = this.api.get(() => this.orderParam()());
  /** The order as last read or as the last change answered it. */
  readonly order = linkedSignal<WorkOrder | undefined>(() =>
    this.resource.hasValue() ? this.resource.value() : undefined,
  );
  readonly loadStatus = computed((): LoadStatus => {
    if (this.order()) return 'ready';
    if (this.resource.error()) return 'error';
    return 'loading';
  });
  readonly errorText = computed(() => describeApiError(this.resource.error()));
  readonly assignees = this.api.assignees(() => {
    const o = this.order();
    return o?.canEdit ? o.farmId : null;
  });
  /** Managers go back to every work order; the crew to their own. */
  readonly canSeeAll = computed(() => this.auth.hasPermission('workOrders.manage'));
  readonly canCloseException = computed(() => {
    const o = this.order();
    return (
      !!o &&
      o.exceptionId !== null &&
      o.exceptionStatus !== null &&
      o.exceptionStatus !== 'closed' &&
      this.auth.hasPermission('exceptions.acknowledge', o.farmId)
    );
  });
  readonly isBusy = signal(false);
  readonly isUploading = signal(false);
  /** Photos by id as object URLs: they need the bearer token, which an <img src> cannot send. */
  readonly photoUrls = signal<Record<number, string>>({});

  constructor() {
    inject(DestroyRef).onDestroy(() => {
      for (const url of Object.values(this.photoUrls())) URL.revokeObjectURL(url);
    });
  }

  /** Shows the order the route names. */
  followOrder(workOrderId: () => number | null): void {
    this.orderParam.set(workOrderId);
  }

  reload(): void {
    this.resource.reload();
  }

  /** Fetches the order's photos not fetched yet; a missing one stays a placeholder. */
  fetchPhotos(o: WorkOrder): void {
    for (const photo of o.photos) {
      if (this.photoUrls()[photo.id]) continue;
      this.api.photoUrl(o.id, photo.id).then(
        (url) => {
          this.photoUrls.update((all) => ({ ...all, [photo.id]: url }));
        },
        () => undefined,
      );
    }
  }

  setChecklistItem(itemId: number, isChecked: boolean): Promise<void> {
    return this.change((o) => this.api.setChecklistItem(o.id, itemId, isChecked));
  }

  update(input: WorkOrderUpdate): Promise<void> {
    return this.change((o) => this.api.update(o.id, input));
  }

  async addPhotos(files: readonly File[]): Promise<void> {
    const o = this.order();
    if (!o) return;
    this.isUploading.set(true);
    try {
      this.order.set(await this.api.addPhotos(o.id, files));
    } finally {
      this.isUploading.set(false);
    }
  }

  /** Makes one change; its answer becomes the order shown. Throws what the API refused. */
  private async change(work: (o: WorkOrder) => Promise<WorkOrder>): Promise<void> {
    const o = this.order();
    if (!o) return;
    this.isBusy.set(true);
    try {
      this.order.set(await work(o));
    } finally {
      this.isBusy.set(false);
    }
  }
}
