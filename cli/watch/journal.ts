/**
 * The watcher's journal: `.quasilevel-watch.jsonl` in the watched folder, one JSON object a line,
 * appended and never rewritten, so a crash loses at most the line being written (a torn last line
 * is skipped on reading). It records the batch a `--lot` created, each upload attempt before it is
 * sent (`sending`) and each answer of the server (`accepted` or `rejected`, with the reason) by the
 * SHA-256 of the file's content: a content with an answer is not sent again; a file whose content
 * changed is a new content and is sent again.
 */
import { appendFileSync, existsSync, readFileSync } from 'node:fs';
import path from 'node:path';

export const JOURNAL_NAME = '.quasilevel-watch.jsonl';

export type JournalEntry =
  | { kind: 'batch'; batch_id: string; lot: string; server: string; at: string }
  | { kind: 'sending'; sha256: string; file: string; at: string }
  | { kind: 'accepted'; sha256: string; file: string; batch_id: string; curve_id: string; device_id: string; at: string }
  | { kind: 'rejected'; sha256: string; file: string; batch_id: string; code: string; reason: string; at: string };

export type Answer = Extract<JournalEntry, { kind: 'accepted' | 'rejected' }>;

export class Journal {
  readonly file: string;
  /** The server's answer for each content (the latest). */
  private readonly answers = new Map<string, Answer>();
  /** Contents sent without a recorded answer (the server may have stored them). */
  private readonly inFlight = new Set<string>();
  /** File names with any earlier answer (a new content under such a name replaces the old curve). */
  private readonly namesSent = new Set<string>();
  private readonly batches: Extract<JournalEntry, { kind: 'batch' }>[] = [];

  constructor(dir: string) {
    this.file = path.join(dir, JOURNAL_NAME);
    if (!existsSync(this.file)) return;
    for (const line of readFileSync(this.file, 'utf8').split('\n')) {
      if (!line.trim()) continue;
      let e: JournalEntry;
      try {
        e = JSON.parse(line) as JournalEntry;
      } catch {
        continue; // a line torn by a crash
      }
      this.apply(e);
    }
  }

  private apply(e: JournalEntry): void {
    if (e.kind === 'batch') this.batches.push(e);
    else if (e.kind === 'sending') this.inFlight.add(e.sha256);
    else {
      this.answers.set(e.sha256, e);
      this.inFlight.delete(e.sha256);
      this.namesSent.add(e.file);
    }
  }

  /** Appends one entry (synchronously: it is on disk before the next step starts). */
  write(e: JournalEntry): void {
    appendFileSync(this.file, `${JSON.stringify(e)}\n`);
    this.apply(e);
  }

  answerFor(sha256: string): Answer | undefined {
    return this.answers.get(sha256);
  }

  /** True when this content, or an earlier content under this name, may already be on the server. */
  mayBeStored(sha256: string, file: string): boolean {
    return this.inFlight.has(sha256) || this.namesSent.has(file);
  }

  /** The batch an earlier run created for `lot` on `server`. */
  batchForLot(lot: string, server: string): string | undefined {
    return this.batches.findLast((b) => b.lot === lot && b.server === server)?.batch_id;
  }
}
