import { inject, Injectable } from '@angular/core';
import {
  endpoints,
  type ImportMappingInput,
  type ImportStatus,
  type SavedMapping,
} from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The import endpoints as the imports page uses them, with the houses and counters it maps into. */
@Injectable({ providedIn: 'root' })
export class ImportsApi {
  private readonly api = inject(ApiClient);

  mappings(farmId: () => number | null) {
    return this.api.resource(endpoints.imports.mappings, () => {
      const id = farmId();
      return id === null ? undefined : { params: { farmId: id } };
    });
  }

  recent(farmId: () => number | null) {
    return this.api.resource(endpoints.imports.list, () => {
      const id = farmId();
      return id === null ? undefined : { query: { farmId: id } };
    });
  }

  /** Sends the file with its mapping; the import runs on the server and reports as it goes. */
  start(houseId: number, mapping: ImportMappingInput, file: File): Promise<ImportStatus> {
    const form = new FormData();
    form.append('mapping', JSON.stringify(mapping));
    form.append('file', file, file.name);
    return this.api.call(endpoints.imports.start, { params: { houseId }, form });
  }

  get(importId: number): Promise<ImportStatus> {
    return this.api.call(endpoints.imports.get, { params: { importId } });
  }

  cancel(importId: number): Promise<ImportStatus> {
    return this.api.call(endpoints.imports.cancel, { params: { importId } });
  }

  retry(importId: number): Promise<ImportStatus> {
    return this.api.call(endpoints.imports.retry, { params: { importId } });
  }

  /** Saves the lines an import refused, with their numbers and reasons, as CSV. */
  downloadErrors(importId: number): Promise<void> {
    return this.api.download(endpoints.imports.errorsCsv, `import-${importId}-errors.csv`, {
      params: { importId },
    });
  }

  saveMapping(farmId: number, name: string, mapping: ImportMappingInput): Promise<SavedMapping> {
    return this.api.call(endpoints.imports.saveMapping, {
      params: { farmId },
      body: { name, mapping },
    });
  }

  deleteMapping(mappingId: number): Promise<void> {
    return this.api.call(endpoints.imports.deleteMapping, { params: { mappingId } });
  }
}
