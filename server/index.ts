/**
 * The Quasilevel server process: serves /api and the exported web app on PORT (default 8080),
 * data in QUASILEVEL_DATA_DIR (default ./data). Closes the database on SIGTERM/SIGINT.
 */
import path from 'node:path';
import { dataDir } from '@/db/client';
import { startRuntime } from '@/server/runtime';

async function main() {
  const port = Number(process.env.PORT || 8080);
  const rt = await startRuntime({
    dataDir: dataDir(),
    port,
    webDir: path.resolve(__dirname, '..', 'dist'),
    seed: process.env.QUASILEVEL_SEED !== '0',
  });
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
  console.error('[quasilevel] could not start:', err);
  process.exit(1);
});
