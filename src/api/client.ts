import type { z } from 'zod';
import { ApiErrorBody } from '../contracts/errors';

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
const CLIENT_HEADERS = { 'x-yieldpoint-client': 'web' };

// `contentType` sends a string body as it is (a CSV upload); without it the body goes as JSON.
type Options = { method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'; body?: unknown; contentType?: string; signal?: AbortSignal };

/** Calls `/api/...`, parses the answer with its contract, and throws ApiError for anything else. */
export async function api<S extends z.ZodType>(path: string, schema: S | null, opts: Options = {}): Promise<z.infer<S>> {
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
    const parsed = ApiErrorBody.safeParse(await res.json().catch(() => null));
    if (parsed.success) throw new ApiError(res.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.fields);
    throw new ApiError(res.status, 'http', `The server answered ${res.status}`);
  }
  if (res.status === 204 || !schema) return undefined as z.infer<S>;
  return schema.parse(await res.json());
}
