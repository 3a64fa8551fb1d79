import { inject, Injectable } from '@angular/core';
import {
  endpoints,
  type WorkOrder,
  type WorkOrderCreate,
  type WorkOrdersQuery,
  type WorkOrderUpdate,
} from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The work-order endpoints as the web app uses them: reads as resources, changes as calls. */
@Injectable({ providedIn: 'root' })
export class WorkOrdersApi {
  private readonly api = inject(ApiClient);

  /** Orders matching `query()`, read again when it changes (nothing while it is undefined). */
  list(query: () => Partial<WorkOrdersQuery> | undefined) {
    return this.api.resource(endpoints.workOrders.list, () => {
      const given = query();
      return given && { query: given };
    });
  }

  /** One order with its checklist, photos and history (nothing while the id is null). */
  get(workOrderId: () => number | null) {
    return this.api.resource(endpoints.workOrders.get, () => {
      const id = workOrderId();
      return id === null ? undefined : { params: { workOrderId: id } };
    });
  }

  /** The people a farm's orders may be handed to (nothing while no farm is known). */
  assignees(farmId: () => number | null) {
    return this.api.resource(endpoints.workOrders.assignees, () => {
      const id = farmId();
      return id === null ? undefined : { params: { farmId: id } };
    });
  }

  create(input: WorkOrderCreate): Promise<WorkOrder> {
    return this.api.call(endpoints.workOrders.create, { body: input });
  }

  update(id: number, input: WorkOrderUpdate): Promise<WorkOrder> {
    return this.api.call(endpoints.workOrders.update, { params: { workOrderId: id }, body: input });
  }

  setChecklistItem(id: number, itemId: number, isChecked: boolean): Promise<WorkOrder> {
    return this.api.call(endpoints.workOrders.setChecklistItem, {
      params: { workOrderId: id, itemId },
      body: { isChecked },
    });
  }

  addPhotos(id: number, files: readonly File[]): Promise<WorkOrder> {
    const form = new FormData();
    for (const file of files) form.append('photos', file, file.name);
    return this.api.call(endpoints.workOrders.addPhotos, { params: { workOrderId: id }, form });
  }

  /** A photo as an object URL: images need the bearer token, which an <img src> cannot send. */
  async photoUrl(id: number, photoId: number): Promise<string> {
    const blob = await this.api.call(endpoints.workOrders.photo, {
      params: { workOrderId: id, photoId },
    });
    return URL.createObjectURL(blob);
  }

  /** Downloads the list as CSV through the browser, with the filters of the page. */
  downloadCsv(query: Partial<WorkOrdersQuery>): Promise<void> {
    return this.api.download(
      endpoints.workOrders.exportCsv,
      `work-orders-${new Date().toISOString().slice(0, 10)}.csv`,
      { query },
    );
  }
}
