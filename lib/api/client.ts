import { keysToWords } from '@/lib/schemas/field-words';

/**
 * The one fetch wrapper. Every API answer that is not 2xx becomes an ApiError carrying the
 * server's `{ code, message }`; toUserMessage turns anything thrown into a sentence.
 */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
    /** The whole answer, for errors that carry more than `{ code, message }` (e.g. a spec conflict's `newer`). */
    readonly body?: unknown,
  ) {
    super(message);
  }
}

let apiBase = '';
/** Where the API lives; '' (same origin) on the web build. */
export function setApiBase(base: string): void {
  apiBase = base.replace(/\/$/, '');
}

type Body = Record<string, unknown> | unknown[] | FormData | undefined;

export async function apiFetch<T>(path: string, init: { method?: string; body?: Body; signal?: AbortSignal } = {}): Promise<T> {
  const isForm = typeof FormData !== 'undefined' && init.body instanceof FormData;
  let res: Response;
  try {
    res = await fetch(apiBase + path, {
      method: init.method ?? (init.body ? 'POST' : 'GET'),
      credentials: 'include',
      headers: init.body && !isForm ? { 'Content-Type': 'application/json' } : undefined,
      body: init.body ? (isForm ? (init.body as FormData) : JSON.stringify(init.body)) : undefined,
      signal: init.signal,
    });
  } catch (err) {
    if ((err as Error)?.name === 'AbortError') throw err;
    throw new ApiError(0, 'network', 'Quasilevel’s server could not be reached. Check the connection and try again.');
  }
  const text = await res.text();
  let data: unknown = null;
  if (text) {
    try {
      data = JSON.parse(text);
    } catch {
      data = text;
    }
  }
  if (!res.ok) {
    const d = (data ?? {}) as { code?: string; message?: string; details?: unknown };
    throw new ApiError(res.status, d.code ?? `http_${res.status}`, d.message ?? `The server answered ${res.status}.`, d.details, data);
  }
  return data as T;
}

/** A sentence for people: the server's message, or a plain explanation. */
export function toUserMessage(error: unknown): string {
  if (error instanceof ApiError) {
    if (error.status === 401 && !error.message) return 'Your session has ended. Sign in again.';
    if (error.code === 'INVALID_EMAIL_OR_PASSWORD') return 'That e-mail and password do not match an account.';
    // The per-account slow-down says when to try again; the per-client limit does not.
    if (error.code === 'ACCOUNT_SLOWED_DOWN') return error.message;
    if (error.code === 'TOO_MANY_REQUESTS' || error.status === 429) return 'Too many attempts. Wait a minute and try again.';
    // The engines name their inputs by key for scripts (temp_k, doping_cm3); a person reads the label.
    if (error.code === 'invalid_input') return keysToWords(error.message);
    return error.message;
  }
  if (error instanceof Error && error.message) return error.message;
  return 'Something went wrong. Try again.';
}
