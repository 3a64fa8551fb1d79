import { inject, Injectable } from '@angular/core';
import {
  endpoints,
  type WorkOrder,
  type WorkOrderCreate,
  type WorkOrdersQuery,
  type WorkOrderUpdate,
} from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** Calls that change work orders; lists and details are read as resources where they are shown. */
@Injectable({ providedIn: 'root' })
export class WorkOrdersApi {
  private readonly api = inject(ApiClient);

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
