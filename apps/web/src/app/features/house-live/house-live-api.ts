import { inject, Injectable } from '@angular/core';
import { endpoints } from '@tierscope/contracts';
import type { WindowKind } from '@tierscope/domain';
import { ApiClient } from '../../core/http/api-client';

/** What a house's live page reads over HTTP: past windows of the map, and a section's detail. */
@Injectable({ providedIn: 'root' })
export class HouseLiveApi {
  private readonly api = inject(ApiClient);

  /** The map for a window (nothing while `input()` is undefined). */
  houseMap(
    input: () => { houseId: number; window: WindowKind; from?: string; to?: string } | undefined,
  ) {
    return this.api.resource(endpoints.exceptions.houseMap, () => {
      const given = input();
      if (!given) return undefined;
      const { houseId, ...query } = given;
      return { params: { houseId }, query };
    });
  }

  /** One section's day so far, its last days and its exceptions. */
  cell(input: () => { houseId: number; row: number; tier: number }) {
    return this.api.resource(endpoints.exceptions.cell, () => ({ params: input() }));
  }
}
