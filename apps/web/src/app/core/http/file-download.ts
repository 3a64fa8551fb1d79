import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';

/**
 * Saves a file the API makes (CSV exports, error lists) through the browser. The request carries the
 * bearer token like every other call, which a plain link could not.
 */
@Injectable({ providedIn: 'root' })
export class FileDownload {
  private readonly http = inject(HttpClient);

  async save(url: string, fileName: string): Promise<void> {
    const blob = await firstValueFrom(this.http.get(url, { responseType: 'blob' }));
    const objectUrl = URL.createObjectURL(blob);
    const link = document.createElement('a');
    link.href = objectUrl;
    link.download = fileName;
    link.click();
    URL.revokeObjectURL(objectUrl);
  }
}
