/**
 * The folder watcher behind `watch`: every I-V file in the folder (not hidden, not the journal,
 * not a temporary `.part`/`.tmp`/`~` file) is sent once its size and time have stopped changing,
 * one at a time, in the order it became ready; the journal (cli/watch/journal.ts) makes a restart
 * skip what the server has answered and resend what it may not have. Unreachable server, 5xx or
 * 429: the file waits and is tried again with a growing pause (0.5 s doubling to 10 s) — for ever
 * while watching, `retries` times with `once`. A refused key or a batch that takes no more curves
 * stops the run.
 */
import { createHash } from 'node:crypto';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { createLotBatch, uploadFile } from '@/cli/watch/client';
import type { ServerConfig, UploadFields } from '@/cli/watch/client';
import { Journal, JOURNAL_NAME } from '@/cli/watch/journal';

export type WatchOptions = ServerConfig & {
  dir: string;
  batch?: string;
  lot?: string;
  fields: UploadFields;
  once: boolean;
  /** How long a file's size and time must stay unchanged before it is sent, ms. */
  settleMs: number;
  /** Tries per file with `once` before it counts as not sent. */
  retries: number;
  print: (line: string) => void;
};

export type WatchCounts = { accepted: number; rejected: number; known: number; unsent: number };

/** A refused key, an unknown or closed batch: the run ends. */
export class StopRun extends Error {}

export function isWatchedFile(name: string): boolean {
  return name !== JOURNAL_NAME && !name.startsWith('.') && !/(\.part|\.tmp|\.crdownload|~)$/i.test(name);
}

const pause = (attempt: number) => Math.min(10_000, 500 * 2 ** attempt);

export class Watcher {
  readonly counts: WatchCounts = { accepted: 0, rejected: 0, known: 0, unsent: 0 };
  private readonly journal: Journal;
  private batchId: string | undefined;
  private stopped = false;
  /** Ends the pause between tries at once when the run is stopped. */
  private wake: (() => void) | null = null;

  constructor(private readonly o: WatchOptions) {
    this.journal = new Journal(o.dir);
    this.batchId = o.batch;
  }

  stop(): void {
    this.stopped = true;
    this.wake?.();
  }

  /** A pause before the next try, cut short by stop(). */
  private pauseFor(attempt: number): Promise<void> {
    return new Promise<void>((resolve) => {
      const timer = setTimeout(done, pause(attempt));
      function done() {
        clearTimeout(timer);
        resolve();
      }
      this.wake = done;
    }).then(() => {
      this.wake = null;
    });
  }

  /** The batch to send to: --batch, or the one the journal holds for --lot, or a new one named after the lot. */
  async batch(): Promise<string | undefined> {
    if (this.batchId) return this.batchId;
    const lot = this.o.lot!;
    const known = this.journal.batchForLot(lot, this.o.server);
    if (known) return (this.batchId = known);
    for (let attempt = 0; !this.stopped; attempt++) {
      const r = await createLotBatch(this.o, lot, this.o.fields);
      if (r.kind === 'created') {
        this.journal.write({ kind: 'batch', batch_id: r.id, lot, server: this.o.server, at: new Date().toISOString() });
        this.o.print(`batch     ${lot}: created on the server (${r.id})`);
        return (this.batchId = r.id);
      }
      if (r.kind === 'stop' || r.kind === 'rejected') throw new StopRun(r.reason);
      if (this.o.once && attempt + 1 >= this.o.retries) {
        this.o.print(`waiting   batch ${lot} could not be created: ${r.reason}`);
        return undefined;
      }
      if (attempt === 0) this.o.print(`waiting   batch ${lot}: ${r.reason}; trying again`);
      await this.pauseFor(attempt);
    }
    return undefined;
  }

  /** Sends one ready file (or notes that the server answered for this content before). */
  async handle(file: string): Promise<void> {
    const name = path.basename(file);
    let bytes: Buffer;
    try {
      bytes = readFileSync(file);
    } catch {
      return; // gone meanwhile
    }
    const sha256 = createHash('sha256').update(bytes).digest('hex');
    const before = this.journal.answerFor(sha256);
    if (before) {
      this.counts.known += 1;
      this.o.print(`known     ${name}: ${before.kind === 'accepted' ? `accepted before (device ${before.device_id})` : `rejected before: ${before.reason}`}`);
      return;
    }
    const batchId = await this.batch();
    if (!batchId) {
      this.counts.unsent += 1;
      this.o.print(`unsent    ${name}: no batch to send it to`);
      return;
    }
    const replace = this.journal.mayBeStored(sha256, name);
    this.journal.write({ kind: 'sending', sha256, file: name, at: new Date().toISOString() });
    for (let attempt = 0; ; attempt++) {
      const r = await uploadFile(this.o, batchId, { path: file, bytes }, this.o.fields, replace);
      const at = new Date().toISOString();
      if (r.kind === 'accepted') {
        this.journal.write({ kind: 'accepted', sha256, file: name, batch_id: batchId, curve_id: r.curve_id, device_id: r.device_id, at });
        this.counts.accepted += 1;
        this.o.print(`accepted  ${name}: device ${r.device_id}`);
        return;
      }
      if (r.kind === 'rejected') {
        this.journal.write({ kind: 'rejected', sha256, file: name, batch_id: batchId, code: r.code, reason: r.reason, at });
        this.counts.rejected += 1;
        this.o.print(`rejected  ${name}: ${r.reason}`);
        return;
      }
      if (r.kind === 'stop') throw new StopRun(r.reason);
      if (this.stopped || (this.o.once && attempt + 1 >= this.o.retries)) {
        this.counts.unsent += 1;
        this.o.print(`unsent    ${name}: ${r.reason}`);
        return;
      }
      if (attempt === 0) this.o.print(`waiting   ${name}: ${r.reason}; trying again`);
      await this.pauseFor(attempt);
    }
  }

  /** The files now in the folder, oldest first. */
  listFiles(): string[] {
    const files: { p: string; t: number }[] = [];
    for (const e of readdirSync(this.o.dir, { withFileTypes: true })) {
      if (!e.isFile() || !isWatchedFile(e.name)) continue;
      const p = path.join(this.o.dir, e.name);
      try {
        files.push({ p, t: statSync(p).mtimeMs });
      } catch {
        /* gone */
      }
    }
    return files.sort((a, b) => a.t - b.t || a.p.localeCompare(b.p)).map((f) => f.p);
  }

  summary(): string {
    const c = this.counts;
    const total = c.accepted + c.rejected + c.known + c.unsent;
    return `watch: ${total} file${total === 1 ? '' : 's'}: ${c.accepted} accepted, ${c.rejected} rejected by the server, ${c.known} answered before, ${c.unsent} not sent`;
  }
}
