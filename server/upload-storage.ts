/**
 * Where the parts of an upload are kept while it is read and fitted: small files in memory, within
 * a budget the whole process shares, and a file on disk in the upload folder for the rest.
 *
 * A measured I-V file is a few kilobytes, and an upload of 1,000 of them written to temporary files
 * cost a file created, written, read back and removed each: a third of the upload's file-system
 * work (QUASILEVEL_DEBUG_UPLOAD=1, README "Past one machine"). Held in memory they cost nothing of
 * that; the budget bounds what every request at once can hold (a 10 MB file, or many uploads at
 * the same moment, go to disk as before), so memory stays bounded whatever is sent.
 */
import { randomBytes } from 'node:crypto';
import { createWriteStream, unlink } from 'node:fs';
import type { WriteStream } from 'node:fs';
import path from 'node:path';
import type { Readable } from 'node:stream';
import type { Request } from 'express';
import type { StorageEngine } from 'multer';

/** Bytes held in memory by every upload of the process at once; a part that would pass it goes to disk. */
export class MemoryBudget {
  private held = 0;
  constructor(readonly bytes: number) {}
  /** Takes `n` bytes when they fit. */
  take(n: number): boolean {
    if (this.held + n > this.bytes) return false;
    this.held += n;
    return true;
  }
  give(n: number): void {
    this.held = Math.max(0, this.held - n);
  }
  /** Bytes held now. */
  get used(): number {
    return this.held;
  }
}

/** What the engine leaves on multer's file: `buffer` (in memory) or `path` (on disk). */
type Kept = { buffer?: Buffer; path?: string; size: number; filename?: string; destination?: string };

/**
 * A multer storage engine: each part in memory while it stays under `fileBytes` and the budget
 * has room, else the bytes so far and the rest in a file in `dir`. Whatever a part holds is
 * given back when multer removes it, when its stream breaks off, or by `release`.
 */
export function spillingStorage(dir: string, budget: MemoryBudget, fileBytes: number): StorageEngine {
  return {
    _handleFile(_req: Request, file: Express.Multer.File & { stream: Readable }, cb: (error?: unknown, info?: Partial<Kept>) => void) {
      const chunks: Buffer[] = [];
      let inMemory = 0;
      let size = 0;
      let out: WriteStream | null = null;
      let filePath = '';
      let settled = false;
      const finish = (err: unknown, info?: Partial<Kept>) => {
        if (settled) return;
        settled = true;
        cb(err, info);
      };
      const giveBack = () => {
        budget.give(inMemory);
        inMemory = 0;
        chunks.length = 0;
      };
      const spill = () => {
        // 16 random bytes in hex, as multer's disk storage names them: nothing of the name sent.
        filePath = path.join(dir, randomBytes(16).toString('hex'));
        out = createWriteStream(filePath);
        out.on('error', (err) => {
          file.stream.unpipe();
          file.stream.resume();
          unlink(filePath, () => finish(err));
        });
        for (const c of chunks) out.write(c);
        giveBack();
      };
      file.stream.on('data', (chunk: Buffer) => {
        size += chunk.length;
        if (!out && size <= fileBytes && budget.take(chunk.length)) {
          chunks.push(chunk);
          inMemory += chunk.length;
          return;
        }
        if (!out) spill();
        if (!out!.write(chunk)) {
          file.stream.pause();
          out!.once('drain', () => file.stream.resume());
        }
      });
      file.stream.on('error', (err) => {
        giveBack();
        if (out) out.destroy();
        if (filePath) unlink(filePath, () => finish(err));
        else finish(err);
      });
      // A stream that closes without its end (the request broke off): nothing is kept.
      file.stream.on('close', () => {
        if (settled || file.stream.readableEnded) return;
        giveBack();
        if (out) out.destroy();
        if (filePath) unlink(filePath, () => undefined);
      });
      file.stream.on('end', () => {
        if (out) {
          out.end(() => finish(null, { path: filePath, size, destination: dir, filename: path.basename(filePath) }));
          return;
        }
        const buffer = chunks.length === 1 ? chunks[0] : Buffer.concat(chunks, inMemory);
        chunks.length = 0;
        finish(null, { buffer, size });
      });
    },
    _removeFile(_req: Request, file: Express.Multer.File, cb: (error: Error | null) => void) {
      release(budget, file);
      if (file.path) unlink(file.path, () => cb(null));
      else cb(null);
    },
  };
}

/** Gives back what a kept part holds in memory (safe to call more than once). */
export function release(budget: MemoryBudget, file: Express.Multer.File): void {
  if (!file.buffer) return;
  budget.give(file.buffer.length);
  (file as { buffer?: Buffer }).buffer = undefined;
}
