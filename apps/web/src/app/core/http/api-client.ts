import { HttpClient, HttpParams, httpResource, type HttpResourceRef } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { pathOf, type Endpoint } from '@tierscope/contracts';
import { firstValueFrom } from 'rxjs';
import type { z } from 'zod';

export const API_PREFIX = '/api/v1';

type QueryValue = string | number | boolean | Date | undefined | null;

/** Any endpoint's input, as the client takes it apart. */
interface GivenInput {
  params?: Readonly<Record<string, string | number>>;
  query?: Readonly<Record<string, QueryValue>>;
  body?: unknown;
  form?: FormData;
}

/** What a call of endpoint `E` needs: its path parameters, query, JSON body or multipart form — as declared. */
export type CallInput<E extends Endpoint> = (E extends { params: z.ZodObject }
  ? { params: z.output<E['params']> }
  : { params?: never }) &
  (E extends { query: z.ZodType } ? { query?: Partial<z.output<E['query']>> } : { query?: never }) &
  (E extends { body: z.ZodType } ? { body: z.input<E['body']> } : { body?: never }) &
  (E extends { upload: z.ZodObject } ? { form: FormData } : { form?: never });

/** What endpoint `E` answers, parsed by its schema: JSON as its type, a file as a Blob, nothing for 204. */
export type AnswerOf<E extends Endpoint> = E['answer'] extends z.ZodType
  ? z.output<E['answer']>
  : E['answer'] extends string
    ? Blob
    : undefined;

/** The input is optional where the endpoint needs none. */
type InputArgs<E extends Endpoint> =
  Record<string, never> extends CallInput<E> ? [input?: CallInput<E>] : [input: CallInput<E>];

/**
 * The web app's one way to the API: every call names an endpoint of @tierscope/contracts — the same
 * declaration the API builds its route from — and every answer is parsed by that endpoint's schema, so a
 * change on either side is a type error or a clear parse error, never a silent mismatch.
 */
@Injectable({ providedIn: 'root' })
export class ApiClient {
  private readonly http = inject(HttpClient);

  /** Calls an endpoint once (writes, and reads done on demand). */
  async call<E extends Endpoint>(endpoint: E, ...[input]: InputArgs<E>): Promise<AnswerOf<E>> {
    const given = input as GivenInput | undefined;
    const url = urlOf(endpoint, given);
    const options = { body: given?.form ?? given?.body, params: queryOf(given?.query) };
    if (typeof endpoint.answer === 'string') {
      const blob = await firstValueFrom(
        this.http.request(endpoint.method.toUpperCase(), url, { ...options, responseType: 'blob' }),
      );
      return blob as AnswerOf<E>;
    }
    const answer = await firstValueFrom(
      this.http.request(endpoint.method.toUpperCase(), url, { ...options, responseType: 'json' }),
    );
    return (endpoint.answer ? endpoint.answer.parse(answer) : undefined) as AnswerOf<E>;
  }

  /**
   * A signal-based read of a GET endpoint that follows its input: `input` is read in a reactive context and
   * the endpoint is read again whenever it changes; `undefined` means "not yet" (nothing is requested).
   * Must be created in an injection context (a field initializer), like `httpResource`.
   */
  resource<E extends Endpoint & { method: 'get'; answer: z.ZodType }>(
    endpoint: E,
    input: () => CallInput<E> | undefined,
  ): HttpResourceRef<z.output<E['answer']> | undefined> {
    return httpResource(
      () => {
        const given = input() as GivenInput | undefined;
        if (!given) return undefined;
        return { url: urlOf(endpoint, given), params: queryOf(given.query) };
      },
      { parse: (value) => endpoint.answer.parse(value) as z.output<E['answer']> },
    );
  }

  /** Saves a file an endpoint makes (CSV exports, error lists) through the browser, with the bearer token. */
  async download<E extends Endpoint>(
    endpoint: E,
    fileName: string,
    ...[input]: InputArgs<E>
  ): Promise<void> {
    const blob = await this.call(endpoint, ...([input] as InputArgs<E>));
    if (!(blob instanceof Blob)) throw new Error(`${endpoint.path} does not answer a file`);
    const objectUrl = URL.createObjectURL(blob);
    const link = document.createElement('a');
    link.href = objectUrl;
    link.download = fileName;
    link.click();
    URL.revokeObjectURL(objectUrl);
  }
}

function urlOf(endpoint: Endpoint, input: GivenInput | undefined): string {
  return `${API_PREFIX}${pathOf(endpoint.path, input?.params)}`;
}

/** Query values as the API reads them: dates as ISO text, empty values left out. */
function queryOf(query: Readonly<Record<string, QueryValue>> | undefined): HttpParams {
  let params = new HttpParams();
  for (const [key, value] of Object.entries(query ?? {})) {
    if (value === undefined || value === null || value === '') continue;
    params = params.set(key, value instanceof Date ? value.toISOString() : String(value));
  }
  return params;
}
