/**
 * The Quasilevel server process: serves /api and the exported web app on HOST:PORT (default
 * 127.0.0.1:8080), data in QUASILEVEL_DATA_DIR (default ./data). Closes the database on
 * SIGTERM/SIGINT. Exits with status 1 and a message when the port or the data folder is in use.
 */
import path from 'node:path';
import { dataDir } from '@/db/client';
import { StartError } from '@/server/data-lock';
import { checkCanStart, networkWarning, serverHost, startRuntime } from '@/server/runtime';

async function main() {
  const port = Number(process.env.PORT || 8080);
  // A used folder or port stops here, before a new data folder is migrated and seeded.
  await checkCanStart(dataDir(), port, serverHost());
  const rt = await startRuntime({
    dataDir: dataDir(),
    port,
    host: serverHost(),
    webDir: path.resolve(__dirname, '..', 'dist'),
    seed: process.env.QUASILEVEL_SEED !== '0',
  });
  const warning = networkWarning();
  if (warning) console.warn(`[quasilevel] ${warning}`);
  console.log(`[quasilevel] listening on ${rt.url} (data: ${dataDir()})${rt.seeded ? ' — demo data seeded' : ''}`);
  const shutdown = async (signal: string) => {
    console.log(`[quasilevel] ${signal}: closing the database and stopping`);
    await rt.stop();
    process.exit(0);
  };
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
  process.on('SIGINT', () => void shutdown('SIGINT'));
}

main().catch((err) => {
  // A StartError says what to do; anything else gets its stack for the bug report.
  console.error('[quasilevel] could not start:', err instanceof StartError ? err.message : err);
  process.exit(1);
});
