import { inject, Injectable } from '@angular/core';
import {
  endpoints,
  type CloseException,
  type ExceptionsQuery,
  type ExceptionView,
} from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The exceptions endpoints as the web app uses them: reads as resources, acts as calls. */
@Injectable({ providedIn: 'root' })
export class ExceptionsApi {
  private readonly api = inject(ApiClient);

  /** Exceptions matching `query()`, read again when it changes (nothing while it is undefined). */
  list(query: () => Partial<ExceptionsQuery> | undefined) {
    return this.api.resource(endpoints.exceptions.list, () => {
      const given = query();
      return given && { query: given };
    });
  }

  acknowledge(exceptionId: number): Promise<ExceptionView> {
    return this.api.call(endpoints.exceptions.acknowledge, { params: { exceptionId } });
  }

  close(exceptionId: number, input: CloseException): Promise<ExceptionView> {
    return this.api.call(endpoints.exceptions.close, { params: { exceptionId }, body: input });
  }
}
