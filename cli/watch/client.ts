/**
 * The watcher's requests to the server, with the station key in `x-api-key`. Each answer is
 * sorted into what the watcher does next: the file's result (accepted or rejected by the
 * server), `retry` (server unreachable, 5xx, 429: try again later), or `stop` (the key is refused,
 * or the batch takes no more curves: nothing later would succeed either).
 */
import { basename } from 'node:path';

export type ServerConfig = { server: string; key: string };

export type UploadFields = { cells?: number; temp_c?: number; irradiance_w_m2?: number; area_cm2?: number };

export type FileOutcome =
  | { kind: 'accepted'; curve_id: string; device_id: string }
  | { kind: 'rejected'; code: string; reason: string }
  | { kind: 'retry'; reason: string }
  | { kind: 'stop'; reason: string };

type ErrorBody = { code?: string; message?: string };

async function readBody(res: Response): Promise<unknown> {
  const text = await res.text();
  try {
    return JSON.parse(text);
  } catch {
    return { message: text.slice(0, 200) };
  }
}

function stopFor(status: number, body: ErrorBody): { kind: 'stop'; reason: string } | null {
  if (status === 401) return { kind: 'stop', reason: `the server refused the station key (401): ${body.message ?? 'no reason given'}` };
  if (status === 403) return { kind: 'stop', reason: `the server refused this station (403): ${body.message ?? 'no reason given'}` };
  if (status === 404) return { kind: 'stop', reason: `the batch was not found in the station's organisation (404): ${body.message ?? ''}`.trim() };
  if (status === 409) return { kind: 'stop', reason: `the batch takes no more curves (409): ${body.message ?? ''}`.trim() };
  return null;
}

const unreachable = (err: unknown) => `server unreachable (${err instanceof Error ? ((err.cause as Error | undefined)?.message ?? err.message) : String(err)})`;

/** Uploads one file; on_duplicate `replace` when an earlier content of it may be on the server. */
export async function uploadFile(cfg: ServerConfig, batchId: string, file: { path: string; bytes: Buffer }, fields: UploadFields, replace: boolean): Promise<FileOutcome> {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) if (v !== undefined) form.append(k, String(v));
  form.append('on_duplicate', replace ? 'replace' : 'ask');
  form.append('files', new Blob([new Uint8Array(file.bytes)]), basename(file.path));
  let res: Response;
  try {
    res = await fetch(`${cfg.server}/api/batches/${encodeURIComponent(batchId)}/curves`, { method: 'POST', headers: { 'x-api-key': cfg.key }, body: form, signal: AbortSignal.timeout(120_000) });
  } catch (err) {
    return { kind: 'retry', reason: unreachable(err) };
  }
  const body = (await readBody(res)) as ErrorBody & { results?: { accepted: boolean; curve_id?: string; device_id?: string; code?: string; error?: string }[] };
  const stop = stopFor(res.status, body);
  if (stop) return stop;
  const result = body.results?.[0];
  if ((res.status === 201 || res.status === 422) && result) {
    return result.accepted
      ? { kind: 'accepted', curve_id: String(result.curve_id), device_id: String(result.device_id) }
      : { kind: 'rejected', code: String(result.code), reason: String(result.error) };
  }
  // A file the server will never take (too large, unreadable request part).
  if (res.status === 413 || res.status === 400) return { kind: 'rejected', code: body.code ?? String(res.status), reason: body.message ?? `refused (${res.status})` };
  return { kind: 'retry', reason: `the server answered ${res.status}${body.message ? `: ${body.message}` : ''}` };
}

/** Creates the batch for `--lot` (named after it); the same sorting of answers as an upload. */
export async function createLotBatch(cfg: ServerConfig, lot: string, fields: UploadFields): Promise<{ kind: 'created'; id: string } | Exclude<FileOutcome, { kind: 'accepted' }>> {
  let res: Response;
  try {
    res = await fetch(`${cfg.server}/api/batches`, {
      method: 'POST',
      headers: { 'x-api-key': cfg.key, 'content-type': 'application/json' },
      body: JSON.stringify({ name: lot, lot, ...(fields.cells ? { cells: fields.cells } : {}), ...(fields.area_cm2 ? { area_cm2: fields.area_cm2 } : {}) }),
      signal: AbortSignal.timeout(30_000),
    });
  } catch (err) {
    return { kind: 'retry', reason: unreachable(err) };
  }
  const body = (await readBody(res)) as ErrorBody & { id?: string };
  const stop = stopFor(res.status, body);
  if (stop) return stop;
  if (res.status === 201 && body.id) return { kind: 'created', id: body.id };
  if (res.status === 400) return { kind: 'stop', reason: `the server refused the batch: ${body.message ?? ''}` };
  return { kind: 'retry', reason: `the server answered ${res.status}${body.message ? `: ${body.message}` : ''}` };
}
