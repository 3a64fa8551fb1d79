import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import {
  workOrderSchema,
  type WorkOrder,
  type WorkOrderCreate,
  type WorkOrderUpdate,
} from '@tierscope/contracts';
import { firstValueFrom } from 'rxjs';
import { FileDownload } from '../../core/http/file-download';

/** Calls that change work orders; lists and details are read with httpResource where they are shown. */
@Injectable({ providedIn: 'root' })
export class WorkOrdersApi {
  private readonly http = inject(HttpClient);
  private readonly files = inject(FileDownload);

  async create(input: WorkOrderCreate): Promise<WorkOrder> {
    return workOrderSchema.parse(
      await firstValueFrom(this.http.post('/api/v1/work-orders', input)),
    );
  }

  async update(id: number, input: WorkOrderUpdate): Promise<WorkOrder> {
    return workOrderSchema.parse(
      await firstValueFrom(this.http.patch(`/api/v1/work-orders/${id}`, input)),
    );
  }

  async setChecklistItem(id: number, itemId: number, isChecked: boolean): Promise<WorkOrder> {
    return workOrderSchema.parse(
      await firstValueFrom(
        this.http.patch(`/api/v1/work-orders/${id}/checklist/${itemId}`, { isChecked }),
      ),
    );
  }

  async addPhotos(id: number, files: readonly File[]): Promise<WorkOrder> {
    const body = new FormData();
    for (const file of files) body.append('photos', file, file.name);
    return workOrderSchema.parse(
      await firstValueFrom(this.http.post(`/api/v1/work-orders/${id}/photos`, body)),
    );
  }

  /** A photo as an object URL: images need the bearer token, which an <img src> cannot send. */
  async photoUrl(id: number, photoId: number): Promise<string> {
    const blob = await firstValueFrom(
      this.http.get(`/api/v1/work-orders/${id}/photos/${photoId}`, { responseType: 'blob' }),
    );
    return URL.createObjectURL(blob);
  }

  /** Downloads the list as CSV through the browser, with the filters of the page. */
  downloadCsv(query: URLSearchParams): Promise<void> {
    return this.files.save(
      `/api/v1/work-orders/export.csv?${query.toString()}`,
      `work-orders-${new Date().toISOString().slice(0, 10)}.csv`,
    );
  }
}
