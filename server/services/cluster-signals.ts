/**
 * Signals between the server processes of one PostgreSQL database (DATABASE_URL mode), over the
 * server's LISTEN/NOTIFY: when one process clears its resolved callers (a sign-out, a password or
 * role change: permissions.ts `invalidatesCallers`), every other process clears its own, so a
 * signed-out cookie is refused by all of them, not only by the one that signed it out. The answer
 * caches need no signal: their keys carry the batch revisions read from the database
 * (answer-cache.ts). A connection that breaks is opened again; on reconnecting the process clears
 * its callers, since it may have missed a signal meanwhile.
 */
import { Client } from 'pg';

const CHANNEL = 'quasilevel_callers';

export type CallerSignals = {
  /** Tells the other processes to clear their resolved callers. */
  publish: () => void;
  /** `clear` runs when another process (or a reconnection) says the callers may have changed. */
  subscribe: (clear: () => void) => void;
  stop: () => Promise<void>;
};

/** Listens on the database of `url`; resolves once listening. */
export async function callerSignals(url: string): Promise<CallerSignals> {
  const listeners: (() => void)[] = [];
  const clearAll = () => listeners.forEach((f) => f());
  let client: Client | null = null;
  let stopped = false;
  let retry: NodeJS.Timeout | undefined;

  const connect = async (): Promise<void> => {
    const c = new Client({ connectionString: url, connectionTimeoutMillis: 5000 });
    // Its own signals come back too; this process cleared its callers already.
    c.on('notification', (n) => {
      if (n.processId !== (c as unknown as { processID?: number }).processID) clearAll();
    });
    const lost = (err?: Error) => {
      if (client !== c || stopped) return;
      client = null;
      console.error(`[quasilevel] caller signals: connection lost${err ? ` (${err.message})` : ''}; reconnecting`);
      c.end().catch(() => undefined);
      retry = setTimeout(() => void connect().then(clearAll, () => lost()), 1000);
    };
    client = c;
    c.on('error', lost);
    c.on('end', () => lost());
    await c.connect();
    await c.query(`listen ${CHANNEL}`);
  };
  await connect();

  return {
    publish: () => {
      client?.query(`select pg_notify('${CHANNEL}', '')`).catch((err: Error) => console.error(`[quasilevel] caller signals: ${err.message}`));
    },
    subscribe: (clear) => {
      listeners.push(clear);
    },
    stop: async () => {
      stopped = true;
      clearTimeout(retry);
      const c = client;
      client = null;
      await c?.end().catch(() => undefined);
    },
  };
}
