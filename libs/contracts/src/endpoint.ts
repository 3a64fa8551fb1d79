import type { Permission } from '@tierscope/domain';
import type { z } from 'zod';

/** The media types of answers a route sends as a file rather than JSON. */
export type FileAnswer = 'text/csv' | 'text/html' | 'text/javascript' | 'image/*';

/**
 * What a caller of a route must know, declared once (docs/adr/0006): method, path, inputs and answer as zod
 * schemas. The API builds its route from it (adding the handler), the OpenAPI document comes from it, and the
 * web app's client calls it — so the three cannot disagree.
 */
export interface Endpoint {
  readonly method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  /** Express-style path below `/api/v1` (`/houses/:houseId/flocks`) */
  readonly path: string;
  readonly summary: string;
  /** who may call it: anyone, a signed-in person (the default), or a farm's gateway key */
  readonly access?: 'public' | 'user' | 'gateway';
  /**
   * The permission a caller needs on the resource's farm (the roles holding it are listed in the document);
   * none: any signed-in user, who sees only their own farms. The service checks it on the farm it finds —
   * another farm's resource is "not found" — and the authorisation matrix holds the two in step.
   */
  readonly permission?: Permission;
  readonly params?: z.ZodObject;
  readonly query?: z.ZodType;
  readonly body?: z.ZodType;
  /** a multipart upload's fields (files as `z.file()`) */
  readonly upload?: z.ZodObject;
  /** the success status (200 unless given) */
  readonly status?: 200 | 201 | 202 | 204;
  /** a JSON answer's schema, or the media type of a file */
  readonly answer?: z.ZodType | FileAnswer;
  /** the error answers it gives besides the usual 400, 401, 403 and 404 (e.g. `{ 409: 'Already closed' }`) */
  readonly errors?: Readonly<Record<number, string>>;
}

/** Declares an endpoint, keeping the exact types of its schemas for the server's handler and the client. */
export function endpoint<const E extends Endpoint>(declaration: E): E {
  return declaration;
}

/** The path with its `:name` parts filled in, each value URL-encoded. */
export function pathOf(
  path: string,
  params: Readonly<Record<string, string | number | undefined>> = {},
): string {
  return path.replace(/:(\w+)/g, (_part, name: string) => {
    const value = params[name];
    if (value === undefined) throw new Error(`${path}: no value for ${name}`);
    return encodeURIComponent(String(value));
  });
}
