import { CLIENT_HEADER } from '../contracts/client-header';
import type { ApiErrorBody } from '../contracts/errors';
import { noteAnswer } from './cached-answers';

/** Any failed API call: the server's code, message and field errors, or a network failure (status 0). */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: Record<string, string> = {},
  ) {
    super(message);
  }
}

// The server refuses writes without this header: a cross-site form cannot set it.
const CLIENT_HEADERS = { [CLIENT_HEADER]: 'web' };

// `contentType` sends a string body as it is (a CSV upload); without it the body goes as JSON.
type Options = { method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'; body?: unknown; contentType?: string; signal?: AbortSignal };

// The server passes every answer through its zod contract before sending it, so the browser takes the contract's
// type without parsing again: that keeps zod (a sixth of the bundle) out of the web app.
const isErrorBody = (b: unknown): b is ApiErrorBody =>
  typeof b === 'object' && b !== null && typeof (b as ApiErrorBody).error?.code === 'string' && typeof (b as ApiErrorBody).error?.message === 'string';

/** Calls `/api/...` and returns the answer typed by its contract; throws ApiError for anything else. */
export async function api<T>(path: string, opts: Options = {}): Promise<T> {
  let res: Response;
  const isForm = typeof FormData !== 'undefined' && opts.body instanceof FormData;
  try {
    res = await fetch(`/api${path}`, {
      method: opts.method ?? 'GET',
      credentials: 'same-origin',
      // A FormData body (file upload) sets its own multipart content type and boundary; `contentType` sends a string as it is.
      headers: opts.body === undefined || isForm ? CLIENT_HEADERS : { ...CLIENT_HEADERS, 'content-type': opts.contentType ?? 'application/json' },
      body: opts.body === undefined ? undefined : isForm ? (opts.body as FormData) : opts.contentType ? String(opts.body) : JSON.stringify(opts.body),
      signal: opts.signal,
    });
  } catch {
    throw new ApiError(0, 'network', 'No connection to the Yieldpoint server. Check the network and try again.');
  }
  if (!res.ok) {
    const body: unknown = await res.json().catch(() => null);
    if (isErrorBody(body)) throw new ApiError(res.status, body.error.code, body.error.message, body.error.fields ?? {});
    throw new ApiError(res.status, 'http', `The server answered ${res.status}`);
  }
  if ((opts.method ?? 'GET') === 'GET') noteAnswer(path, res.headers);
  if (res.status === 204) return undefined as T;
  return (await res.json()) as T;
}
