/**
 * Receiving an upload: the multipart body is streamed part by part, small files kept in memory
 * within a budget the process shares and the rest in a temporary folder in the data folder
 * (server/upload-storage.ts), within per-request caps answered with 413 before the body is read on,
 * and every part becomes either a received file or that file's own rejection (a name that is not
 * UTF-8 or holds control characters, a part whose header cannot be read), so one bad part never
 * costs the others. The temporary files are removed, and the memory given back, when the request ends, however it ends.
 */
import { mkdirSync } from 'node:fs';
import { readFile, unlink } from 'node:fs/promises';
import type { Readable, Writable } from 'node:stream';
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import multer from 'multer';
import { MAX_FILE_BYTES } from '@/lib/iv';
import { textProblem } from '@/lib/schemas/text';
import { HttpError } from '@/server/errors';
import type { UploadedFile } from '@/server/services/uploads';
import { MemoryBudget, release, spillingStorage } from '@/server/upload-storage';

/** Caps of one upload request (README "Uploads"). */
export type UploadLimits = {
  /** Files per request. */
  files: number;
  /** Bytes of the whole request body, as its Content-Length states. */
  totalBytes: number;
  /** Bytes of one file (the reader's own limit). */
  fileBytes: number;
  /** Bytes the process's uploads hold in memory at once (files of up to `memoryFileBytes`); 0 writes every file to disk. */
  memoryBytes: number;
  /** Largest file kept in memory. */
  memoryFileBytes: number;
};

/**
 * 2,000 files (the benchmark sends 1,000 curves in one request); 512 MB a request, because the web app
 * sends 40 files a request (lib/api/batches.ts UPLOAD_CHUNK) of up to 10 MB each, plus the form around them.
 * In memory: 64 MB over all requests at once, files of up to 1 MB (a flash tester's file is 2–60 kB).
 */
export const UPLOAD_LIMITS: UploadLimits = {
  files: 2000,
  totalBytes: 512 * 1024 * 1024,
  fileBytes: MAX_FILE_BYTES,
  memoryBytes: 64 * 1024 * 1024,
  memoryFileBytes: 1024 * 1024,
};

/** Longest file name kept, in characters (most file systems stop at 255). */
export const MAX_FILE_NAME_CHARS = 255;

const MB = 1024 * 1024;

/** A part busboy could not read, and how many file parts came before it. */
type UnreadablePart = { after: number };

type Receiving = { unreadable: UnreadablePart[]; files: number; answered: boolean; budget: MemoryBudget };
const receiving = new WeakMap<Request, Receiving>();

/**
 * Answers at once and closes the connection, so the rest of the body is not read (a keep-alive
 * connection would otherwise read and discard all of it first).
 */
function refuseNow(res: Response, err: HttpError) {
  if (res.headersSent) return;
  res.set('Connection', 'close');
  res.status(err.status).json({ code: err.code, message: err.message });
}

function tooManyFiles(limits: UploadLimits) {
  return new HttpError(413, 'too_many_files', `At most ${limits.files} files per upload; nothing was stored. Split the upload.`);
}

/**
 * The file's name as the client meant it. Browsers send UTF-8 bytes; busboy hands them over as
 * latin-1 characters (one per byte, `defParamCharset`), so the bytes are recovered and decoded
 * strictly. A name given as `filename*=UTF-8''…` arrives decoded already (characters above U+00FF).
 */
export function decodeFileName(raw: string): { name: string; problem?: string } {
  if ([...raw].some((ch) => ch.codePointAt(0)! > 0xff)) return checkName(raw);
  const bytes = Buffer.from(raw, 'latin1');
  try {
    return checkName(new TextDecoder('utf-8', { fatal: true }).decode(bytes));
  } catch {
    // Shown with replacement characters so the answer can still say which file it was.
    return { name: new TextDecoder('utf-8').decode(bytes), problem: 'is not valid UTF-8' };
  }
}

function checkName(name: string): { name: string; problem?: string } {
  if (!name.trim()) return { name, problem: 'is empty' };
  const problem = textProblem(name, { max: MAX_FILE_NAME_CHARS });
  // Control characters are replaced in the name the answer shows, never passed on.
  // eslint-disable-next-line no-control-regex
  return problem ? { name: name.replace(/[\u0000-\u001f\u007f-\u009f]/g, '\uFFFD'), problem } : { name };
}

/**
 * Middleware for `POST …/curves`: checks the caps it can check from the headers, streams the
 * files to `dir` and leaves `req.files` (multer's list, in the order sent) for `receivedFiles`.
 */
export function receiveUploads(dir: string, limits: UploadLimits = UPLOAD_LIMITS): RequestHandler & { budget: MemoryBudget } {
  mkdirSync(dir, { recursive: true });
  const budget = new MemoryBudget(limits.memoryBytes);
  const options: multer.Options & { streamHandler: (req: Request, busboy: Writable) => void } = {
    storage: spillingStorage(dir, budget, limits.memoryFileBytes),
    defParamCharset: 'latin1',
    limits: { fileSize: limits.fileBytes, files: limits.files, fields: 20, fieldSize: 1024 },
    streamHandler: (req, busboy) => {
      const state = receiving.get(req)!;
      // busboy reports an unreadable part header as an error but goes on with the next part;
      // multer would end the whole request on it. It becomes that part's rejection instead.
      const emit = busboy.emit.bind(busboy) as (event: string | symbol, ...args: unknown[]) => boolean;
      busboy.emit = ((event: string | symbol, ...args: unknown[]) => {
        if (event === 'file') state.files++;
        if (event === 'error' && (args[0] as Error)?.message === 'Malformed part header') {
          state.unreadable.push({ after: state.files });
          return true;
        }
        if (event === 'filesLimit' && !state.answered) {
          state.answered = true;
          refuseNow(req.res!, tooManyFiles(limits));
        }
        return emit(event, ...args);
      }) as typeof busboy.emit;
      (req as Readable).pipe(busboy);
    },
  };
  const upload = multer(options).array('files', limits.files);

  const handler = (req: Request, res: Response, next: NextFunction) => {
    if (!req.is('multipart')) return next();
    const declared = Number(req.headers['content-length']);
    if (req.headers['content-length'] === undefined || !Number.isFinite(declared)) {
      return refuseNow(res, new HttpError(411, 'length_required', 'An upload must state its size (Content-Length); send it as a form, as browsers do.'));
    }
    if (declared > limits.totalBytes) {
      return refuseNow(res, new HttpError(413, 'upload_too_large', `An upload may hold at most ${limits.totalBytes / MB} MB; this one is ${(declared / MB).toFixed(1)} MB and nothing was stored. Split the upload.`));
    }
    const state: Receiving = { unreadable: [], files: 0, answered: false, budget };
    receiving.set(req, state);
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      // The file-count cap was answered while the body was still arriving.
      if (state.answered) return;
      const e = err as { code?: string; field?: string };
      if (e.code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, 'file_too_large', `A file is larger than the ${limits.fileBytes / MB} MB limit; nothing was stored.`));
      if (e.code === 'LIMIT_FILE_COUNT') return next(tooManyFiles(limits));
      if (e.code === 'LIMIT_UNEXPECTED_FILE') return next(new HttpError(400, 'wrong_field', `Send the files in the form field "files" (got "${textProblem(e.field ?? '', { max: 60 }) ? '…' : e.field}").`));
      if (e.code?.startsWith('LIMIT_')) return next(new HttpError(400, 'bad_upload', 'The upload form has too many or too large fields.'));
      return next(new HttpError(400, 'bad_upload', 'The upload could not be read as a multipart form.'));
    });
  };
  return Object.assign(handler, { budget });
}

/**
 * The received parts in the order they were sent: each file with its checked name and a reader
 * for its bytes, or its rejection. Unreadable parts stand where they were in the body.
 */
export function receivedFiles(req: Request): UploadedFile[] {
  const stored = (req.files as Express.Multer.File[] | undefined) ?? [];
  const state = receiving.get(req);
  const out: UploadedFile[] = [];
  const unreadable = [...(state?.unreadable ?? [])];
  const placeUnreadable = (before: number) => {
    while (unreadable.length && unreadable[0].after <= before) {
      unreadable.shift();
      out.push({ name: `(part ${out.length + 1})`, rejected: { code: 'unreadable_part', error: `Part ${out.length + 1} of the upload has a header that cannot be read (a name with control characters or broken quoting), so it was skipped.` } });
    }
  };
  stored.forEach((f, k) => {
    placeUnreadable(k);
    const { name, problem } = decodeFileName(f.originalname);
    if (problem) {
      out.push({ name, rejected: { code: 'bad_file_name', error: `The file name "${name.slice(0, 80)}" ${problem}; rename the file and upload it again.` } });
      return;
    }
    const kept = f.buffer;
    out.push({ name, size: f.size, read: () => (kept ? Promise.resolve(kept) : readFile(f.path)) });
  });
  placeUnreadable(Number.POSITIVE_INFINITY);
  return out;
}

/** Removes the request's temporary files and gives back the memory its files held (safe to call more than once). */
export async function removeReceived(req: Request): Promise<void> {
  const stored = (req.files as Express.Multer.File[] | undefined) ?? [];
  const budget = receiving.get(req)?.budget;
  if (budget) for (const f of stored) release(budget, f);
  await Promise.all(stored.map((f) => (f.path ? unlink(f.path).catch(() => undefined) : undefined)));
}
