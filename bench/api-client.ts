/**
 * A small HTTP client for a running Quasilevel server, used by the benchmarks, the load run and
 * the crash test: sign in (session cookie), JSON calls, and multipart uploads with fetch/FormData.
 * Refuses any address that is not loopback, so a harness can never be pointed at another machine.
 */
import type { SyntheticFile } from '@/bench/synthetic-files';

export type Session = { baseUrl: string; cookie: string };

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '[::1]', '::1']);

/** Throws unless `url` is http on a loopback host. */
export function assertLoopback(url: string): void {
  const u = new URL(url);
  if (u.protocol !== 'http:' || !LOOPBACK.has(u.hostname)) throw new Error(`refusing to drive ${url}: the harness only targets http on loopback (127.0.0.1)`);
}

/** Signs in with e-mail and password; returns the session cookie to send with later calls. */
export async function signIn(baseUrl: string, email: string, password: string): Promise<Session> {
  assertLoopback(baseUrl);
  const res = await fetch(`${baseUrl}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: baseUrl },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${await res.text()}`);
  const cookie = res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
  if (!cookie) throw new Error(`sign-in of ${email} returned no session cookie`);
  return { baseUrl, cookie };
}

/**
 * fetch, with GETs tried once more after a network error: a kept-alive socket that the server
 * closed while the harness was busy elsewhere fails the next request without reaching the server.
 */
export async function fetchRetryingGet(url: string, init: RequestInit = {}): Promise<Response> {
  try {
    return await fetch(url, init);
  } catch (err) {
    if ((init.method ?? 'GET') !== 'GET') throw err;
    return fetch(url, init);
  }
}

/** A JSON call; throws with the server's `{ code, message }` on a status other than `expect`. */
export async function api<T = unknown>(s: Session, method: string, pathName: string, body?: unknown, expect: number[] = [200, 201]): Promise<T> {
  const res = await fetchRetryingGet(`${s.baseUrl}${pathName}`, {
    method,
    headers: { cookie: s.cookie, origin: s.baseUrl, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  if (!expect.includes(res.status)) throw new Error(`${method} ${pathName}: ${res.status} ${text.slice(0, 300)}`);
  return JSON.parse(text) as T;
}

export type UploadResponse = { accepted: number; rejected: number; results: { file: string; accepted: boolean; curveId?: string; code?: string; error?: string }[] };

/** POST /api/batches/:id/curves with the files in the form field `files`; returns status and body. */
export async function uploadFiles(s: Session, batchId: string, files: Pick<SyntheticFile, 'name' | 'text'>[], signal?: AbortSignal): Promise<{ status: number; body: UploadResponse | { code: string; message: string } }> {
  const form = new FormData();
  for (const f of files) form.append('files', new Blob([f.text], { type: 'text/csv' }), f.name);
  const res = await fetch(`${s.baseUrl}/api/batches/${batchId}/curves`, { method: 'POST', headers: { cookie: s.cookie, origin: s.baseUrl }, body: form, signal });
  return { status: res.status, body: (await res.json()) as UploadResponse };
}

/** Creates a batch and returns its id. */
export async function createBatch(s: Session, fields: { name: string; cells?: number; area_cm2?: number; description?: string }): Promise<string> {
  const b = await api<{ id: string }>(s, 'POST', '/api/batches', fields);
  return b.id;
}
